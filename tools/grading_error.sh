#!/usr/bin/env bash
# Corner grading (README, "Corner grading"): the built-in example's dipole moment against
# unknowns at a few finenesses, with the corners' usual refinement (mesh.corner_layers = 0)
# and with geometric grading toward every singular point (corner_layers = LAYERS…), at the
# default second order. The error of each run is taken against REFERENCE, the Richardson
# extrapolation of the two finest graded runs (assumed order h^(4/3) in the element size,
# i.e. N^(-2/3) in unknowns, the sharp-corner rate of the README; stated beside the table),
# and the finest plain run's distance to it is printed as a cross-check. Nothing is asserted;
# the figures go into the README by hand. Usage: tools/grading_error.sh [BINARY]
set -euo pipefail
cd "$(dirname "$0")/.."
bin=${1:-./target/release/axicore}
if [ "$bin" = ./target/release/axicore ]; then
  cargo build --release --quiet -p axicore
fi
dir=$(mktemp -d /tmp/axicore-grading.XXXXXX)
trap 'rm -rf "$dir"' EXIT
finenesses=${FINENESSES:-"0.5 0.7 1 1.4 2 2.8 4"}
layers=${LAYERS:-"0 2 4 6"}
: > "$dir/runs.txt"
for n in $layers; do
  for f in $finenesses; do
    "$bin" example | sed "s/^fineness = .*/fineness = $f\ncorner_layers = $n/" > "$dir/case.toml"
    "$bin" solve "$dir/case.toml" --json > "$dir/out.json"
    python3 -c "import json,sys; r=json.load(open('$dir/out.json')); print($n, $f, r['unknowns'], repr(r['dipole_moment_Am2']), r['mesh']['smallest_angle_deg'])" >> "$dir/runs.txt"
  done
done
python3 - "$dir/runs.txt" <<'PY'
import sys
runs = [l.split() for l in open(sys.argv[1])]
runs = [(int(n), float(f), int(u), float(m), float(a)) for n, f, u, m, a in runs]
deepest = max(r[0] for r in runs)
g = sorted([r for r in runs if r[0] == deepest], key=lambda r: r[2])
(_, _, n1, m1, _), (_, _, n2, m2, _) = g[-2], g[-1]
# Richardson in N with error ~ N^(-2/3).
q = (n2 / n1) ** (2 / 3)
ref = m2 + (m2 - m1) / (q - 1)
print(f"reference {ref:.10e} A·m² (Richardson of corner_layers {deepest} at {n1} and {n2} unknowns, error ~ N^(-2/3))")
print(f"{'layers':>6} {'fineness':>8} {'unknowns':>9} {'dipole/A·m²':>17} {'rel. error':>11} {'min angle':>9}")
for n, f, u, m, a in runs:
    print(f"{n:6d} {f:8g} {u:9d} {m:17.10e} {(m - ref) / ref:+11.2e} {a:9.1f}")
PY
