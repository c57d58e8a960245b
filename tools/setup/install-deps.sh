#!/usr/bin/env bash
# Installs every Debian package liveprob needs to build, test and run its demo.
# Uses sudo when not root. Safe to run again: apt skips what is already there.
set -euo pipefail

packages=(
  build-essential cmake ninja-build pkg-config git ccache mold clang-format-14   # clang-format: tools/setup/check-format
  clang libclang-rt-14-dev                      # sanitizer and fuzzer runtimes
  libzmq3-dev cppzmq-dev libsodium-dev          # ZeroMQ (with CURVE) and its C++ binding
  flatbuffers-compiler libflatbuffers-dev python3-flatbuffers
  libeigen3-dev libboost-dev libboost-system-dev
  nats-server libnats-dev                       # cluster mode: JetStream server (tests start three) and its C client
  catch2 libbenchmark-dev libcli11-dev libfmt-dev libspdlog-dev libsimdjson-dev
  python3 python3-scipy python3-statsmodels python3-numpy python3-zmq   # reference checks, Python client
  python3-dev python3-pybind11 pybind11-dev python3-setuptools python3-venv python3-pip  # the Python package
  python3-pytest python3-pandas python3-matplotlib   # its tests, its tables, the plotting example
  dpkg-dev fakeroot file                        # the .deb (CPack, dpkg-shlibdeps)
  chromium fonts-dejavu-core                    # the gateway page's browser test (headless)
  qemu-user                                     # same figures on an emulated older processor
)

missing=()
for p in "${packages[@]}"; do
  dpkg-query -W -f='${Status}' "$p" 2>/dev/null | grep -q "install ok installed" || missing+=("$p")
done
if [ ${#missing[@]} -eq 0 ]; then
  echo "install-deps: all ${#packages[@]} packages present"
  exit 0
fi

SUDO=""
if [ "$(id -u)" -ne 0 ]; then SUDO="sudo"; fi
echo "install-deps: installing ${missing[*]}"
$SUDO apt-get update -qq
DEBIAN_FRONTEND=noninteractive $SUDO apt-get install -y -qq --no-install-recommends "${missing[@]}"
