#!/usr/bin/env bash
# Corner grading (README, "Corner grading"): the built-in example's dipole moment against
# unknowns at a few finenesses, with the corners' usual refinement (mesh.corner_layers = 0)
# and with geometric grading toward every singular point (corner_layers = LAYERS…), at the
# default second order. The error of each run is taken against a reference: per series (no
# grading, deepest grading) the three runs at REF_FINENESSES (default 4 5.6 8, up to 0.8M
# unknowns and 2.3 GB) are extrapolated with Richardson's rule at the rate they show
# (successive differences taken as a geometric series), and the reference is the mean of the
# two extrapolations, with half their difference printed as its uncertainty. Nothing is
# asserted; the figures go into the README by hand. Usage: tools/grading_error.sh [BINARY]
set -euo pipefail
cd "$(dirname "$0")/.."
bin=${1:-./target/release/axicore}
if [ "$bin" = ./target/release/axicore ]; then
  cargo build --release --quiet -p axicore
fi
dir=$(mktemp -d /tmp/axicore-grading.XXXXXX)
trap 'rm -rf "$dir"' EXIT
finenesses=${FINENESSES:-"0.5 0.7 1 1.4 2 2.8"}
layers=${LAYERS:-"0 2 4 6"}
reference=${REF_FINENESSES:-"4 5.6 8"}
deepest=$(echo "$layers" | tr ' ' '\n' | sort -n | tail -1)
solve() { # layers fineness file
  "$bin" example | sed "s/^fineness = .*/fineness = $2\ncorner_layers = $1/" > "$dir/case.toml"
  "$bin" solve "$dir/case.toml" --json > "$dir/out.json"
  python3 -c "import json; r=json.load(open('$dir/out.json')); print($1, $2, r['unknowns'], repr(r['dipole_moment_Am2']), r['mesh']['smallest_angle_deg'])" >> "$3"
}
: > "$dir/runs.txt"
: > "$dir/ref.txt"
for n in $layers; do
  for f in $finenesses; do solve "$n" "$f" "$dir/runs.txt"; done
done
for n in 0 "$deepest"; do
  for f in $reference; do solve "$n" "$f" "$dir/ref.txt"; done
done
python3 - "$dir/runs.txt" "$dir/ref.txt" <<'PY'
import sys
read = lambda p: [(int(n), float(f), int(u), float(m), float(a)) for n, f, u, m, a in (l.split() for l in open(p))]
runs, refs = read(sys.argv[1]), read(sys.argv[2])
limits = []
for n in sorted({r[0] for r in refs}):
    s = sorted([r for r in refs if r[0] == n], key=lambda r: r[2])
    (m1, m2, m3) = (s[-3][3], s[-2][3], s[-1][3])
    ratio = (m2 - m1) / (m3 - m2)
    limit = m3 + (m3 - m2) / (ratio - 1)
    limits.append(limit)
    print(f"corner_layers {n}: " + ", ".join(f"{u} unknowns {m:.10e}" for _, _, u, m, _ in s[-3:])
          + f"; differences shrink {ratio:.2f}x per step; extrapolated {limit:.10e}")
ref = sum(limits) / len(limits)
spread = abs(limits[0] - limits[-1]) / 2 / abs(ref)
print(f"reference {ref:.10e} A·m² ± {spread:.1e} (relative)")
print(f"{'layers':>6} {'fineness':>8} {'unknowns':>9} {'dipole/A·m²':>17} {'rel. error':>11} {'min angle':>9}")
for n, f, u, m, a in runs + refs:
    print(f"{n:6d} {f:8g} {u:9d} {m:17.10e} {(m - ref) / ref:+11.2e} {a:9.1f}")
PY
