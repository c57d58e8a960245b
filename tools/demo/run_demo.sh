#!/usr/bin/env bash
# The demo's replay part: writes the invented league's season and cup as recorded streams,
# replays them all through the engine in process and prints where the report is.
# Usage: tools/demo/run_demo.sh LIVEPROB_BINARY OUTPUT_DIR
# (The live part over sockets against `serve` is not here yet.)
set -euo pipefail
bin=${1:?usage: run_demo.sh LIVEPROB_BINARY OUTPUT_DIR}
out=${2:?usage: run_demo.sh LIVEPROB_BINARY OUTPUT_DIR}
mkdir -p "$out"
"$bin" simulate --out "$out/streams" --seed 2031
"$bin" replay "$out/streams" --report "$out/report"
echo "demo report: $out/report/index.html"
