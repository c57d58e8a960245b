#!/bin/sh
# What acknowledgements cost: the same recorded feed (the demo league's season, ~tens of
# thousands of messages) sent to a fresh `liveprob serve` with a journal, acknowledged (send
# waits until serve has journaled and fsynced every message) and with --no-ack (timed until the
# journal holds the same bytes the acknowledged run left, i.e. every message written; nothing
# is then known to be fsynced). Alternating rounds in one run; prints messages/s per round and
# the medians.
#   tools/bench/ack_cost.sh BUILD_DIR [ROUNDS] [SYNC]     SYNC: interval (default), none, every_message
set -eu
build=${1:?usage: ack_cost.sh BUILD_DIR [ROUNDS] [SYNC]}
rounds=${2:-5}
sync=${3:-interval}
bin="$build/tools/liveprob"
work=$(mktemp -d /tmp/liveprob-ack-cost-XXXXXX)
trap 'kill $serve_pid 2>/dev/null || true; rm -rf "$work"' EXIT
serve_pid=

"$bin" simulate --out "$work/streams" >/dev/null
cat "$work"/streams/*/*.stream >"$work/feed.frames"
now() { date +%s.%N; }
journal_bytes() { cat "$1"/segment-*.lpj 2>/dev/null | wc -c; }

start_serve() {
    rm -rf "$work/journal" "$work/endpoints"
    "$bin" serve --ingest 'tcp://127.0.0.1:*' --publish 'tcp://127.0.0.1:*' \
        --snapshot 'tcp://127.0.0.1:*' --endpoints-file "$work/endpoints" \
        --journal "$work/journal" --journal-sync "$sync" --tick-ms 600000 \
        --log-level warn >"$work/serve.log" 2>&1 &
    serve_pid=$!
    while [ ! -s "$work/endpoints" ]; do sleep 0.05; done
    ingest=$(sed -n 's/^ingest=//p' "$work/endpoints")
}
stop_serve() { kill -TERM "$serve_pid"; wait "$serve_pid" || true; serve_pid=; }

ack_rates=; plain_rates=
for round in $(seq 1 "$rounds"); do
    start_serve
    t0=$(now)
    out=$("$bin" send --to "$ingest" "$work/feed.frames")
    t1=$(now)
    count=$(echo "$out" | sed -n 's/^sent \([0-9]*\) messages.*/\1/p')
    target=$(journal_bytes "$work/journal")
    stop_serve
    ack=$(echo "$count $t0 $t1" | awk '{printf "%.0f", $1 / ($3 - $2)}')

    start_serve
    t0=$(now)
    "$bin" send --no-ack --to "$ingest" "$work/feed.frames" >/dev/null
    while [ "$(journal_bytes "$work/journal")" -lt "$target" ]; do sleep 0.005; done
    t1=$(now)
    stop_serve
    plain=$(echo "$count $t0 $t1" | awk '{printf "%.0f", $1 / ($3 - $2)}')
    echo "round $round: $count messages, acknowledged $ack msg/s, --no-ack $plain msg/s"
    ack_rates="$ack_rates $ack"; plain_rates="$plain_rates $plain"
done
median() { echo "$@" | tr ' ' '\n' | sed '/^$/d' | sort -n | awk '{a[NR]=$1} END {print a[int((NR+1)/2)]}'; }
echo "median ($sync sync): acknowledged $(median $ack_rates) msg/s, --no-ack $(median $plain_rates) msg/s"
