// Package meshio loads a model: it reads mesh files of any supported
// format (chosen by extension), reads the parts table that gives parts
// their names, thicknesses, materials and reference surfaces, and merges
// everything into one geom.Mesh.
//
// Supported mesh formats: VTK legacy (.vtk, an unstructured grid or a
// polydata set, package geom/vtk), VTK XML unstructured grid and polydata
// (.vtu and .vtp, package geom/vtu) and Joinery's native text format
// (.jmesh, package geom/native).
//
// The parts table is YAML (.yaml or .yml):
//
//	parts:
//	  - id: 10               # positive integer, unique
//	    name: floor panel    # optional
//	    thickness: 0.8       # mm, required, > 0
//	    material: DC04       # optional
//	    surface: mid         # mid (default), top or bottom
//	    offset: 0            # optional, mm: 0, -t/2 or +t/2 (see below)
//	    mesh: floor.vtk      # optional: every element of this file
//
// or CSV (.csv) with a header row naming the same columns in any order
// (id and thickness required), separated by commas, semicolons or tabs
// (found from the header line; numbers take a decimal point):
//
//	id,name,thickness,material,surface,offset,mesh
//	10,floor panel,0.8,DC04,mid,0,floor.vtk
//
// The mesh key names a mesh file by its base name; its elements all belong
// to the part when the file itself carries no part ids (a part array in
// the file wins). Unknown keys and columns are errors.
//
// Surface and offset say the same thing two ways: which surface of the
// sheet its mesh was drawn on, relative to the element normals (top: the
// face the normals point to), and the signed distance from that meshed
// surface to the mid-surface along the normals, in the inputs' unit like
// the thickness: 0 for mid, -t/2 for top, +t/2 for bottom
// (geom.Surface.MidOffset). Give either or both:
// an offset alone sets the surface it stands for; given together they
// must agree; an offset that is none of the three (to within
// geom.OffsetTolerance, 0.0005 mm, compared in mm whatever the unit) is
// an error. Neither means mid.
//
// Further tables may be laid over the first (Model.Overlay; on the
// command line, --parts given again): each of their entries sets the
// surface of its part, must repeat its thickness, and may rename it.
package meshio
