#!/usr/bin/env bash
# Benchmark of the built-in example (release build): mesh + solve + post, best of N runs,
# with nodes, triangles and the dipole. Figures go in the README by hand; nothing is asserted.
set -euo pipefail
cd "$(dirname "$0")/.."
cargo build --release --quiet -p axicore
runs=${1:-5}
for f in 0.5 1 2; do
  sed "s/fineness = 1.0/fineness = $f/" cases/torquer-rod/case.toml > /tmp/axicore-bench.toml
  best=999
  for _ in $(seq "$runs"); do
    t=$(./target/release/axicore solve /tmp/axicore-bench.toml --json --timings |
        python3 -c "import json,sys; d=json.load(sys.stdin); t=d['timings_s']; print(sum(t.values()), d['nodes'], d['triangles'], d['dipole_moment_Am2'], t['mesh'], t['assemble_factor'], t['solve'], t['post'])")
    set -- $t
    if python3 -c "import sys; sys.exit(0 if $1 < $best else 1)"; then best=$1; line="$t"; fi
  done
  set -- $line
  printf 'fineness %-4s nodes %-7s triangles %-7s dipole %.6e A·m²  total %.3f s (mesh %.3f, assemble+factor %.3f, solve %.3f, post %.3f)\n' "$f" "$2" "$3" "$4" "$1" "$5" "$6" "$7" "$8"
done
