package document

import "embed"

// Schemas holds the JSON Schema (draft 2020-12) files of Joinery's
// documents: schema/connectors.schema.json, schema/report.schema.json,
// schema/flanges.schema.json, schema/surfaces.schema.json,
// schema/sweep-manifest.schema.json, schema/sweep-compare.schema.json and
// schema/set.schema.json (the marker of
// an output set).
//
//go:embed schema/*.schema.json
var Schemas embed.FS
