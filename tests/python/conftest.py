"""Shared fixtures of the Python package's tests (run by ctest: tests/python/CMakeLists.txt sets
PYTHONPATH to the build's assembled package and names the built programs)."""
import os
import subprocess

import pytest


def _program(variable):
    path = os.environ.get(variable)
    if not path or not os.path.exists(path):
        pytest.fail(f"{variable} must name a built program (run through ctest)")
    return path


@pytest.fixture(scope="session")
def liveprob_binary():
    """The built `liveprob` program."""
    return _program("LIVEPROB_BINARY")


@pytest.fixture(scope="session")
def embed_c_binary():
    """The built C embedding example (tools/examples/embed_c.c)."""
    return _program("LIVEPROB_EMBED_C")


@pytest.fixture(scope="session")
def demo_streams(liveprob_binary, tmp_path_factory):
    """The invented league's season and cup as recorded streams (`liveprob simulate`)."""
    out = tmp_path_factory.mktemp("streams")
    subprocess.run([liveprob_binary, "simulate", "--out", str(out), "--seed", "11"], check=True,
                   stdout=subprocess.DEVNULL)
    return out
