"""pip install tools/python: the liveprob package, built by the project's CMake build.

The build backend is Debian's setuptools (python3-setuptools), used as is: no download. This
script has the CMake build make the target `liveprob_python_package` (the compiled engine, the
package's Python files, flatc's wire tables: tools/python/CMakeLists.txt) and installs the folder
it fills, <build>/python/liveprob. The CMake build folder is LIVEPROB_BUILD_DIR when set (an
existing build, say build/release, relative to the source tree: only the package's targets are
brought up to date), else
build/python-package in the source tree (configured here without tests and benchmarks).
README.md beside this file has the commands.
"""
import os
import subprocess
import sys

from setuptools import setup
from setuptools.dist import Distribution

HERE = os.path.dirname(os.path.abspath(__file__))
ROOT = os.path.dirname(os.path.dirname(HERE))


def project_version():
    with open(os.path.join(ROOT, "CMakeLists.txt"), encoding="utf-8") as f:
        for line in f:
            if line.startswith("project(liveprob VERSION "):
                return line.split()[2]
    raise RuntimeError("no project version in CMakeLists.txt")


def cmake_build_dir():
    build_dir = os.environ.get("LIVEPROB_BUILD_DIR")
    if build_dir:  # relative: to the source tree (pip runs this script from tools/python)
        return os.path.join(ROOT, build_dir)
    build_dir = os.path.join(ROOT, "build", "python-package")
    if not os.path.exists(os.path.join(build_dir, "CMakeCache.txt")):
        subprocess.check_call([
            "cmake", "-S", ROOT, "-B", build_dir, "-G", "Ninja", "-DCMAKE_BUILD_TYPE=Release",
            "-DLIVEPROB_BUILD_TESTS=OFF", "-DLIVEPROB_BUILD_BENCHMARKS=OFF",
            "-DPython3_EXECUTABLE=" + sys.executable])
    return build_dir


def built_package_root():
    """Has CMake bring <build>/python/liveprob up to date; returns <build>/python. Run before
    setup() itself, since every setuptools step (metadata first) looks into the package."""
    build_dir = cmake_build_dir()
    jobs = os.environ.get("LIVEPROB_BUILD_JOBS", str(os.cpu_count() or 2))
    subprocess.check_call(["cmake", "--build", build_dir, "--target", "liveprob_python_package",
                           "-j", jobs], stdout=sys.stderr)
    return os.path.join(build_dir, "python")


class BinaryDistribution(Distribution):
    """The package holds a compiled module: a platform wheel, not a pure-Python one."""

    def has_ext_modules(self):
        return True


setup(
    name="liveprob",
    version=project_version(),
    description="Live football win/draw/loss probabilities: the liveprob engine for Python",
    packages=["liveprob", "liveprob.wire"],
    package_dir={"": built_package_root()},
    package_data={"liveprob": ["_native*.so", "*.pyi", "py.typed"]},
    python_requires=">=3.9",
    distclass=BinaryDistribution,
    zip_safe=False,
)
