"""Dump a VTK file as JSON with VTK's own readers (python3-vtk9).

Used by meshio's cross-check test: points, cells (type and point ids) and
the joinery arrays, as VTK itself reads them (unstructured grids and
polydata, legacy and XML).
"""
import json
import sys

import vtk


def main(path):
    if path.endswith(".vtu"):
        r = vtk.vtkXMLUnstructuredGridReader()
    elif path.endswith(".vtp"):
        r = vtk.vtkXMLPolyDataReader()
    else:
        # A legacy file holds an unstructured grid or a polydata set: VTK
        # has a reader for each.
        with open(path, "rb") as f:
            head = f.read(4096).upper()
        if b"DATASET POLYDATA" in head:
            r = vtk.vtkPolyDataReader()
        else:
            r = vtk.vtkUnstructuredGridReader()
        r.ReadAllScalarsOn()
        r.ReadAllFieldsOn()
    r.SetFileName(path)
    r.Update()
    g = r.GetOutput()
    pts = [list(g.GetPoint(i)) for i in range(g.GetNumberOfPoints())]
    cells = []
    for c in range(g.GetNumberOfCells()):
        ids = g.GetCell(c).GetPointIds()
        cells.append([g.GetCellType(c)] + [ids.GetId(k) for k in range(ids.GetNumberOfIds())])

    def arr(data, name):
        a = data.GetArray(name)
        if a is None:
            return None
        return [a.GetTuple1(i) for i in range(a.GetNumberOfTuples())]

    out = {
        "points": pts,
        "cells": cells,
        "node_id": arr(g.GetPointData(), "node_id"),
        "part": arr(g.GetCellData(), "part"),
        "thickness": arr(g.GetCellData(), "thickness"),
        "element_id": arr(g.GetCellData(), "element_id"),
    }
    json.dump(out, sys.stdout)


main(sys.argv[1])
