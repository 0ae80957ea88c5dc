#!/usr/bin/env bash
# Regenerates cases/*/baseline.json from the current program (release build). Run it only after
# a deliberate change of the numerics, and say why in the commit: the regression test
# (tests/reference_cases.rs) compares every run against these files.
set -euo pipefail
cd "$(dirname "$0")/.."
cargo build --release --quiet -p axicore
for case in cases/*/case.toml; do
  dir=$(dirname "$case")
  ./target/release/axicore solve "$case" --json | python3 -c '
import json, sys
d = json.load(sys.stdin)
keys = ["nodes", "triangles", "dipole_moment_Am2", "core_dipole_moment_Am2",
        "winding_dipole_moment_Am2", "dipole_check_Am2", "moment_gain", "b_origin_T",
        "inductance_H", "energy_J", "max_core_b_T", "newton_iterations"]
print(json.dumps({k: d[k] for k in keys}, indent=2))
' > "$dir/baseline.json.tmp"
  mv "$dir/baseline.json.tmp" "$dir/baseline.json"
  echo "$dir/baseline.json"
done
