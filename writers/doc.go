// Package writers renders and writes what Joinery produces, other than
// meshes (whose writers sit beside their readers in geom/vtk and
// geom/native): the text report and build summary, connectors.csv,
// connectors.vtk for viewing, inspection summaries, and the output set
// as a whole (Render, OpenSet, OutputDir.Write, WriteSet) and read back
// (ReadSet). The published JSON documents and their schemas are in the
// document subpackage.
//
// Every writer is deterministic: the same input gives the same bytes,
// whatever GOMAXPROCS. Output files are rendered in memory first, so a
// failure to render leaves nothing written; a set is then written into
// a temporary directory beside the output directory and swapped in
// whole, so that a reader sees the old set or the new one, never a mix
// (see the comment at the top of outdir.go).
package writers
