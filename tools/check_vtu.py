#!/usr/bin/env python3
"""Reads an axicore field map (.vtu) with the VTK library and checks it against the run's JSON.

Usage: check_vtu.py FILE.vtu FILE.json
  FILE.json is the `axicore solve --json` output of the same run.

Reads with vtkXMLUnstructuredGridReader (the `vtk` package from PyPI; only the vtkIOXML,
vtkCommonDataModel and vtkCommonCore modules are imported, none needing a
display). Checks: cell count and type (VTK_QUADRATIC_TRIANGLE or VTK_TRIANGLE), triangles per
region, the point/cell/field array names and components, the unit of every array in the field
data (and that it matches the unit in the array's name), the coordinate meaning, the title and
region names, that every point is used by the cells of one region only and that the distinct
point positions are the mesh nodes, and value ranges against the JSON: J_phi times the winding
section equals N I, M and B/B_sat vanish outside the core, the saturated flag is exactly
B_over_B_sat > threshold, the flux function is 2 pi r A_phi, and |B| probed at the JSON's peak
and centre locations matches max_core_b_T and b_centre_T.
"""
import json
import math
import re
import sys

from vtkmodules.vtkCommonCore import reference, vtkVersion
from vtkmodules.vtkCommonDataModel import VTK_QUADRATIC_TRIANGLE, VTK_TRIANGLE
from vtkmodules.vtkIOXML import vtkXMLUnstructuredGridReader

MU0 = 4e-7 * math.pi
POINT = {"B_T": 3, "B_r_T": 1, "B_z_T": 1, "B_magnitude_T": 1, "H_A_per_m": 3,
         "H_magnitude_A_per_m": 1, "mu_r": 1, "A_phi_Wb_per_m": 1, "flux_function_Wb": 1}
CELL = {"region": 1, "J_phi_A_per_m2": 1, "M_A_per_m": 3, "mu_r": 1, "B_over_B_sat": 1,
        "saturated": 1}
# Unit suffix of an array name -> the unit the field data must state.
SUFFIX_UNIT = [("_A_per_m2", "A/m^2"), ("_Wb_per_m", "Wb/m"), ("_A_per_m", "A/m"),
               ("_Wb", "Wb"), ("_T", "T")]


def fail(msg):
    sys.exit(f"check_vtu: {msg}")


def check(cond, msg):
    if not cond:
        fail(msg)


def rel(a, b):
    return abs(a - b) / max(abs(b), 1e-300)


def strings(fd, name):
    a = fd.GetAbstractArray(name)
    check(a is not None and a.GetClassName() == "vtkStringArray",
          f"field data {name!r} missing or not a string array")
    return [a.GetValue(i) for i in range(a.GetNumberOfValues())]


def numbers(fd, name):
    a = fd.GetArray(name)
    check(a is not None, f"field data {name!r} missing")
    return [a.GetValue(i) for i in range(a.GetNumberOfValues())]


def column(data, name, comps):
    a = data.GetArray(name)
    check(a is not None, f"array {name!r} missing")
    check(a.GetNumberOfComponents() == comps,
          f"{name}: {a.GetNumberOfComponents()} components, expected {comps}")
    if comps == 1:
        return [a.GetValue(i) for i in range(a.GetNumberOfTuples())]
    return [a.GetTuple(i) for i in range(a.GetNumberOfTuples())]


def probe(grid, at, name):
    """The point array `name` interpolated at (r, z) = `at` by the cell's own shape functions."""
    x = [at[0], at[1], 0.0]
    sub, pc, w = reference(0), [0.0] * 3, [0.0] * 6
    cid = grid.FindCell(x, None, -1, 1e-12, sub, pc, w)
    check(cid >= 0, f"no cell holds {at}")
    ids = grid.GetCell(cid).GetPointIds()
    a = grid.GetPointData().GetArray(name)
    return sum(w[k] * a.GetValue(ids.GetId(k)) for k in range(ids.GetNumberOfIds()))


def main():
    path, json_path = sys.argv[1], sys.argv[2]
    rep = json.load(open(json_path))
    reader = vtkXMLUnstructuredGridReader()
    reader.SetFileName(path)
    reader.Update()
    check(reader.GetErrorCode() == 0, f"VTK could not read {path}")
    g = reader.GetOutput()
    nc, npts = g.GetNumberOfCells(), g.GetNumberOfPoints()
    check(nc == rep["triangles"], f"{nc} cells, JSON says {rep['triangles']} triangles")

    # Cell types: one kind, with its node count.
    types = {g.GetCellType(i) for i in range(nc)}
    check(types in ({VTK_QUADRATIC_TRIANGLE}, {VTK_TRIANGLE}), f"cell types {types}")
    per = 6 if types == {VTK_QUADRATIC_TRIANGLE} else 3
    cells = []
    for i in range(nc):
        ids = g.GetCell(i).GetPointIds()
        check(ids.GetNumberOfIds() == per, f"cell {i}: {ids.GetNumberOfIds()} nodes")
        cells.append([ids.GetId(k) for k in range(per)])

    # Field data: title, coordinates, region names, units of every array.
    fd = g.GetFieldData()
    check(strings(fd, "title") == [rep["title"]], "title differs from the JSON")
    coords = strings(fd, "coordinates")[0]
    for words in ("x = r", "y = z", "in m"):
        check(words in coords, f"coordinates text lacks {words!r}: {coords!r}")
    names = strings(fd, "region_names")
    ids = numbers(fd, "region_ids")
    check(ids == list(range(len(names))), f"region_ids {ids} do not index region_names")
    expected = ["air", "core"] + [w["name"] for w in rep["windings"]]
    check(names == expected, f"region names {names}, expected {expected}")
    kinds = strings(fd, "region_kinds")
    check(kinds == ["air", "core"] + ["winding"] * len(rep["windings"]), f"region kinds {kinds}")
    units = {}
    for entry in strings(fd, "array_units"):
        m = re.fullmatch(r"(point|cell) (\S+) \[([^\]]+)\]: .+", entry)
        check(m is not None, f"array_units entry {entry!r} is not 'KIND NAME [UNIT]: meaning'")
        units[(m.group(1), m.group(2))] = m.group(3)
    for kind, table in (("point", POINT), ("cell", CELL)):
        for name in table:
            check((kind, name) in units, f"no unit for {kind} array {name}")
            for suffix, unit in SUFFIX_UNIT:
                if name.endswith(suffix):
                    check(units[(kind, name)] == unit,
                          f"{kind} {name}: unit {units[(kind, name)]}, name says {unit}")
                    break
    threshold = numbers(fd, "saturation_threshold")[0]
    check(0.0 < threshold < 1.0, f"saturation threshold {threshold}")

    pd, cd = g.GetPointData(), g.GetCellData()
    check(sorted(pd.GetArrayName(i) for i in range(pd.GetNumberOfArrays())) == sorted(POINT),
          "point arrays differ from the documented list")
    check(sorted(cd.GetArrayName(i) for i in range(cd.GetNumberOfArrays())) == sorted(CELL),
          "cell arrays differ from the documented list")
    p = {name: column(pd, name, k) for name, k in POINT.items()}
    c = {name: column(cd, name, k) for name, k in CELL.items()}

    # Regions: ids, triangles per region as in the JSON.
    region = [int(x) for x in c["region"]]
    nw = len(rep["windings"])
    counts = [region.count(t) for t in range(2 + nw)]
    mesh = rep["mesh"]
    check(counts[0] == mesh["triangles_air"] and counts[1] == mesh["triangles_core"]
          and counts[2:] == mesh["triangles_windings"],
          f"triangles per region {counts} differ from the JSON {mesh}")
    check(set(region) <= set(range(2 + nw)), f"unknown region ids {set(region)}")

    # Points per region: each point used by one region's cells; distinct positions = nodes.
    owner = [None] * npts
    for cell, t in zip(cells, region):
        for q in cell:
            check(owner[q] in (None, t), f"point {q} is shared by regions {owner[q]} and {t}")
            owner[q] = t
    check(None not in owner, "unused points")
    xy = [g.GetPoint(i) for i in range(npts)]
    check(all(z == 0.0 for _, _, z in xy), "points off the meridian plane z = 0")
    check(min(x for x, _, _ in xy) >= 0.0, "negative radius")
    distinct = len({(x, y) for x, y, _ in xy})
    check(distinct == rep["nodes"], f"{distinct} distinct points, JSON says {rep['nodes']} nodes")

    # Current density: constant per winding, J times the section equals N I.
    for k, w in enumerate(rep["windings"]):
        tag = 2 + k
        js = [j for j, t in zip(c["J_phi_A_per_m2"], region) if t == tag]
        check(max(js) == min(js), f"J not uniform in winding {w['name']}")
        area = 0.0
        for cell, t in zip(cells, region):
            if t == tag:
                (x0, y0, _), (x1, y1, _), (x2, y2, _) = (xy[q] for q in cell[:3])
                area += 0.5 * abs((x1 - x0) * (y2 - y0) - (x2 - x0) * (y1 - y0))
        ni = w["turns"] * w["current_A"]
        check(rel(js[0] * area, ni) < 1e-9, f"J * section = {js[0] * area} A, N I = {ni} A")
    check(all(j == 0.0 for j, t in zip(c["J_phi_A_per_m2"], region) if t < 2),
          "current outside the windings")

    # Magnetization, permeability and saturation by region.
    core = [t == 1 for t in region]
    check(all(m == (0.0, 0.0, 0.0) for m, k in zip(c["M_A_per_m"], core) if not k),
          "M nonzero outside the core")
    check(all(u == 1.0 for u, k in zip(c["mu_r"], core) if not k), "mu_r != 1 outside the core")
    check(all(u >= 1.0 for u in c["mu_r"]), "mu_r below 1")
    ratio, flag = c["B_over_B_sat"], c["saturated"]
    check(all(r == 0.0 for r, k in zip(ratio, core) if not k), "B/B_sat outside the core")
    check(set(flag) <= {0, 1}, "saturated flag not 0/1")
    check(all((f == 1) == (r > threshold) for f, r in zip(flag, ratio)),
          "saturated flag disagrees with B_over_B_sat > threshold")
    jcore = rep.get("core")
    if jcore and jcore.get("saturation_b_T"):
        check(max(r for r, k in zip(ratio, core) if k) > 0.0, "no B/B_sat in a saturable core")
    if jcore and (jcore.get("saturated_fraction") or 0.0) > 0.0:
        check(1 in flag, "the JSON reports a saturated fraction but no cell is flagged")

    # Point data: consistency of the derived arrays.
    for i in range(npts):
        br, bz, bm = p["B_r_T"][i], p["B_z_T"][i], p["B_magnitude_T"][i]
        check(p["B_T"][i] == (br, bz, 0.0), f"B_T at point {i} differs from (B_r, B_z, 0)")
        check(abs(math.hypot(br, bz) - bm) <= 1e-12 * max(bm, 1e-30), f"|B| at point {i}")
        hm = p["H_magnitude_A_per_m"][i]
        if hm > 0.0:
            check(rel(bm / (MU0 * hm), p["mu_r"][i]) < 1e-9, f"mu_r at point {i}")
        f = 2.0 * math.pi * xy[i][0] * p["A_phi_Wb_per_m"][i]
        check(abs(p["flux_function_Wb"][i] - f) <= 1e-12 * max(abs(f), 1e-30),
              f"flux function at point {i} is not 2 pi r A_phi")
    check(all(math.isfinite(v) for v in p["B_magnitude_T"] + p["H_magnitude_A_per_m"]),
          "non-finite field values")
    check(all(u == 1.0 for u, t in zip(p["mu_r"], owner) if t != 1), "point mu_r != 1 in air")

    # Values against the JSON: the recovered |B| probed where the JSON reports it.
    if jcore and jcore.get("max_b_T"):
        peak = probe(g, jcore["max_b_at_m"], "B_magnitude_T")
        check(rel(peak, jcore["max_b_T"]) < 0.02,
              f"|B| at the JSON's peak location {peak} T vs max_core_b_T {jcore['max_b_T']} T")
        core_max = max(b for b, t in zip(p["B_magnitude_T"], owner) if t == 1)
        check(core_max >= 0.98 * jcore["max_b_T"],
              f"largest core |B| {core_max} T below the JSON's peak {jcore['max_b_T']} T")
        centre = probe(g, jcore["b_centre_at_m"], "B_magnitude_T")
        check(rel(centre, jcore["b_centre_T"]) < 0.01,
              f"|B| at the core centre {centre} T vs JSON {jcore['b_centre_T']} T")
        print(f"peak |B| probed {peak:.6g} T vs JSON {jcore['max_b_T']:.6g} T; core centre "
              f"{centre:.6g} T vs JSON {jcore['b_centre_T']:.6g} T; largest point |B| in the "
              f"core {core_max:.6g} T (corners included)")
    print(f"{path}: {nc} {'quadratic ' if per == 6 else ''}triangles, {npts} points "
          f"({distinct} nodes), regions {names}, arrays, units and values agree with "
          f"{json_path} (VTK {vtkVersion.GetVTKVersion()})")


if __name__ == "__main__":
    main()
