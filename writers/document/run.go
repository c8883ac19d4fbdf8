package document

import "github.com/joinery-cae/joinery/joints"

// RunInfo says how a run was made, for the record in every output.
type RunInfo struct {
	Generator string // "joinery <version>"
	RunID     string // the run id every file of the set carries (see RunIDLen)
	// Unit is the unit of the inputs' lengths: the documents give every
	// length in it (converted from the mm the build works in) and record
	// it, so that outputs overlay the meshes.
	Unit   joints.Unit
	Meshes []string // input paths, as recorded
	Parts  string
	// PartsOverlays are the parts tables laid over Parts, in order.
	PartsOverlays []string
	Joints        []string
	// Renumbered lists the id offsets applied to mesh files (--renumber),
	// so that connector node ids can be mapped back to the files.
	Renumbered []Shift
	// Tags lists, per joint list, the columns kept as free tags.
	Tags []TagColumns
	// Connectors lists the connector files a check read.
	Connectors []string
	// PartNames gives part names by id, for the reports.
	PartNames map[int64]string
}

// Inputs lists the input files of a run and what was done to them.
type Inputs struct {
	Meshes []string `json:"meshes"`
	Parts  string   `json:"parts"`
	// PartsOverlays lists the parts tables laid over Parts (--parts
	// given again); absent when there are none.
	PartsOverlays []string     `json:"parts_overlays,omitempty"`
	Joints        []string     `json:"joints"`
	Renumbered    []Shift      `json:"renumbered"`
	TagColumns    []TagColumns `json:"tag_columns"`
	// Connectors lists the connector files a check read (absent for a
	// build).
	Connectors []string `json:"connectors,omitempty"`
}

// Shift is a renumbering applied to one mesh file's ids: the file's id
// plus the offset is the id in the model and in every output.
type Shift struct {
	File       string `json:"file"`
	NodeOffset int64  `json:"node_offset"`
	ElemOffset int64  `json:"element_offset"`
}

// TagColumns names the columns of one joint list that Joinery kept as
// free tags.
type TagColumns struct {
	File    string   `json:"file"`
	Columns []string `json:"columns"`
}

func (info RunInfo) inputs() Inputs {
	in := Inputs{Meshes: nonNil(info.Meshes), Parts: info.Parts, Joints: nonNil(info.Joints),
		Renumbered: info.Renumbered, TagColumns: info.Tags, Connectors: info.Connectors, PartsOverlays: info.PartsOverlays}
	if in.Renumbered == nil {
		in.Renumbered = []Shift{}
	}
	if in.TagColumns == nil {
		in.TagColumns = []TagColumns{}
	}
	return in
}

func nonNil[T any](s []T) []T {
	if s == nil {
		return []T{}
	}
	return s
}
