package document

import "embed"

// Schemas holds the JSON Schema (draft 2020-12) files of Joinery's
// documents: schema/connectors.schema.json and schema/report.schema.json.
//
//go:embed schema/*.schema.json
var Schemas embed.FS
