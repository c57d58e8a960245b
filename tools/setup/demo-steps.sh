#!/usr/bin/env bash
# The demo proper, given the built program (run-demo does the set-up first). Re-run it alone:
#   tools/setup/demo-steps.sh build/release/tools/liveprob [OUTPUT-DIR]
# 1. writes the invented league's season and cup as recorded streams;
# 2. starts `serve` on loopback (ephemeral ports, with a journal), replays the first round's
#    matches into it over real sockets at high speed, and shows what a subscriber (`tap`)
#    received;
# 3. backtests the whole season in process and prints where the report is.
set -euo pipefail
LIVEPROB=${1:?usage: demo-steps.sh PATH-TO-liveprob [OUTPUT-DIR]}
out=${2:-build/demo}
rm -rf "$out"; mkdir -p "$out"

echo "== liveprob demo ($("$LIVEPROB" --version)): every figure is a model estimate, not advice"
"$LIVEPROB" simulate --out "$out/streams" --seed 2031

echo "== live: serve + send + tap over loopback"
"$LIVEPROB" serve --ingest 'tcp://127.0.0.1:*' --publish 'tcp://127.0.0.1:*' \
  --snapshot 'tcp://127.0.0.1:*' --endpoints-file "$out/endpoints" \
  --journal "$out/journal.lpj" --tick-ms 1000 --log-level warn &
serve_pid=$!
trap 'kill "$serve_pid" 2>/dev/null || true' EXIT
for _ in $(seq 100); do [ -s "$out/endpoints" ] && break; sleep 0.1; done
ingest=$(sed -n 's/^ingest=//p' "$out/endpoints")
publish=$(sed -n 's/^publish=//p' "$out/endpoints")
snapshot=$(sed -n 's/^snapshot=//p' "$out/endpoints")

"$LIVEPROB" tap --from "$publish" --events-only --format table --timeout-ms 3000 > "$out/tap.txt" 2>"$out/tap.err" &
tap_pid=$!
sleep 0.5  # let the subscription reach serve before the first message
first_round=$(ls "$out/streams/league" | head -n 10)
for f in $first_round; do
  "$LIVEPROB" send --to "$ingest" --rate 5000 --stamp "$out/streams/league/$f" >/dev/null
done
wait "$tap_pid" || true  # tap stops once the feed has been quiet for 3 s
echo "tap received $(grep -c . "$out/tap.txt") lines; the last few:"
tail -n 8 "$out/tap.txt"
last_match=$(tail -n 1 "$out/tap.txt" | awk '{print $1}')
echo "== late joiner: the snapshot socket's latest state of match $last_match"
"$LIVEPROB" tap --from "$publish" --snapshot "$snapshot" --snapshot-only --match "$last_match" --format table || true
kill "$serve_pid"; wait "$serve_pid" 2>/dev/null || true
trap - EXIT

echo "== backtest: the whole season and cup through the same engine, in process"
"$LIVEPROB" replay "$out/streams" --report "$out/report" --quiet
echo "demo report: $out/report/index.html (and report.json beside it)"
