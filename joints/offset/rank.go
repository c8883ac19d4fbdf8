package offset

import "github.com/joinery-cae/joinery/geom"

// sampleOrder returns every part index's place (0, 1, ...) in the order
// in which pairs of parts are measured: each pair is sampled from the
// elements of the part that comes first, along its normals, and its
// contacts are framed on that part. The order is geometric
// (geom.Mesh.PartOrder: the finer mesh first, then the smaller area, the
// box's corners, the thinner; ids only between parts that coincide), so
// that neither the parts' ids nor the order of their records in a file
// changes the evidence (with the side taken from the part of lower index
// and the frame from the part of lower id, the bundled example gave 5
// contacts, 1 of them disagreeing, with its parts in one order and 6 and
// 2 with them reversed; TestInferIndependentOfIDsAndOrder).
func sampleOrder(m *geom.Mesh) []int32 { return m.PartOrder() }
