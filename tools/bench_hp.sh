#!/usr/bin/env bash
# Benchmark of the hierarchical-element (hp) route, release build; figures go in the README by
# hand, nothing is asserted.
# 1. One linear solve of about a million unknowns (before condensation) on the torquer case of
#    tools/compare/torquer-hp.toml, at several (fineness, degree) pairs: stage times from the
#    example tools/examples/bench_hp.rs, peak resident memory from GNU time (%M).
# 2. `axicore moment` on the same case at --tolerance 1e-3, 1e-6, 1e-8, and on the built-in
#    (saturating) example at 1e-6: whole process, best of N runs (default 3).
set -euo pipefail
cd "$(dirname "$0")/.."
runs=${1:-3}
case=tools/compare/torquer-hp.toml
cargo build --release --quiet -p axicore --bin axicore --example bench_hp
echo "load: $(uptime)"
echo "nproc: $(nproc)"

# FINENESS DEGREE pairs near 1M unknowns (LAYERS 9, as `moment --tolerance 1e-8` grades).
for pair in "4 4" "2 8" "1 16"; do
  set -- $pair
  /usr/bin/time -f "  peak resident %M kB, whole process %e s" \
    ./target/release/examples/bench_hp "$case" "$1" "$2" 9 2>&1
done

best_of() {
  local best=999
  for _ in $(seq "$runs"); do
    local start end t
    start=$(date +%s.%N)
    "$@" > /tmp/axicore-bench-hp.out 2>/dev/null || true
    end=$(date +%s.%N)
    t=$(python3 -c "print($end - $start)")
    if python3 -c "import sys; sys.exit(0 if $t < $best else 1)"; then best=$t; fi
  done
  printf '%.3f' "$best"
}
for tol in 1e-3 1e-6 1e-8; do
  t=$(best_of ./target/release/axicore moment "$case" --tolerance "$tol")
  echo "moment $case --tolerance $tol: best of $runs $t s"
  grep -E '^ +[0-9]+ |^dipole moment' /tmp/axicore-bench-hp.out | sed 's/^/  /'
done
t=$(best_of ./target/release/axicore moment --tolerance 1e-6)
echo "moment (built-in example, saturating) --tolerance 1e-6: best of $runs $t s"
grep -E '^ +[0-9]+ |^dipole moment' /tmp/axicore-bench-hp.out | sed 's/^/  /'
echo "load: $(uptime)"
