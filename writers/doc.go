// Package writers writes everything Joinery produces: meshes in the native
// text format and in VTK files for viewing, connector definitions, reports
// and summaries in Joinery's own documented JSON, YAML and CSV formats.
//
// Every writer is deterministic: the same input gives the same bytes,
// whatever GOMAXPROCS. Files are written through WriteFileAtomic, so a
// failure never leaves a half-written output behind.
package writers
