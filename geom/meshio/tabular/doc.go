// Package tabular reads the small hand-written tables among Joinery's
// inputs: CSV files with a header row, and YAML documents made of lists
// and maps (parts tables, joint lists, job files).
//
// It is strict, because a misspelt key that is silently ignored changes a
// model without a word: unknown YAML keys and duplicate keys are errors,
// and Suggest proposes the known name a misspelling was probably meant to
// be. Every error names the file and the line (geom.LineError), so
// errors.Is(err, geom.ErrInput) holds for all of them.
//
// The YAML side works on yaml.v3 nodes rather than decoding into structs:
// walking the nodes gives the same strictness as a decoder with known
// fields, plus the line of every value for the checks that follow.
package tabular
