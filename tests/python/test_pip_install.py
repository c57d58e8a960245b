"""`pip install tools/python` into a virtual environment works offline: Debian's setuptools is the
build backend (no build isolation, no index), the package comes from this build's CMake targets
(LIVEPROB_BUILD_DIR), and the installed copy imports and prices outside the source tree. In a
plain venv (no system packages, so no NumPy) it still prices, drives a match and replays, with
tables as memoryviews, and agrees with the NumPy build of the same package to the bit."""
import json
import os
import subprocess

import liveprob

SOURCE = os.path.join(os.path.dirname(__file__), "..", "..")


def test_pip_installs_the_package_into_a_venv_offline(tmp_path):
    build_dir = os.environ.get("LIVEPROB_BUILD_DIR")
    assert build_dir, "LIVEPROB_BUILD_DIR must name the CMake build (run through ctest)"
    venv = tmp_path / "venv"
    subprocess.run(["/usr/bin/python3", "-m", "venv", "--system-site-packages", str(venv)],
                   check=True)
    env = _offline_env(build_dir)
    subprocess.run([str(venv / "bin" / "pip"), "install", "--quiet", "--no-build-isolation",
                    os.path.join(SOURCE, "tools", "python")], check=True, env=env)
    run = subprocess.run(
        [str(venv / "bin" / "python"), "-c",
         "import liveprob, liveprob.wire.Update; p = liveprob.price(prior=(1.45, 1.05));"
         "print(liveprob.__file__); print(p.home + p.draw + p.away); print(p.grid.shape)"],
        check=True, capture_output=True, text=True, cwd=tmp_path, env=env)
    where, total, shape = run.stdout.split("\n")[:3]
    assert where.startswith(str(venv))
    assert abs(float(total) - 1.0) < 1e-12
    assert shape == "(16, 16)"


def _offline_env(build_dir):
    env = {k: v for k, v in os.environ.items() if k != "PYTHONPATH"}
    env.update(LIVEPROB_BUILD_DIR=build_dir, PIP_NO_INDEX="1", PIP_DISABLE_PIP_VERSION_CHECK="1")
    return env


# Run inside the plain venv: everything a notebook does first, printed as JSON for comparison.
WITHOUT_NUMPY = """
import json, sys
import liveprob
try:
    import numpy
    sys.exit("numpy is importable in the plain venv: the test would prove nothing")
except ImportError:
    pass
p = liveprob.price(prior=(1.45, 1.05), minute=60, score=(1, 0))
m = liveprob.Match(prior=(1.45, 1.05))
m.event("period_start", 0)
m.event("goal", 23, side="away")
m.advance(40)
r = liveprob.replay(sys.argv[1])
rows = r.per_match(frame=False)
buckets = r.per_bucket(frame=False)
print(json.dumps({
    "grid_type": type(p.grid).__name__, "shape": list(p.grid.shape),
    "grid": p.grid.tolist(), "cell": p.grid[1, 2], "over": p.over.tolist(),
    "home": p.home, "final_1_0": p.final_score(1, 0), "match_away": m.prices.away,
    "matches": len(r), "forecasts_shape": list(r.forecasts.shape),
    "kickoff_home": rows["kickoff_home"], "rps": buckets["rps"], "n": buckets["n"],
}))
"""


def test_a_plain_venv_without_numpy_prices_and_replays(tmp_path, demo_streams):
    build_dir = os.environ.get("LIVEPROB_BUILD_DIR")
    assert build_dir, "LIVEPROB_BUILD_DIR must name the CMake build (run through ctest)"
    venv = tmp_path / "plain"
    subprocess.run(["/usr/bin/python3", "-m", "venv", str(venv)], check=True)
    env = _offline_env(build_dir)
    subprocess.run([str(venv / "bin" / "pip"), "install", "--quiet",
                    os.path.join(SOURCE, "tools", "python")], check=True, env=env)
    streams = sorted((demo_streams / "league").iterdir())[:6]
    folder = tmp_path / "streams"
    folder.mkdir()
    for stream in streams:
        (folder / stream.name).write_bytes(stream.read_bytes())
    run = subprocess.run([str(venv / "bin" / "python"), "-c", WITHOUT_NUMPY, str(folder)],
                         check=True, capture_output=True, text=True, cwd=tmp_path, env=env)
    plain = json.loads(run.stdout)

    # The same calls in this process, where NumPy is installed (Debian's python3-numpy).
    import numpy
    p = liveprob.price(prior=(1.45, 1.05), minute=60, score=(1, 0))
    assert isinstance(p.grid, numpy.ndarray)
    assert plain["grid_type"] == "memoryview"
    assert plain["shape"] == [16, 16]
    assert plain["grid"] == p.grid.tolist()
    assert plain["cell"] == p.grid[1, 2]
    assert plain["over"] == p.over.tolist()
    assert plain["home"] == p.home
    assert plain["final_1_0"] == p.final_score(1, 0)
    m = liveprob.Match(prior=(1.45, 1.05))
    m.event("period_start", 0)
    m.event("goal", 23, side="away")
    m.advance(40)
    assert plain["match_away"] == m.prices.away
    r = liveprob.replay(folder)
    assert plain["matches"] == len(r) == 6
    assert plain["forecasts_shape"] == list(r.forecasts.shape)
    rows = r.per_match(frame=False)
    buckets = r.per_bucket(frame=False)
    assert plain["kickoff_home"] == rows["kickoff_home"].tolist()
    assert plain["n"] == buckets["n"].tolist()
    # NaN where no match was scored: compare as JSON does (NaN != NaN)
    assert json.dumps(plain["rps"]) == json.dumps(buckets["rps"].tolist())
