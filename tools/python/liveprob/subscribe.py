"""Following a live service's probability feed from Python.

Subscribes to the publish socket of `liveprob serve` (or `liveprob relay`), asks the snapshot
socket for the latest state first (so a late joiner starts with a full picture), and yields one
dict per update, in the one JSON form of an update (protocol/README.md: the same text
`liveprob tap --json` prints and the gateway sends). It counts gaps in each match's update
sequence (every update carries the whole state, so the next one repairs a gap) and skips
duplicates and stale entries. Needs Debian's python3-zmq and this package's compiled module
(``liveprob._native``), whose C++ decoder verifies each buffer and writes its JSON.

    for update in liveprob.subscribe("tcp://127.0.0.1:7431", snapshot="tcp://127.0.0.1:7432",
                                     matches=[7], count=10):
        print(update["match"]["home"], update["full_time"]["home"], update["clock_ms"])

From a shell, one JSON line per update (statistics on standard error at the end):

    python3 -m liveprob.subscribe --feed tcp://127.0.0.1:7431 --snapshot tcp://127.0.0.1:7432 \
        --match 7 --count 10

The protocol (endpoints, topics, tables, sequence numbers): protocol/README.md.
"""
import argparse
import json
import sys
import time
from typing import Dict, Iterable, Iterator, List, Optional

TOPIC_PREFIX = b"match."          # then the match id as 20 zero-padded digits


def topic_of(match_id):
    return TOPIC_PREFIX + b"%020d" % match_id


class Rejected(Exception):
    """A buffer that is not a usable update."""


class Update(dict):
    """One update in the JSON form of protocol/README.md, as a dict; ``text`` is that JSON
    exactly as the C++ encoder wrote it (the same text `liveprob tap --json` prints)."""

    def __init__(self, text: str) -> None:
        super().__init__(json.loads(text))
        self.text = text


def read_update(native, buf, source):
    """One Update buffer, verified and decoded by the compiled module (the C++ decoder, with
    the FlatBuffers verifier), in the one JSON form."""
    try:
        return Update(native.update_json(buf, source))
    except ValueError as error:
        raise Rejected(str(error)) from error


def ask_snapshot(native, context, endpoint, match_id, timeout_ms):
    """Latest updates from the snapshot socket (match_id 0: every live match)."""
    import zmq
    socket = context.socket(zmq.REQ)
    socket.setsockopt(zmq.LINGER, 0)
    socket.connect(endpoint)
    try:
        socket.send(native.snapshot_request(match_id))
        if not socket.poll(timeout_ms):
            raise RuntimeError("no snapshot reply from %s" % endpoint)
        parts = socket.recv_multipart()
    finally:
        socket.close()
    # Many matches come as several frames of one message, each a whole reply.
    texts = []
    for i, buf in enumerate(parts):
        try:
            error, updates = native.snapshot_reply_json(buf)
        except ValueError as why:
            raise RuntimeError("snapshot reply part %d of %d: %s"
                               % (i + 1, len(parts), why)) from why
        if error:
            raise RuntimeError("snapshot: %s" % error)
        texts.extend(updates)
    return [Update(text) for text in texts]


class Subscription:
    """An iterator of updates (dicts in the JSON form of protocol/README.md) from a live
    service; ``stats`` counts updates, gaps, stale
    entries, rejected buffers and snapshot requests. Closes its sockets when exhausted or on
    ``close()``."""

    def __init__(self, feed: str, snapshot: Optional[str] = None,
                 matches: Iterable[int] = (), count: int = 0, seconds: float = 0.0,
                 snapshot_timeout_ms: int = 3000) -> None:
        import zmq
        from . import _native
        self._zmq = zmq
        self._native = _native
        self.matches: List[int] = list(matches)
        self.count = count
        self.stats: Dict[str, int] = {"updates": 0, "gaps": 0, "stale": 0, "rejected": 0,
                                      "snapshots": 0}
        self._last_seq: Dict[int, int] = {}
        self._pending: List[dict] = []
        self._deadline = time.monotonic() + seconds if seconds else None
        self._context = zmq.Context()
        self._feed = self._context.socket(zmq.SUB)
        self._feed.setsockopt(zmq.LINGER, 0)
        for match_id in self.matches or [None]:
            self._feed.setsockopt(zmq.SUBSCRIBE,
                                  TOPIC_PREFIX if match_id is None else topic_of(match_id))
        self._feed.connect(feed)
        if snapshot:
            # Subscribe first, then ask: an update published in between arrives on the feed
            # and the older snapshot entry is then skipped as stale, so nothing is missed.
            time.sleep(0.2)
            self.stats["snapshots"] += 1
            for fields in ask_snapshot(_native, self._context, snapshot, 0,
                                       snapshot_timeout_ms):
                if not self.matches or fields["match_id"] in self.matches:
                    self._take(fields)

    def _take(self, fields: Update) -> None:
        seq = self._last_seq.get(fields["match_id"])
        if seq is not None and fields["update_seq"] <= seq:
            self.stats["stale"] += 1  # duplicate, or a snapshot older than what we have
            return
        self._last_seq[fields["match_id"]] = fields["update_seq"]
        self._pending.append(fields)

    def __iter__(self) -> Iterator[Update]:
        return self

    def __next__(self) -> Update:
        while True:
            if self.count and self.stats["updates"] >= self.count:
                self.close()
                raise StopIteration
            if self._pending:
                self.stats["updates"] += 1
                return self._pending.pop(0)
            if self._feed is None:
                raise StopIteration
            wait_ms = 1000
            if self._deadline is not None:
                wait_ms = max(0, int((self._deadline - time.monotonic()) * 1000))
                if wait_ms == 0:
                    self.close()
                    raise StopIteration
            if not self._feed.poll(min(wait_ms, 1000)):
                continue
            parts = self._feed.recv_multipart()
            try:
                fields = read_update(self._native, parts[-1], "live")
            except Rejected as why:
                self.stats["rejected"] += 1
                print("rejected: %s" % why, file=sys.stderr)
                continue
            seq = self._last_seq.get(fields["match_id"])
            if seq is not None and fields["update_seq"] > seq + 1:
                # Updates were lost (the publisher drops for slow subscribers): the newest
                # state is all that matters, so take this one and note the gap.
                self.stats["gaps"] += 1
            self._take(fields)

    def close(self) -> None:
        """Close the sockets (iteration then ends)."""
        if self._feed is not None:
            self._feed.close()
            self._context.term()
            self._feed = None


def subscribe(feed: str, snapshot: Optional[str] = None, matches: Iterable[int] = (),
              count: int = 0, seconds: float = 0.0) -> Subscription:
    """Follow ``feed`` (the publish endpoint of serve or relay); with ``snapshot``, start from
    the latest state. ``matches``: ids to follow (default every match); stops after ``count``
    updates or ``seconds`` when given."""
    return Subscription(feed, snapshot, matches, count, seconds)


def main() -> int:
    parser = argparse.ArgumentParser(description="Follow liveprob's probability feed: one "
                                     "JSON line per update.")
    parser.add_argument("--feed", required=True, help="publish endpoint of serve or relay")
    parser.add_argument("--snapshot", help="snapshot endpoint (start from the latest state)")
    parser.add_argument("--match", type=int, action="append", default=[],
                        help="match id to follow (repeatable; default every match)")
    parser.add_argument("--count", type=int, default=0, help="stop after this many updates")
    parser.add_argument("--seconds", type=float, default=0, help="stop after this long")
    args = parser.parse_args()
    subscription = subscribe(args.feed, args.snapshot, args.match, args.count, args.seconds)
    for update in subscription:
        print(update.text, flush=True)
    print(json.dumps({"summary": subscription.stats}), file=sys.stderr, flush=True)
    return 0


if __name__ == "__main__":
    sys.exit(main())
