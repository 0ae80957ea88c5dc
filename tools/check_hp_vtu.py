#!/usr/bin/env python3
"""Reads an `axicore moment --vtk` map (.vtu) with the VTK library and checks it against the run.

Usage: check_hp_vtu.py FILE.vtu FILE.json WINDING_MOMENT_AM2
  FILE.json is the `axicore moment --json` output of the same run; WINDING_MOMENT_AM2 is the
  moment of the case's windings, N I pi (a1^2 + a1 a2 + a2^2)/3 per winding (the caller's
  closed form for its case).

Reads with vtkXMLUnstructuredGridReader (the `vtk` package from PyPI; display-free modules
only). Checks: every cell a linear triangle, counter-clockwise in (r, z) (no folded cell);
the point and cell arrays with their components; the unit of every array stated in the field
data; the flux function is 2 pi r A_phi at every point; B, H, mu_r finite; and the moment
read back from the map: the core's magnetization moment, the integral of M_z = B_z/mu0 - H_z
over the cells where mu_r > 1 (2 pi r dA at each sub-triangle's centroid), plus the windings'
moment, equals the run's dipole moment within 1e-4 (the map's cell values are the field at one
point per sub-triangle, so its integral is only as good as the sampling: measured 1.7e-6 on the
torquer rod of tools/compare/torquer-hp.toml at --tolerance 1e-4).
"""
import json
import math
import sys

from vtkmodules.vtkCommonDataModel import VTK_TRIANGLE
from vtkmodules.vtkIOXML import vtkXMLUnstructuredGridReader

MU0 = 4e-7 * math.pi
POINT = {"A_phi_Wb_per_m": 1, "flux_function_Wb": 1}
CELL = {"region": 1, "element": 1, "degree": 1, "B_T": 3, "B_r_T": 1, "B_z_T": 1,
        "B_magnitude_T": 1, "H_A_per_m": 3, "H_magnitude_A_per_m": 1, "mu_r": 1}


def fail(msg):
    sys.exit(f"check_hp_vtu: {msg}")


def main():
    if len(sys.argv) != 4:
        fail("usage: check_hp_vtu.py FILE.vtu FILE.json WINDING_MOMENT_AM2")
    path, json_path, winding = sys.argv[1], sys.argv[2], float(sys.argv[3])
    run = json.load(open(json_path))
    reader = vtkXMLUnstructuredGridReader()
    reader.SetFileName(path)
    reader.Update()
    grid = reader.GetOutput()
    n_cells, n_points = grid.GetNumberOfCells(), grid.GetNumberOfPoints()
    if n_cells == 0 or n_points == 0:
        fail(f"{path}: empty map")
    pd, cd, fd = grid.GetPointData(), grid.GetCellData(), grid.GetFieldData()
    for data, want, kind in ((pd, POINT, "point"), (cd, CELL, "cell")):
        for name, comps in want.items():
            arr = data.GetArray(name)
            if arr is None:
                fail(f"{path}: no {kind} array {name}")
            if arr.GetNumberOfComponents() != comps:
                fail(f"{path}: {name} has {arr.GetNumberOfComponents()} components, not {comps}")
    units = fd.GetAbstractArray("array_units")
    if units is None:
        fail(f"{path}: no array_units in the field data")
    stated = [units.GetValue(i) for i in range(units.GetNumberOfValues())]
    for kind, names in (("point", POINT), ("cell", CELL)):
        for name in names:
            if not any(e.startswith(f"{kind} {name} [") for e in stated):
                fail(f"{path}: the field data states no unit for the {kind} array {name}")
    a_phi, psi = pd.GetArray("A_phi_Wb_per_m"), pd.GetArray("flux_function_Wb")
    scale = max(abs(psi.GetValue(i)) for i in range(n_points)) or 1.0
    for i in range(n_points):
        r = grid.GetPoint(i)[0]
        if abs(psi.GetValue(i) - 2 * math.pi * r * a_phi.GetValue(i)) > 1e-9 * scale:
            fail(f"{path}: flux function is not 2 pi r A_phi at point {i}")
    bz, hz = cd.GetArray("B_z_T"), cd.GetArray("H_A_per_m")
    mu_r = cd.GetArray("mu_r")
    core_moment = 0.0
    for c in range(n_cells):
        cell = grid.GetCell(c)
        if cell.GetCellType() != VTK_TRIANGLE:
            fail(f"{path}: cell {c} is not a linear triangle")
        ids = [cell.GetPointId(k) for k in range(3)]
        p = [grid.GetPoint(i) for i in ids]
        area = 0.5 * ((p[1][0] - p[0][0]) * (p[2][1] - p[0][1])
                      - (p[2][0] - p[0][0]) * (p[1][1] - p[0][1]))
        if not area > 0.0:
            fail(f"{path}: cell {c} is folded or clockwise (area {area})")
        b, h, m = bz.GetValue(c), hz.GetComponent(c, 1), mu_r.GetValue(c)
        if not all(math.isfinite(x) for x in (b, h, m)):
            fail(f"{path}: cell {c} has a value that is not finite")
        if m > 1.0 + 1e-9:
            r_c = (p[0][0] + p[1][0] + p[2][0]) / 3.0
            core_moment += (b / MU0 - h) * 2 * math.pi * r_c * area
    want = run["dipole_moment_Am2"]
    got = core_moment + winding
    if abs(got - want) > 1e-4 * abs(want):
        fail(f"{path}: moment read back {got:.6e} A m^2 against the run's {want:.6e}")
    print(f"check_hp_vtu: {path}: {n_cells} cells, {n_points} points; moment read back "
          f"{got:.6e} A m^2 against {want:.6e} ({(got - want) / want:+.1e})")


if __name__ == "__main__":
    main()
