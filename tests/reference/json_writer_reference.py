"""Checks the project's JSON writer against Python's json module, for
reference/json_writer_vs_python_test.

Reads lines written by the test:
  s <input bytes in hex> <the writer's string literal>
  n <the double in hex-float form> <the writer's number>
  doc <path of a whole document> <path of the expected value, itself JSON written by Python>
Strings must equal json.dumps(bytes.decode("utf-8", "replace"), ensure_ascii=False): Python's
escapes, and invalid UTF-8 replaced by U+FFFD per maximal invalid sequence as Python's decoder
does. Numbers must be valid JSON, read back to the same double, sign of zero included, and equal
repr() -- Python's shortest round-trip form -- without the ".0" repr adds to whole numbers.
Prints one line per mismatch and "checked N" at the end; exits 1 on any mismatch."""
import json
import math
import sys

bad = 0
checked = 0
with open(sys.argv[1], encoding="utf-8") as lines:
    for line in lines:
        kind, rest = line.rstrip("\n").split(" ", 1)
        checked += 1
        if kind == "s":
            hex_input, ours = rest.split(" ", 1)
            expected = json.dumps(bytes.fromhex(hex_input).decode("utf-8", "replace"), ensure_ascii=False)
            if ours != expected:
                bad += 1
                print(f"string {hex_input}: ours {ours!r}, python {expected!r}")
        elif kind == "n":
            hex_float, ours = rest.split(" ", 1)
            x = float.fromhex(hex_float)
            expected = repr(x)
            if expected.endswith(".0"):
                expected = expected[:-2]
            json.loads(ours)  # valid JSON (Python reads "-0" as the integer 0, so the value is checked as below)
            back = float(ours)
            if ours != expected or back != x or math.copysign(1.0, back) != math.copysign(1.0, x):
                bad += 1
                print(f"number {hex_float}: ours {ours}, python {expected}")
        elif kind == "doc":
            doc_path, inputs_path = rest.split(" ", 1)
            with open(doc_path, "rb") as f:
                ours = json.loads(f.read().decode("utf-8"))  # strict UTF-8: a bad byte fails here
            with open(inputs_path, encoding="utf-8") as f:
                spec = [line.rstrip("\n").split(" ", 1) for line in f]
            expected = {}
            for key_kind, value in spec:
                if key_kind == "s":
                    expected[f"s{len(expected)}"] = bytes.fromhex(value).decode("utf-8", "replace")
                else:
                    expected[f"n{len(expected)}"] = float.fromhex(value)
            if ours != expected:
                bad += 1
                print(f"document {doc_path}: read back differently")
        else:
            bad += 1
            print(f"unknown line kind {kind}")
print(f"checked {checked}")
sys.exit(1 if bad else 0)
