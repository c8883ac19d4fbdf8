// Package document defines Joinery's published documents,
// connectors.json, report.json and flanges.json: their Go types, the
// JSON Schemas that describe them (embedded in Schemas), how a run's
// result becomes a document, and how a document is encoded and decoded.
// Commands that read a set back (check, sweep) use the same types that
// wrote it.
//
// Versioning rule, the same for every document: Version changes only
// when a field changes meaning or goes away. New fields and new finding
// codes may appear within a version, so readers must ignore fields they
// do not know, and the schemas leave objects open to them (no
// "additionalProperties": false) and give finding codes as a pattern,
// listing the known ones in the description.
package document
