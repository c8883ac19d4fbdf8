package writers

import "embed"

// Schemas holds the JSON Schema files of Joinery's documents:
// schema/connectors.schema.json and schema/report.schema.json.
//
//go:embed schema/*.schema.json
var Schemas embed.FS
