#!/usr/bin/env bash
# Benchmark of the built-in example (release build): mesh + solve + post, best of N runs,
# with nodes, triangles and the dipole. Figures go in the README by hand; nothing is asserted.
set -euo pipefail
cd "$(dirname "$0")/.."
cargo build --release --quiet -p axicore
runs=${1:-5}
for f in 0.5 1 2 order1; do
  if [ "$f" = order1 ]; then
    sed "s/^order = 2.*/order = 1/" cases/torquer-rod/case.toml > /tmp/axicore-bench.toml
  else
    sed "s/fineness = 1.0/fineness = $f/" cases/torquer-rod/case.toml > /tmp/axicore-bench.toml
  fi
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

# Saturation: the same mesh (fineness 1) with the core as a linear μr = 50000, with the
# built-in saturating law at the example's 40 mA, and deep in saturation (68 A, about 100× the
# knee current). Total run time (mesh + solve + post) and the solve stage alone.
sat() {
  local case=$1
  best=999
  for _ in $(seq "$runs"); do
    t=$(./target/release/axicore solve "$case" --json --timings |
        python3 -c "import json,sys; d=json.load(sys.stdin); t=d['timings_s']; print(sum(t.values()), t['assemble_factor'] + t['solve'], d['newton_iterations'], d['dipole_moment_Am2'])")
    set -- $t
    if python3 -c "import sys; sys.exit(0 if $1 < $best else 1)"; then best=$1; line="$t"; fi
  done
  echo "$line"
}
sed 's/^material = .*/mu_r = 50000/' cases/torquer-rod/case.toml > /tmp/axicore-bench-lin.toml
sed 's/current = "40 mA"/current = "68 A"/' cases/torquer-rod/case.toml > /tmp/axicore-bench-deep.toml
for c in /tmp/axicore-bench-lin.toml cases/torquer-rod/case.toml /tmp/axicore-bench-deep.toml; do
  set -- $(sat "$c")
  printf '%-40s total %.3f s, assemble+factor+solve %.3f s, Newton iterations %s, dipole %.6e A·m²\n' "$c" "$1" "$2" "$3" "$4"
done

# Error control: the example to an estimated 1e-3 and 1e-4 relative dipole error (uniform
# refinement, mesh generation included), wall time of the whole command, best of N runs.
for tol in 1e-3 1e-4; do
  best=999
  for _ in $(seq "$runs"); do
    start=$(date +%s.%N)
    out=$(./target/release/axicore solve --tolerance "$tol" --json)
    end=$(date +%s.%N)
    t=$(python3 -c "print($end - $start)")
    if python3 -c "import sys; sys.exit(0 if $t < $best else 1)"; then best=$t; keep=$out; fi
  done
  echo "$keep" | python3 -c "
import json, sys
d = json.load(sys.stdin)
h = d['convergence_history']
print('tolerance $tol: %.3f s wall, %d levels, unknowns %s, estimate %.2e, dipole %.7e A·m²' % (
    $best, len(h), [l['unknowns'] for l in h], d['estimated_relative_error'], d['dipole_moment_Am2']))"
done
