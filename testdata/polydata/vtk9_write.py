"""Write a polydata version of the shared "small" fixture with VTK's own
writers (python3-vtk9).

The 12 points of testdata/formats (node_id 101 to 112) carry cells in all
four polydata sections: two vertices (a vertex and a poly-vertex), two
lines (a line and a poly-line), six polygons (the four quads and the
triangle of the "small" fixture, and a pentagon) and one triangle strip.
VTK numbers the cells verts, lines, polys, strips, and the cell data
(part, thickness, element_id) follows that numbering. Written as legacy
files (5.1 layout and the classic 4.2 one, ASCII and binary) and as XML
.vtp files (ASCII, inline binary with zlib, appended raw, appended with
LZMA). Run from the repository root:
/usr/bin/python3 testdata/polydata/vtk9_write.py
"""
import vtk

pts = [
    (0, 0, 0), (10.5, 0, 0), (21.25, 0, 0),
    (0, 10.5, 0), (10.5, 10.5, 0.125), (21.25, 10.5, 0),
    (0, 21.25, 0), (10.5, 21.25, 0), (21.25, 21.25, 0),
    (0, 0, 2.5), (10.5, 0, 2.5), (0, 10.5, 2.5),
]
# (section, point indices, part, thickness, element id), in VTK's order.
cells = [
    ("verts", [0], 10, 1.0, 9001),
    ("verts", [1, 2], 10, 1.0, 9002),
    ("lines", [9, 10], 20, 1.5, 9003),
    ("lines", [9, 10, 11], 20, 1.5, 9004),
    ("polys", [0, 1, 4, 3], 10, 1.0, 1001),
    ("polys", [1, 2, 5, 4], 10, 1.0, 1002),
    ("polys", [3, 4, 7, 6], 10, 1.0, 1003),
    ("polys", [4, 5, 8, 7], 10, 1.0, 1004),
    ("polys", [9, 10, 11], 20, 1.5, 2001),
    ("polys", [0, 1, 2, 5, 4], 20, 1.5, 2002),
    ("strips", [3, 4, 6, 7], 10, 1.0, 1005),
]

pd = vtk.vtkPolyData()
p = vtk.vtkPoints()
p.SetDataTypeToDouble()
for x in pts:
    p.InsertNextPoint(*x)
pd.SetPoints(p)
arrays = {}
for sec in ("verts", "lines", "polys", "strips"):
    a = vtk.vtkCellArray()
    for s, ids, *_ in cells:
        if s == sec:
            a.InsertNextCell(len(ids), ids)
    arrays[sec] = a
pd.SetVerts(arrays["verts"])
pd.SetLines(arrays["lines"])
pd.SetPolys(arrays["polys"])
pd.SetStrips(arrays["strips"])


def array(cls, name, values):
    a = cls()
    a.SetName(name)
    for v in values:
        a.InsertNextValue(v)
    return a


pd.GetPointData().AddArray(array(vtk.vtkIntArray, "node_id", range(101, 113)))
pd.GetCellData().AddArray(array(vtk.vtkIntArray, "part", [c[2] for c in cells]))
pd.GetCellData().AddArray(array(vtk.vtkDoubleArray, "thickness", [c[3] for c in cells]))
pd.GetCellData().AddArray(array(vtk.vtkIntArray, "element_id", [c[4] for c in cells]))

for name, binary, version in [
    ("vtk9_51_ascii.vtk", False, None),
    ("vtk9_51_binary.vtk", True, None),
    ("vtk9_42_ascii.vtk", False, 42),
    ("vtk9_42_binary.vtk", True, 42),
]:
    w = vtk.vtkPolyDataWriter()
    w.SetInputData(pd)
    w.SetFileName("testdata/polydata/" + name)
    if binary:
        w.SetFileTypeToBinary()
    if version:
        w.SetFileVersion(version)
    if not w.Write():
        raise SystemExit("writing " + name + " failed")

for name, mode, comp in [
    ("vtk9_ascii.vtp", "ascii", None),
    ("vtk9_binary_zlib.vtp", "binary", "zlib"),
    ("vtk9_appended_raw.vtp", "raw", None),
    ("vtk9_appended_lzma.vtp", "appended", "lzma"),
]:
    w = vtk.vtkXMLPolyDataWriter()
    w.SetInputData(pd)
    w.SetFileName("testdata/polydata/" + name)
    if comp == "zlib":
        w.SetCompressorTypeToZLib()
    elif comp == "lzma":
        w.SetCompressorTypeToLZMA()
    else:
        w.SetCompressorTypeToNone()
    if mode == "ascii":
        w.SetDataModeToAscii()
    elif mode == "binary":
        w.SetDataModeToBinary()
    else:
        w.SetDataModeToAppended()
        w.SetEncodeAppendedData(mode != "raw")
    if not w.Write():
        raise SystemExit("writing " + name + " failed")
