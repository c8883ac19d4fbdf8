// Package joints is Joinery's domain: joints as an analyst's joining plan
// gives them (spot welds and bolts) and the joint lists that hold them,
// the connectors that builders make of them (stacks of sheets, ends,
// links) and the findings they report, the build options with their
// documented defaults, and the trade rules they apply (nugget sizes,
// governing thickness, weld spacing).
//
// Each job lives in a package of its own below this one and speaks in
// these types: spot (spot-weld connectors), flange (facing node pairs
// and weld placement), audit (checks of existing weld definitions), bolt
// (bolted joints), offset (offset links and reference surfaces) and
// inspect (model summaries). The pipeline package runs a whole job from
// reading to writing; every command calls it.
package joints
