// Package vtk reads shell meshes from VTK legacy files (".vtk", the
// format published by Kitware in the VTK User's Guide and the VTK
// file-format documentation).
//
// Read and ReadFile accept DATASET UNSTRUCTURED_GRID files of versions 2.0
// to 5.1, ASCII or BINARY (big-endian, as the format specifies), with the
// classic "CELLS n size" layout (point counts inline) or the 5.x layout
// ("CELLS nOffsets nConn" followed by OFFSETS and CONNECTIVITY arrays),
// and DATASET POLYDATA files, whose cells come in the sections VERTICES,
// LINES, POLYGONS and TRIANGLE_STRIPS, each in either layout. A polydata
// set's cells are numbered as VTK numbers them, the vertices first, then
// the lines, the polygons and the strips, whatever the order of the
// sections in the file, and its CELL_DATA follows every section; each
// cell takes the type VTK gives it (geom.VTKPolyCellType): the polygons
// of 3 and 4 points are triangles and quads, the rest is skipped and
// counted.
// Triangles (cell type 5), quads (9), quadratic triangles (22), quadratic
// quads (23) and biquadratic quads (28) become elements; other cells are
// skipped and counted in the mesh's Source (see geom.MeshFromCells for
// the error when a part is made of skipped surface cells only).
//
// The arrays Joinery uses are, in CELL_DATA, "part" (integer; another
// name with geom.ReadOptions.PartArray, such as gmsh's "CellEntityIds"),
// "thickness" (real) and "element_id" (integer) and, in POINT_DATA,
// "node_id" (integer). Each may be written as SCALARS (with or without a
// LOOKUP_TABLE line) or as an array of a FIELD; any numeric VTK data type
// is accepted and converted, integer arrays stored as reals must hold
// whole numbers. Values of type float are single precision in ASCII
// files too: each is rounded to the nearest float32, as VTK's own reader
// stores them, so an ASCII file and its BINARY twin give the same mesh;
// double values are read exactly. Every other array, attribute or section (VECTORS,
// NORMALS, METADATA blocks, dataset-level FIELD data, ...) is skipped.
// Arrays of type string or variant are not supported. The VTK types long
// and unsigned_long are taken as 8 bytes wide in binary files, as written
// on 64-bit Linux and macOS.
//
// Errors in ASCII files name the file and line, errors in BINARY files the
// file and byte offset; all of them satisfy errors.Is(err, geom.ErrInput).
package vtk
