#!/usr/bin/env bash
# Slender cores (README, "Performance", "Slender cores"): rods of length/diameter 1, 10, 100,
# 1000 (2 mm diameter, linear μr = 1e4) in a uniform 1 mT field, the same rods in a winding
# over 80 % of their length, and prolate spheroids of axis ratio 10, 100, 1000 (μr = 1e5,
# 1 mT), each solved with `--tolerance TOL` (default 1e-3): unknowns of every level, the
# estimate, wall time and peak memory (GNU time), and for spheroids the true error against
# Osborn, Phys. Rev. 67, 351 (1945), m = V χ H0/(1 + χN). Figures go in the README by hand;
# nothing is asserted. Usage: tools/bench_slender.sh [TOL] [BINARY]
set -euo pipefail
cd "$(dirname "$0")/.."
tol=${1:-1e-3}
bin=${2:-./target/release/axicore}
if [ "$bin" = ./target/release/axicore ]; then
  cargo build --release --quiet -p axicore
fi
dir=$(mktemp -d /tmp/axicore-slender.XXXXXX)
trap 'rm -rf "$dir"' EXIT

write_case() { # name shape gamma mu_r winding(0/1)
  local len
  len=$(python3 -c "print($3 * 2)")
  {
    echo "title = \"slender $2, length/diameter $3\""
    echo "[core]"
    echo "shape = \"$2\""
    echo "length = \"$len mm\""
    echo "diameter = \"2 mm\""
    echo "mu_r = $4"
    if [ "$5" = 1 ]; then
      python3 -c "g = $3; print(f'[[winding]]\nturns = {10 * g}\ncurrent = \"10 mA\"\ninner_radius = \"1.1 mm\"\nouter_radius = \"1.5 mm\"\nlength = \"{1.6 * g} mm\"')"
    else
      printf '[background]\nb_axial = "1 mT"\n'
    fi
  } > "$dir/$1.toml"
}

run() { # name gamma kind
  local status=0
  /usr/bin/time -v "$bin" solve "$dir/$1.toml" --tolerance "$tol" --json > "$dir/out.json" 2> "$dir/time.txt" || status=$?
  python3 - "$1" "$2" "$3" "$dir" "$status" <<'EOF'
import json, math, re, sys
name, gamma, kind, d, status = sys.argv[1], float(sys.argv[2]), sys.argv[3], sys.argv[4], sys.argv[5]
out = json.load(open(f"{d}/out.json"))
t = open(f"{d}/time.txt").read()
wall = re.search(r"Elapsed \(wall clock\) time.*: (\S+)", t).group(1)
rss = int(re.search(r"Maximum resident set size \(kbytes\): (\d+)", t).group(1)) / 1024
h = out["convergence_history"]
m = h[-1]["dipole_moment_Am2"]
est = h[-1]["estimated_relative_error"]
true = ""
if kind == "spheroid":
    # Osborn (1945): N of a prolate spheroid of axis ratio gamma; chi = 1e5 - 1.
    s = math.sqrt(gamma * gamma - 1)
    n = (gamma / s * math.log(gamma + s) - 1) / (gamma * gamma - 1)
    a, b, chi = 1e-3, gamma * 1e-3, 1e5 - 1
    exact = 4 / 3 * math.pi * a * a * b * chi * (1e-3 / (4e-7 * math.pi)) / (1 + chi * n)
    true = f" true {(m - exact) / exact:+.1e}"
levels = ", ".join(str(x["unknowns"]) for x in h)
print(f"{name:14s} L/D {gamma:6g}  unknowns {levels:32s} estimate {est if est is None else f'{est:.1e}'}{true}  wall {wall}  peak {rss:.0f} MB  moment {m:.9e}  exit {status}")
EOF
}

for g in 1 10 100 1000; do
  write_case "rod$g" rod "$g" 10000 0
  run "rod$g" "$g" rod
done
for g in 1 10 100 1000; do
  write_case "wound-rod$g" rod "$g" 10000 1
  run "wound-rod$g" "$g" rod
done
for g in 10 100 1000; do
  write_case "spheroid$g" spheroid "$g" 100000 0
  run "spheroid$g" "$g" spheroid
done
