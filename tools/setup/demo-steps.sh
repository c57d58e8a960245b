#!/usr/bin/env bash
# The demo proper, given the built program (run-demo does the set-up first). Re-run it alone:
#   tools/setup/demo-steps.sh build/release/tools/liveprob [OUTPUT-DIR]
# 1. writes the invented league's season and cup as recorded streams;
# 2. starts `serve` on loopback (ephemeral ports, with a journal) and replays a slice of the
#    season (its first round: ten matches played at once) into it over real sockets at 2000x
#    real time with `replay --live`, which scores what its subscriber received; `tap` shows what
#    another subscriber saw, and a late joiner asks the snapshot socket;
# 3. backtests the whole season in process and prints where the reports are.
set -euo pipefail
LIVEPROB=${1:?usage: demo-steps.sh PATH-TO-liveprob [OUTPUT-DIR]}
out=${2:-build/demo}
rm -rf "$out"; mkdir -p "$out"

echo "== liveprob demo ($("$LIVEPROB" --version)): every figure is a model estimate, not advice"
"$LIVEPROB" simulate --out "$out/streams" --seed 2031

echo "== live: serve on loopback; the first round replayed into it over real sockets at 2000x real time"
"$LIVEPROB" serve --ingest 'tcp://127.0.0.1:*' --publish 'tcp://127.0.0.1:*' \
  --snapshot 'tcp://127.0.0.1:*' --endpoints-file "$out/endpoints" \
  --journal "$out/journal.lpj" --tick-ms 1000 --log-level warn &
serve_pid=$!
trap 'kill "$serve_pid" 2>/dev/null || true' EXIT
for _ in $(seq 100); do [ -s "$out/endpoints" ] && break; sleep 0.1; done
publish=$(sed -n 's/^publish=//p' "$out/endpoints")
snapshot=$(sed -n 's/^snapshot=//p' "$out/endpoints")

"$LIVEPROB" tap --from "$publish" --events-only --format table --timeout-ms 3000 > "$out/tap.txt" 2>"$out/tap.err" &
tap_pid=$!
sleep 0.5  # let tap's subscription reach serve before the first message
league=("$out"/streams/league/*)  # in fixture order: the first ten are the first round
"$LIVEPROB" replay "${league[@]:0:10}" --live --endpoints "$out/endpoints" --speed 2000 --report "$out/live-report"
wait "$tap_pid" || true  # tap stops once the feed has been quiet for 3 s
echo "tap, another subscriber, received $(grep -c . "$out/tap.txt") lines; the last few:"
tail -n 8 "$out/tap.txt"
last_match=$(tail -n 1 "$out/tap.txt" | awk '{print $1}')
echo "== late joiner: the snapshot socket's latest state of match $last_match"
"$LIVEPROB" tap --from "$publish" --snapshot "$snapshot" --snapshot-only --match "$last_match" --format table || true
kill "$serve_pid"; wait "$serve_pid" 2>/dev/null || true
trap - EXIT

echo "== backtest: the whole season and cup through the same engine, in process"
"$LIVEPROB" replay "$out/streams" --report "$out/report"
echo "demo report: $out/report/index.html (and report.json beside it)"
echo "live slice:  $out/live-report/index.html (what a subscriber received from serve)"
