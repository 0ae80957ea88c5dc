#!/usr/bin/env bash
# Side by side on the torquer case of issue 13: axicore's hp route (`moment --tolerance`, 1e-3 … 1e-8)
# and its second-order `solve --tolerance` (1e-3 … 1e-5) against NGSolve (a general-purpose
# finite-element library) with hp elements and geometric corner grading.
# Not part of CI: it takes minutes. Usage: tools/compare/run.sh [--quick] [--runs N] [--solve-targets LIST]
# NGSolve and numpy go into a private virtual environment under target/ (pinned versions, from PyPI);
# the release binary is built here; the table is printed and written to target/compare/side-by-side.csv.
set -euo pipefail
cd "$(dirname "$0")/../.."
venv=target/compare-venv
if [ ! -x "$venv/bin/python" ]; then
  mkdir -p target
  python3 -m venv "$venv"
fi
"$venv/bin/pip" install --quiet --disable-pip-version-check ngsolve==6.2.2608 numpy==2.4.6
cargo build --release --quiet -p axicore
exec "$venv/bin/python" tools/compare/side_by_side.py \
  --axicore target/release/axicore \
  --hp-case tools/compare/torquer-hp.toml --case tools/compare/torquer.toml \
  --csv target/compare/side-by-side.csv "$@"
