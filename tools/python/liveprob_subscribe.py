#!/usr/bin/python3
"""Follow liveprob's probability feed from Python.

Subscribes to the publish socket of `liveprob serve` (or `liveprob relay`), asks the snapshot
socket for the latest state first (so a late joiner starts with a full picture), and prints one
JSON line per update. It counts gaps in each match's update sequence (every update carries the
whole state, so the next one repairs a gap) and skips duplicates and stale entries. Needs Debian's python3-zmq and python3-flatbuffers, and the Python modules that
flatc generates from protocol/schemas during the build (<build>/python).

    /usr/bin/python3 tools/python/liveprob_subscribe.py \
        --modules build/release/python \
        --feed tcp://127.0.0.1:7431 --snapshot tcp://127.0.0.1:7432 --match 7 --count 10

The protocol (endpoints, topics, tables, sequence numbers): protocol/README.md.
"""
import argparse
import json
import struct
import sys
import time

import zmq

SCHEMA_MAJOR = 1
TOPIC_PREFIX = b"match."          # then the match id as 20 zero-padded digits
MAX_UPDATE_BYTES = 16 * 1024      # as the C++ decoder: larger is not an update
STATUS = ["not_started", "in_play", "interval", "shootout", "finished", "abandoned"]
PERIOD = ["pre_match", "first_half", "second_half", "extra_first", "extra_second",
          "shootout", "finished"]


def topic_of(match_id):
    return TOPIC_PREFIX + b"%020d" % match_id


class Rejected(Exception):
    """A buffer that is not a usable update."""


def fields_of(u):
    """The fields this client prints, from one Update table."""
    clock = u.Clock()
    return {
        "match_id": u.MatchId(), "update_seq": u.OutputSeq(), "feed_seq": u.InputSeq(),
        "status": STATUS[u.Status()], "period": PERIOD[clock.Period()],
        "clock_ms": clock.ClockMs(), "score": [u.HomeGoals(), u.AwayGoals()],
        "red_cards": [u.HomeReds(), u.AwayReds()],
        "p_home": u.PHome(), "p_draw": u.PDraw(), "p_away": u.PAway(),
        "publish_time_us": u.PublishTimeUs(),
    }


def read_update(wire, buf):
    """The fields of one Update buffer as a dict. Python's flatbuffers has no verifier, so we
    check what we can (size, identifier, schema version, value ranges) and treat any failure
    while reading as a damaged buffer."""
    if len(buf) < 8 or len(buf) > MAX_UPDATE_BYTES:
        raise Rejected("size %d" % len(buf))
    if not wire.Update.Update.UpdateBufferHasIdentifier(buf, 0):
        raise Rejected("not an update (identifier)")
    try:
        u = wire.Update.Update.GetRootAs(buf, 0)
        if u.SchemaMajor() != SCHEMA_MAJOR:
            raise Rejected("schema major %d" % u.SchemaMajor())
        fields = fields_of(u)
    except (IndexError, ValueError, TypeError, AttributeError, struct.error) as error:
        raise Rejected("damaged: %s" % error) from error
    for name in ("p_home", "p_draw", "p_away"):
        if not 0.0 <= fields[name] <= 1.0 + 1e-9:
            raise Rejected("%s out of range" % name)
    return fields


def snapshot_request(wire, match_id):
    import flatbuffers
    builder = flatbuffers.Builder(64)
    wire.SnapshotRequest.Start(builder)
    wire.SnapshotRequest.AddSchemaMajor(builder, SCHEMA_MAJOR)
    wire.SnapshotRequest.AddSchemaMinor(builder, 0)
    wire.SnapshotRequest.AddMatchId(builder, match_id)
    builder.Finish(wire.SnapshotRequest.End(builder), file_identifier=b"LPQ1")
    return bytes(builder.Output())


def ask_snapshot(wire, context, endpoint, match_id, timeout_ms):
    """Latest updates from the snapshot socket (match_id 0: every live match)."""
    socket = context.socket(zmq.REQ)
    socket.setsockopt(zmq.LINGER, 0)
    socket.connect(endpoint)
    try:
        socket.send(snapshot_request(wire, match_id))
        if not socket.poll(timeout_ms):
            raise RuntimeError("no snapshot reply from %s" % endpoint)
        buf = socket.recv()
    finally:
        socket.close()
    if not wire.SnapshotReply.SnapshotReply.SnapshotReplyBufferHasIdentifier(buf, 0):
        raise RuntimeError("snapshot reply has the wrong identifier")
    reply = wire.SnapshotReply.SnapshotReply.GetRootAs(buf, 0)
    if reply.Error():
        raise RuntimeError("snapshot: %s" % reply.Error().decode())
    return [fields_of(reply.Updates(i)) for i in range(reply.UpdatesLength())]


def main():
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--modules", required=True, help="folder of the flatc-generated Python")
    parser.add_argument("--feed", required=True, help="publish endpoint of serve or relay")
    parser.add_argument("--snapshot", help="snapshot endpoint (start from the latest state)")
    parser.add_argument("--match", type=int, action="append", default=[],
                        help="match id to follow (repeatable; default every match)")
    parser.add_argument("--count", type=int, default=0, help="stop after this many updates")
    parser.add_argument("--seconds", type=float, default=0, help="stop after this long")
    args = parser.parse_args()

    sys.path.insert(0, args.modules)
    import liveprob.wire.SnapshotReply
    import liveprob.wire.SnapshotRequest
    import liveprob.wire.Update
    wire = liveprob.wire

    context = zmq.Context()
    feed = context.socket(zmq.SUB)
    feed.setsockopt(zmq.LINGER, 0)
    for match_id in args.match or [None]:
        feed.setsockopt(zmq.SUBSCRIBE, TOPIC_PREFIX if match_id is None else topic_of(match_id))
    feed.connect(args.feed)

    last_seq = {}   # match id -> latest update_seq printed
    stats = {"updates": 0, "gaps": 0, "stale": 0, "rejected": 0, "snapshots": 0}

    def emit(fields, source):
        seq = last_seq.get(fields["match_id"])
        if seq is not None and fields["update_seq"] <= seq:
            stats["stale"] += 1   # duplicate, or a snapshot older than what we have
            return False
        last_seq[fields["match_id"]] = fields["update_seq"]
        fields["source"] = source
        print(json.dumps(fields), flush=True)
        stats["updates"] += 1
        return True

    def fill_from_snapshot(match_id):
        stats["snapshots"] += 1
        for fields in ask_snapshot(wire, context, args.snapshot, match_id, 3000):
            if not args.match or fields["match_id"] in args.match:
                emit(fields, "snapshot")

    if args.snapshot:
        # Subscribe first, then ask: an update published in between arrives on the feed and
        # the older snapshot entry is then skipped as stale, so nothing is missed.
        time.sleep(0.2)
        fill_from_snapshot(0)

    deadline = time.monotonic() + args.seconds if args.seconds else None
    while not args.count or stats["updates"] < args.count:
        wait_ms = 1000 if deadline is None else max(0, int((deadline - time.monotonic()) * 1000))
        if deadline is not None and wait_ms == 0:
            break
        if not feed.poll(min(wait_ms, 1000)):
            continue
        parts = feed.recv_multipart()
        try:
            fields = read_update(wire, parts[-1])
        except Rejected as why:
            stats["rejected"] += 1
            print("rejected: %s" % why, file=sys.stderr)
            continue
        seq = last_seq.get(fields["match_id"])
        if seq is not None and fields["update_seq"] > seq + 1:
            # Updates were lost (the publisher drops for slow subscribers): the newest state
            # is all that matters, so take this one and note the gap.
            stats["gaps"] += 1
        emit(fields, "feed")

    print(json.dumps({"summary": stats}), file=sys.stderr, flush=True)
    return 0


if __name__ == "__main__":
    sys.exit(main())
