// Package geom holds Joinery's shell-mesh model and the geometry built on it.
//
// A Mesh stores nodes, shell elements and parts in dense, index-addressed
// slices; ids as the analyst wrote them (sparse, arbitrary, often in the
// millions) are kept beside them and mapped to indices through an IDIndex.
// Elements are linear (Tri3, Quad4) or second order (Tri6, Quad8,
// Quad9); second-order elements are curved, and projections, normals,
// areas, boxes and edges follow their curved surfaces.
// Derived data (normals, centroids, areas, bounding boxes, adjacency, free
// edges and their loops) is computed on demand by explicit calls, never
// hidden in the Mesh, so a Mesh is plain data that is safe to read from
// several goroutines at once.
//
// Lengths are in the model's unit (millimetres in every example and
// default Joinery documents); angles are in degrees unless a name says
// otherwise.
//
// geom imports neither joints nor writers: data flows read -> index ->
// find sheets -> build connectors -> check -> write.
package geom
