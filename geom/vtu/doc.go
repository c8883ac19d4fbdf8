// Package vtu reads shell meshes from VTK XML unstructured-grid files
// (.vtu) and polydata files (.vtp), as described in the VTK file-format
// documentation (Kitware).
//
// A polydata piece holds its cells in four sections, Verts, Lines, Polys
// and Strips (each with connectivity and offsets, counted by the Piece's
// NumberOfVerts, NumberOfLines, NumberOfPolys and NumberOfStrips, a count
// left out being 0); they are read as one cell list in VTK's order, the
// vertices first, then the lines, the polygons and the strips, whatever
// their order in the file, and cell data follows the same order. A cell
// takes the type VTK gives it (geom.VTKPolyCellType): the polygons of 3
// and 4 points are triangles and quads, the rest is skipped and counted.
//
// Every data-array layout of the format is read: ascii, inline binary
// (base64) and appended data (raw bytes or base64), with UInt32 or UInt64
// size headers, either byte order, and optionally compressed in VTK's
// blocked layout with zlib (vtkZLibDataCompressor) or LZMA
// (vtkLZMADataCompressor, each block an .xz stream). Several pieces in one
// file are concatenated.
//
// Compressed data cannot make the reader use more memory than the arrays
// it reads: the sizes a file declares are compared with what each array
// needs (its count of values times their size) before anything is
// inflated, and no block is inflated beyond its declared size.
//
// The reader keeps triangles (VTK type 5), quads (9), quadratic triangles
// (22), quadratic quads (23) and biquadratic quads (28); other cells are
// skipped and counted in the mesh's Source. It takes node ids from the
// point array "node_id" and element ids, parts and thicknesses from the
// cell arrays "element_id", "part" (or the name in
// geom.ReadOptions.PartArray, such as gmsh's "CellEntityIds") and
// "thickness"; other arrays are skipped without being decoded.
//
// The whole file is held in memory while it is read; raw appended data is
// decoded straight from it without further copies.
package vtu
