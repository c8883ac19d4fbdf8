"""Write the shared "small" fixture with VTK's own XML writer (python3-vtk9).

Reads testdata/formats/small_ascii.vtu with VTK's reader and writes it
back in the inline-binary and appended layouts with zlib and LZMA
compression, as VTK itself lays them out: the size header and the
compressed blocks base64-encoded as two separate streams; with LZMA
(vtkLZMADataCompressor) every block is a whole .xz stream. Run from the
repository root: /usr/bin/python3 testdata/vtu/vtk9_write.py
"""
import vtk

r = vtk.vtkXMLUnstructuredGridReader()
r.SetFileName("testdata/formats/small_ascii.vtu")
r.Update()
for name, mode, header in [
    ("vtk9_binary_zlib.vtu", "binary", 32),
    ("vtk9_binary_zlib_uint64.vtu", "binary", 64),
    ("vtk9_appended_base64_zlib.vtu", "appended", 32),
    ("vtk9_binary_lzma.vtu", "binary", 32),
    ("vtk9_appended_base64_lzma_uint64.vtu", "appended", 64),
    ("vtk9_appended_raw_lzma.vtu", "raw", 32),
]:
    w = vtk.vtkXMLUnstructuredGridWriter()
    w.SetInputData(r.GetOutput())
    w.SetFileName("testdata/vtu/" + name)
    if "lzma" in name:
        w.SetCompressorTypeToLZMA()
    else:
        w.SetCompressorTypeToZLib()
    w.SetHeaderType(header)
    if mode == "binary":
        w.SetDataModeToBinary()
    else:
        w.SetDataModeToAppended()
        if mode == "raw":
            w.EncodeAppendedDataOff()
        else:
            w.EncodeAppendedDataOn()
    if not w.Write():
        raise SystemExit("writing " + name + " failed")
