package document

import (
	"io"
	"regexp"
)

// The marker of an output set: the schema, its version and the name of
// the file in the output directory.
const (
	SetSchema  = "joinery/set"
	SetVersion = 1
	SetMarker  = ".joinery-set"
)

// RunIDLen is the length of a run id: the first 16 bytes of a SHA-256,
// in lower-case hex.
const RunIDLen = 32

// runIDText matches a run id as the files of a set carry it near their
// start: "run_id": "<id>" in JSON documents, "run <id>" in text files.
var runIDText = regexp.MustCompile(`(?:"run_id": ?"|\brun )([0-9a-f]{32})\b`)

// RunIDHead is how far into a file of a set its run id must appear.
const RunIDHead = 4096

// FindRunID returns the first run id written in head (the start of a
// file of a set, at most RunIDHead bytes) as the documents write it, or
// "" when there is none.
func FindRunID(head []byte) string {
	if len(head) > RunIDHead {
		head = head[:RunIDHead]
	}
	m := runIDText.FindSubmatch(head)
	if m == nil {
		return ""
	}
	return string(m[1])
}

// ValidRunID reports whether s has the form of a run id.
func ValidRunID(s string) bool {
	if len(s) != RunIDLen {
		return false
	}
	for _, c := range []byte(s) {
		if (c < '0' || c > '9') && (c < 'a' || c > 'f') {
			return false
		}
	}
	return true
}

// SetDoc is the marker file .joinery-set that Joinery writes in every
// output directory (see writers/document/schema/set.schema.json). It
// says the directory is Joinery's to replace, which run wrote the set,
// and which files make it up, with their sizes and SHA-256, so that a
// reader can tell a whole set of one run from a mixed or damaged one.
type SetDoc struct {
	Schema    string `json:"schema"`
	Version   int    `json:"version"`
	Generator string `json:"generator"`
	RunID     string `json:"run_id"`
	// Job is the command that wrote the set ("build").
	Job string `json:"job"`
	// Complete is false only in the marker of a set still being written,
	// which never stands in an output directory.
	Complete bool      `json:"complete"`
	Files    []SetFile `json:"files"`
	// Sets are the sets nested in folders of this one (a sweep's
	// variants), each with its own marker; absent when none.
	Sets []NestedSet `json:"sets,omitempty"`
}

// NestedSet is a set nested in a folder of an outer set: the folder's
// name, and the job and run id its own marker records.
type NestedSet struct {
	Name  string `json:"name"`
	Job   string `json:"job"`
	RunID string `json:"run_id"`
}

// SetFile is one file of a set.
type SetFile struct {
	Name   string `json:"name"`
	Bytes  int64  `json:"bytes"`
	SHA256 string `json:"sha256"`
}

// EncodeSet writes the marker as indented JSON.
func EncodeSet(w io.Writer, doc *SetDoc) error { return EncodeJSON(w, doc) }

// DecodeSet reads a marker; name is the file's name, for errors.
func DecodeSet(r io.Reader, name string) (*SetDoc, error) {
	var doc SetDoc
	if err := decode(r, name, SetSchema, SetVersion, &doc); err != nil {
		return nil, err
	}
	return &doc, nil
}
