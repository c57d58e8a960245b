#!/usr/bin/env bash
# Installs the build into a scratch prefix and builds three consumer projects against it, the
# way an embedder would: C with CMake's find_package, C with pkg-config and a plain Makefile, C++
# with find_package (engine and wire codecs). Each runs the same invented match; its output must
# equal, byte for byte, that of the in-tree C example (the build's own libliveprob). Then the
# installed program: `liveprob --version`, and `liveprob gateway` serving its page from the
# prefix. Run by ctest (tests/packaging/CMakeLists.txt):
#   consumers.sh BUILD_DIR SOURCE_DIR IN_TREE_EMBED_C SCRATCH_DIR
set -euo pipefail
build_dir=$1 source_dir=$2 reference_program=$3 scratch=$4
here=$(cd "$(dirname "$0")" && pwd)
rm -rf "$scratch"
mkdir -p "$scratch"
prefix=$scratch/prefix

fail() { echo "consumers: $*" >&2; exit 1; }

cmake --install "$build_dir" --prefix "$prefix" >"$scratch/install.log" ||
  { cat "$scratch/install.log" >&2; fail "cmake --install failed"; }
"$reference_program" >"$scratch/expected.txt"
[ "$(wc -l <"$scratch/expected.txt")" -ge 10 ] || fail "the in-tree example printed too little"

compare() {  # compare NAME OUTPUT
  if ! cmp -s "$scratch/expected.txt" "$2"; then
    diff "$scratch/expected.txt" "$2" >&2 || true
    fail "$1: output differs from the in-tree engine's"
  fi
  echo "consumers: $1 built against the prefix, output identical ($(wc -l <"$2") lines)"
}

# 0. The installed C++ API is include/ alone: the pricing kernels' headers (engine/core/internal)
#    stay out of the prefix, and every header that is installed compiles on its own (so none of
#    them reaches for an internal one).
for internal in "$source_dir"/engine/core/internal/liveprob/core/*.hpp; do
  [ ! -e "$prefix/include/liveprob/core/$(basename "$internal")" ] ||
    fail "internal header $(basename "$internal") was installed"
done
for header in "$prefix"/include/liveprob/core/*.hpp "$prefix"/include/liveprob/fit/*.hpp; do
  echo "#include \"${header#"$prefix/include/"}\"" |
    c++ -std=c++20 -fsyntax-only -x c++ -I"$prefix/include" - 2>"$scratch/header.log" ||
    { cat "$scratch/header.log" >&2; fail "installed header ${header#"$prefix/"} does not compile alone"; }
done
echo "consumers: installed C++ headers compile alone; no internal header installed"

# 1. C, CMake find_package(liveprob COMPONENTS c).
cmake -S "$here/consumers/c_find_package" -B "$scratch/c_find_package" -G Ninja \
  -DCMAKE_BUILD_TYPE=Release -DCMAKE_PREFIX_PATH="$prefix" \
  -DEMBED_SOURCE="$source_dir/tools/examples/embed_c.c" >"$scratch/c_find_package.log"
cmake --build "$scratch/c_find_package" >>"$scratch/c_find_package.log"
"$scratch/c_find_package/embed_c" >"$scratch/c_find_package.txt"
compare "C with find_package" "$scratch/c_find_package.txt"

# 2. C, pkg-config and a plain Makefile.
mkdir -p "$scratch/c_pkg_config"
PKG_CONFIG_PATH="$prefix/lib/pkgconfig" make -s -C "$scratch/c_pkg_config" \
  -f "$here/consumers/c_pkg_config/Makefile" SOURCE="$source_dir/tools/examples/embed_c.c"
"$scratch/c_pkg_config/embed_c" >"$scratch/c_pkg_config.txt"
compare "C with pkg-config and make" "$scratch/c_pkg_config.txt"

# 3. C++, find_package(liveprob COMPONENTS engine protocol).
cmake -S "$here/consumers/cpp_find_package" -B "$scratch/cpp_find_package" -G Ninja \
  -DCMAKE_BUILD_TYPE=Release -DCMAKE_PREFIX_PATH="$prefix" >"$scratch/cpp_find_package.log"
cmake --build "$scratch/cpp_find_package" >>"$scratch/cpp_find_package.log"
"$scratch/cpp_find_package/embed_cpp" >"$scratch/cpp_find_package.txt"
compare "C++ with find_package" "$scratch/cpp_find_package.txt"

# 4. The installed program, and its gateway's page found from the prefix.
[ -n "$("$prefix/bin/liveprob" --version)" ] || fail "liveprob --version printed nothing"
"$prefix/bin/liveprob" gateway --feed tcp://127.0.0.1:9 --port 0 \
  --port-file "$scratch/gateway.port" >"$scratch/gateway.log" 2>&1 &
gateway=$!
trap 'kill "$gateway" 2>/dev/null || true' EXIT
for _ in $(seq 100); do
  [ -s "$scratch/gateway.port" ] && break
  kill -0 "$gateway" 2>/dev/null || { cat "$scratch/gateway.log" >&2; fail "the gateway exited"; }
  sleep 0.1
done
[ -s "$scratch/gateway.port" ] || fail "the gateway wrote no port file in 10 s"
port=$(cat "$scratch/gateway.port")
/usr/bin/python3 - "$port" "$prefix/share/liveprob/web/index.html" <<'PY'
import sys, urllib.request
port, page = sys.argv[1], sys.argv[2]
body = urllib.request.urlopen(f"http://127.0.0.1:{port}/", timeout=10).read()
if body != open(page, "rb").read():
    sys.exit("consumers: the installed gateway did not serve the installed page")
print(f"consumers: the installed gateway serves its page from the prefix ({len(body)} bytes)")
PY
