#!/usr/bin/env bash
# Regenerates the demagnetization study shown in the README: 30 L/D values from 0.1 to 1000 ×
# χ = 0 and 29 values from 1 to 1e6, solid rods, each point refined to an estimated 1e-3.
# About 3.5 minutes on 2 cores (release build). Writes study.csv, study.json and the SVG plots here.
set -euo pipefail
cd "$(dirname "$0")/../.."
# Paths relative to the repository, so the summary names no machine path.
here=cases/demag-study
cargo build --release --quiet -p axicore
bin=target/release/axicore
"$bin" demag --quiet --gamma 0.1..1000:30:log --chi 0,1..1e6:29:log --tolerance 1e-3 --jobs 2 \
    --out "$here/study.csv" > "$here/summary.txt"
"$bin" demag --from "$here/study.csv" --json "$here/study.json" --plots "$here" \
    --plot-chi 0,1000,1000000 > /dev/null
