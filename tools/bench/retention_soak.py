#!/usr/bin/env python3
"""A season through the real processes: many short matches through `liveprob send`, `serve`
(journal on, short retention, compaction on) and `gateway`, sampling both processes' resident
memory, the journal's size and the counters as it goes, then checking that a new watch-all
client on the gateway works at the end. Standard library only; run by hand, never in CI.

    nice python3 tools/bench/retention_soak.py --liveprob build/release/tools/liveprob \
        --matches 200000 --rate 6000 --json soak.json

What it prints (and writes as JSON): one row per sample (matches sent, serve and gateway RSS,
journal segment bytes, final-states bytes, serve's matches in memory), then the figures
tools/bench/RESULTS.md quotes: bytes of resident memory per finished match over the second half
of the run (the slope of RSS against matches retired), the journal's largest size against what
was written in all, and the watch-all check.
"""

import argparse
import json
import os
import re
import shutil
import socket
import subprocess
import sys
import threading
import time
import urllib.request
import base64

KICKOFF_US = 1_958_137_200_000_000  # an invented season's first kick-off


def feed_lines(first_id, count, in_flight):
    """Short matches as JSON lines (protocol/README.md): setup, kick-off, half-time, second
    half, final whistle, with a goal in every third. `in_flight` matches are interleaved, so
    each one is live for a while before its whistle."""
    for block in range(first_id, first_id + count, in_flight):
        ids = range(block, min(block + in_flight, first_id + count))
        steps = [
            lambda m: {"period": "pre_match", "clock": "00:00", "type": "setup",
                       "home": "Alder Cross", "away": "Brindle Moor",
                       "prior": {"home": 1.45, "away": 1.05}, "kickoff_us": KICKOFF_US},
            lambda m: {"period": "first_half", "clock": "00:00", "type": "period_start"},
            lambda m: ({"period": "first_half", "clock": "31:00", "type": "goal", "side": "home"}
                       if m % 3 == 0 else None),
            lambda m: {"period": "first_half", "clock": "45:00", "type": "period_end"},
            lambda m: {"period": "second_half", "clock": "45:00", "type": "period_start"},
            lambda m: {"period": "second_half", "clock": "90:00", "type": "final_whistle"},
        ]
        seq = {m: 0 for m in ids}
        for step in steps:
            for m in ids:
                body = step(m)
                if body is None:
                    continue
                seq[m] += 1
                line = {"match": m, "seq": seq[m], "time_us": KICKOFF_US + seq[m] * 60_000_000}
                line.update(body)
                yield json.dumps(line, separators=(",", ":")) + "\n"


def rss_bytes(pid):
    with open(f"/proc/{pid}/status") as status:
        for line in status:
            if line.startswith("VmRSS:"):
                return int(line.split()[1]) * 1024
    return 0


def journal_sizes(folder):
    segments = final_states = 0
    for name in os.listdir(folder):
        path = os.path.join(folder, name)
        if name.startswith("segment-"):
            segments += os.path.getsize(path)
        elif name == "final-states.lpj":
            final_states = os.path.getsize(path)
    return segments, final_states


def last_counters(log_path):
    """serve's last `counters:` log line as a dict."""
    found = {}
    with open(log_path, errors="replace") as log:
        for line in log:
            if "counters:" in line:
                found = dict(re.findall(r"([a-z_.]+)=(\d+)", line.split("counters:", 1)[1]))
    return {k: int(v) for k, v in found.items()}


def slope(xs, ys):
    """Least-squares slope of ys against xs."""
    mx, my = sum(xs) / len(xs), sum(ys) / len(ys)
    spread = sum((x - mx) ** 2 for x in xs)
    return sum((x - mx) * (y - my) for x, y in zip(xs, ys)) / spread if spread else None


def compaction_totals(log_path):
    """From serve's `journal compacted` log lines: runs, bytes dropped, longest run (ms)."""
    runs, dropped, longest = 0, 0, 0
    with open(log_path, errors="replace") as log:
        for line in log:
            found = re.search(r"journal compacted in (\d+) ms: .*; (\d+) -> (\d+) bytes", line)
            if found:
                runs += 1
                longest = max(longest, int(found.group(1)))
                dropped += int(found.group(2)) - int(found.group(3))
    return runs, dropped, longest


def wait_for_file(path, limit=30):
    deadline = time.time() + limit
    while not os.path.exists(path) or os.path.getsize(path) == 0:
        if time.time() > deadline:
            raise RuntimeError(f"{path} did not appear")
        time.sleep(0.05)
    time.sleep(0.1)
    with open(path) as f:
        return f.read()


class WebSocketClient:
    """Just enough of RFC 6455 for a test client: the handshake, masked text frames out, and
    frames in (text and close)."""

    def __init__(self, port):
        self.sock = socket.create_connection(("127.0.0.1", port), timeout=10)
        key = base64.b64encode(os.urandom(16)).decode()
        self.sock.sendall((f"GET /feed HTTP/1.1\r\nHost: 127.0.0.1:{port}\r\n"
                           "Upgrade: websocket\r\nConnection: Upgrade\r\n"
                           f"Sec-WebSocket-Key: {key}\r\nSec-WebSocket-Version: 13\r\n"
                           f"Origin: http://127.0.0.1:{port}\r\n\r\n").encode())
        head = b""
        while b"\r\n\r\n" not in head:
            chunk = self.sock.recv(4096)
            if not chunk:
                raise RuntimeError("gateway closed during the handshake")
            head += chunk
        if b" 101 " not in head.split(b"\r\n", 1)[0]:
            raise RuntimeError("handshake refused: " + head.split(b"\r\n", 1)[0].decode())
        self.buffer = head.split(b"\r\n\r\n", 1)[1]

    def send_text(self, text):
        data = text.encode()
        mask = os.urandom(4)
        header = bytes([0x81, 0x80 | len(data)]) if len(data) < 126 else \
            bytes([0x81, 0x80 | 126]) + len(data).to_bytes(2, "big")
        self.sock.sendall(header + mask + bytes(b ^ mask[i % 4] for i, b in enumerate(data)))

    def _take(self, n):
        while len(self.buffer) < n:
            chunk = self.sock.recv(65536)
            if not chunk:
                raise EOFError
            self.buffer += chunk
        out, self.buffer = self.buffer[:n], self.buffer[n:]
        return out

    def frame(self):
        """(opcode, payload); raises socket.timeout when nothing comes."""
        b0, b1 = self._take(2)
        length = b1 & 0x7F
        if length == 126:
            length = int.from_bytes(self._take(2), "big")
        elif length == 127:
            length = int.from_bytes(self._take(8), "big")
        return b0 & 0x0F, self._take(length)


def watch_all_check(port, liveprob, ingest, scratch, first_id):
    """A new watch-all client: it is answered, it is not closed, and it gets the updates of a
    match sent after it connected."""
    client = WebSocketClient(port)
    client.send_text('{"watch":"all"}')
    fresh = first_id
    feed = os.path.join(scratch, "after.jsonl")
    with open(feed, "w") as f:
        f.writelines(feed_lines(fresh, 1, 1))
    result = {"watching": False, "closed": None, "fresh_match_updates": 0, "fresh_match_final": False,
              "catch_up_updates": 0}
    sent = False
    deadline = time.time() + 30
    client.sock.settimeout(1.0)
    while time.time() < deadline:
        try:
            opcode, payload = client.frame()
        except socket.timeout:
            if result["watching"] and not sent:
                subprocess.run([liveprob, "send", "--to", ingest, feed], check=True,
                               stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL)
                sent = True
            elif result["fresh_match_final"]:
                break
            continue
        if opcode == 0x8:
            result["closed"] = int.from_bytes(payload[:2], "big") if payload else 1005
            break
        if opcode != 0x1:
            continue
        message = json.loads(payload)
        if message.get("kind") == "watching":
            result["watching"] = bool(message.get("all"))
        elif message.get("kind") == "update":
            if message["match_id"] == fresh:
                # A client gets the latest frame of a match, not every one (conflation): the
                # final one must come.
                result["fresh_match_updates"] += 1
                result["fresh_match_final"] |= message.get("status") == "finished"
            else:
                result["catch_up_updates"] += 1
    result["works"] = (result["watching"] and result["closed"] is None
                       and result["fresh_match_final"])
    return result


def main():
    ap = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    ap.add_argument("--liveprob", required=True)
    ap.add_argument("--matches", type=int, default=200_000)
    ap.add_argument("--rate", type=float, default=6000, help="feed messages per second")
    ap.add_argument("--in-flight", type=int, default=500, help="matches interleaved at once")
    ap.add_argument("--retention-s", type=int, default=2)
    ap.add_argument("--compact-s", type=int, default=10)
    ap.add_argument("--segment-kib", type=int, default=4096)
    ap.add_argument("--tick-ms", type=int, default=1000)
    ap.add_argument("--sample-s", type=float, default=10)
    ap.add_argument("--scratch", default=f"/tmp/liveprob-retention-soak-{os.getpid()}")
    ap.add_argument("--json", help="also write the figures here")
    args = ap.parse_args()

    shutil.rmtree(args.scratch, ignore_errors=True)
    os.makedirs(args.scratch)
    journal = os.path.join(args.scratch, "journal")
    endpoints = os.path.join(args.scratch, "serve.endpoints")
    port_file = os.path.join(args.scratch, "gateway.port")
    serve_log = open(os.path.join(args.scratch, "serve.log"), "w")
    gateway_log = open(os.path.join(args.scratch, "gateway.log"), "w")
    serve = subprocess.Popen(
        [args.liveprob, "serve", "--ingest", "tcp://127.0.0.1:*", "--publish",
         "tcp://127.0.0.1:*", "--snapshot", "tcp://127.0.0.1:*", "--endpoints-file", endpoints,
         "--journal", journal, "--retention-s", str(args.retention_s), "--journal-compact-s",
         str(args.compact_s), "--journal-segment-kib", str(args.segment_kib), "--tick-ms",
         str(args.tick_ms), "--counters-ms", "1000", "--log-level", "info"],
        stdout=serve_log, stderr=subprocess.STDOUT)
    text = wait_for_file(endpoints)
    bound = dict(line.split("=", 1) for line in text.split())
    gateway = subprocess.Popen(
        [args.liveprob, "gateway", "--serve-endpoints", endpoints, "--port", "0", "--port-file",
         port_file, "--retention-s", str(args.retention_s)],
        stdout=gateway_log, stderr=subprocess.STDOUT)
    port = int(wait_for_file(port_file).strip())

    samples = []
    started = time.time()
    stop = threading.Event()
    progress = {"sent_matches": 0}

    def sample():
        segments, final_states = journal_sizes(journal)
        counters = last_counters(serve_log.name)
        row = {"t_s": round(time.time() - started, 1), "sent_matches": progress["sent_matches"],
               "serve_rss": rss_bytes(serve.pid), "gateway_rss": rss_bytes(gateway.pid),
               "journal_segment_bytes": segments, "final_states_bytes": final_states,
               "serve_matches": counters.get("matches", 0),
               "serve_retired": counters.get("matches.retired", 0),
               "compactions": counters.get("journal.compactions", 0)}
        samples.append(row)
        print(json.dumps(row), flush=True)

    def sampler():
        while not stop.wait(args.sample_s):
            sample()

    sample()
    thread = threading.Thread(target=sampler, daemon=True)
    thread.start()
    send = subprocess.Popen([args.liveprob, "send", "--to", bound["ingest"], "--format", "jsonl",
                             "--rate", str(args.rate), "-"],
                            stdin=subprocess.PIPE, stdout=subprocess.PIPE,
                            stderr=subprocess.STDOUT)
    first_id = 1_000_000
    for i, line in enumerate(feed_lines(first_id, args.matches, args.in_flight)):
        send.stdin.write(line.encode())
        if line.startswith('{"match"') and '"final_whistle"' in line:
            progress["sent_matches"] += 1
    send.stdin.close()
    send_output = send.stdout.read().decode(errors="replace")
    send_code = send.wait()
    # Past the retention and one more compaction, everything finished has left memory.
    time.sleep(args.retention_s + args.compact_s + 3 * args.tick_ms / 1000)
    sample()
    stop.set()
    thread.join()

    watch = watch_all_check(port, args.liveprob, bound["ingest"], args.scratch,
                            first_id + args.matches + 1)
    sample()
    gateway.terminate()
    serve.terminate()
    gateway.wait(30)
    serve.wait(30)

    # Bytes per finished match: resident memory against matches retired over the second half
    # of the run (warm-up, allocator growth and the first compactions behind it), as the
    # least-squares slope of the samples and as the difference of the end points.
    mid = next(s for s in samples if s["serve_retired"] >= args.matches // 2)
    end = samples[-2]  # after the last retention, before the watch-all client's match
    retired = end["serve_retired"] - mid["serve_retired"]
    second_half = [s for s in samples[:-1] if s["serve_retired"] >= mid["serve_retired"]]
    runs, dropped_bytes, longest_ms = compaction_totals(serve_log.name)
    figures = {
        "matches": args.matches, "rate": args.rate, "retention_s": args.retention_s,
        "compact_s": args.compact_s, "segment_kib": args.segment_kib,
        "wall_s": round(time.time() - started, 1), "send_exit": send_code,
        "send_said": send_output.strip().splitlines()[-3:],
        "serve_rss_mid": mid["serve_rss"], "serve_rss_end": end["serve_rss"],
        "gateway_rss_mid": mid["gateway_rss"], "gateway_rss_end": end["gateway_rss"],
        "serve_bytes_per_finished_match": (end["serve_rss"] - mid["serve_rss"]) / max(1, retired),
        "gateway_bytes_per_finished_match":
            (end["gateway_rss"] - mid["gateway_rss"]) / max(1, retired),
        "serve_rss_slope_per_retired_match": slope([s["serve_retired"] for s in second_half],
                                                   [s["serve_rss"] for s in second_half]),
        "gateway_rss_slope_per_retired_match": slope([s["serve_retired"] for s in second_half],
                                                     [s["gateway_rss"] for s in second_half]),
        "compactions": runs, "compaction_longest_ms": longest_ms,
        "journal_bytes_dropped_by_compaction": dropped_bytes,
        "serve_rss_max": max(s["serve_rss"] for s in samples),
        "gateway_rss_max": max(s["gateway_rss"] for s in samples),
        "journal_segment_bytes_max": max(s["journal_segment_bytes"] for s in samples),
        "journal_segment_bytes_end": end["journal_segment_bytes"],
        "final_states_bytes_end": end["final_states_bytes"],
        "serve_counters_end": last_counters(serve_log.name),
        "watch_all": watch,
        "samples": samples,
    }
    summary = {k: v for k, v in figures.items() if k not in ("samples", "serve_counters_end")}
    print(json.dumps(summary, indent=1))
    if args.json:
        with open(args.json, "w") as f:
            json.dump(figures, f, indent=1)
    return 0 if send_code == 0 and watch["works"] else 1


if __name__ == "__main__":
    sys.exit(main())
