"""`pip install tools/python` into a virtual environment works offline: Debian's setuptools is the
build backend (no build isolation, no index), the package comes from this build's CMake targets
(LIVEPROB_BUILD_DIR), and the installed copy imports and prices outside the source tree."""
import os
import subprocess

SOURCE = os.path.join(os.path.dirname(__file__), "..", "..")


def test_pip_installs_the_package_into_a_venv_offline(tmp_path):
    build_dir = os.environ.get("LIVEPROB_BUILD_DIR")
    assert build_dir, "LIVEPROB_BUILD_DIR must name the CMake build (run through ctest)"
    venv = tmp_path / "venv"
    subprocess.run(["/usr/bin/python3", "-m", "venv", "--system-site-packages", str(venv)],
                   check=True)
    env = {k: v for k, v in os.environ.items() if k != "PYTHONPATH"}
    env.update(LIVEPROB_BUILD_DIR=build_dir, PIP_NO_INDEX="1", PIP_DISABLE_PIP_VERSION_CHECK="1")
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
