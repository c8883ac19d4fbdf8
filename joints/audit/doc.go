// Package audit checks a set of weld definitions, built by Joinery or
// read from an existing model (connectors.json, or node-pair lists
// exported from any model: ReadNodePairs, NodePairConnectors), against
// the mesh they live in. Run makes every check:
//
//   - seam: chains of welds whose attachments on a sheet share nodes or
//     an element, so that the flange cannot open between them (one pass
//     over the elements);
//   - duplicate: nuggets that overlap on a shared sheet, or two
//     connectors on one node pair;
//   - pitch-short: consecutive welds of a part pair closer than the
//     minimum spacing of the resistance welding manufacturers' table
//     (joints.MinSpacing);
//   - free-part: groups of parts joined by no connector to the largest
//     (Groups: connected components by gonum's graph/topo);
//   - mechanism and unrestrained: the free motions of the assembly, each
//     part a rigid body and each connector's ties (joints.Constraints)
//     rows of a kinematic system, reduced by its structure (Kinematic).
//
// Node pairs read from a model also get the checks a build makes of
// node-pair connectors (joints/spot's facing and gap rules). Findings come
// in the shared types of package joints; a finding about several welds
// lists them all in Finding.Joints.
package audit
