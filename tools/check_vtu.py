#!/usr/bin/env python3
"""Reads an axicore .vtu back with a general-purpose reader (meshio) and checks it.

Usage: check_vtu.py FILE.vtu EXPECTED_TRIANGLES
Checks: cell count and type (3-node or 6-node triangles), region ids present (0 air, 1 core, >= 2 windings), the point and
cell array names, and that the arrays hold finite values in physically sensible ranges.
"""
import math
import sys

import meshio

path, expected = sys.argv[1], int(sys.argv[2])
m = meshio.read(path)
# Second-order meshes (the default) are written as 6-node quadratic triangles.
tri = [c for c in m.cells if c.type in ("triangle", "triangle6")]
assert len(tri) == 1, f"expected one triangle block, got {[c.type for c in m.cells]}"
if tri[0].type == "triangle6":
    assert tri[0].data.shape[1] == 6, "quadratic triangles need 6 nodes"
n = len(tri[0].data)
assert n == expected, f"{n} triangles, expected {expected}"
for name in ("A_phi_Wb_per_m", "flux_Wb"):
    assert name in m.point_data, f"point array {name} missing: {list(m.point_data)}"
cells = {k: v[0] for k, v in m.cell_data.items()}
for name in ("region", "B_T", "B_magnitude_T", "H_A_per_m", "H_magnitude_A_per_m", "mu_r",
             "B_over_B_sat", "saturated"):
    assert name in cells, f"cell array {name} missing: {list(cells)}"
regions = set(int(x) for x in cells["region"])
assert {0, 1, 2} <= regions, f"region ids {sorted(regions)}"
for name, arr in list(cells.items()) + list(m.point_data.items()):
    flat = arr.ravel()
    assert all(math.isfinite(float(x)) for x in flat), f"{name} has non-finite values"
assert min(cells["mu_r"]) >= 1.0 - 1e-12, "mu_r below 1"
assert min(cells["B_magnitude_T"]) >= 0.0
assert 0.0 < max(cells["B_magnitude_T"]) < 10.0, "implausible |B| range"
# The example core saturates (knee law): |B|/B_sat only there, flags 0 or 1 and set only
# where |B|/B_sat exceeds 0.9.
ratio, flag = cells["B_over_B_sat"].ravel(), cells["saturated"].ravel()
core = cells["region"].ravel() == 1
assert min(ratio) >= 0.0 and max(ratio[~core], default=0.0) == 0.0, "B/B_sat outside the core"
assert 0.0 < max(ratio[core]) < 5.0, "implausible B/B_sat in the core"
assert set(float(x) for x in flag) <= {0.0, 1.0}, "saturated flag not 0/1"
assert all((f == 1.0) == (r > 0.9) for f, r in zip(flag, ratio)), "flag disagrees with B/B_sat"
print(f"{path}: {n} triangles, regions {sorted(regions)}, arrays ok (meshio {meshio.__version__})")
