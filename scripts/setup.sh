#!/usr/bin/env bash
# Installs the Debian packages unchain needs (only those missing), then
# configures and builds it in build/. Safe to run again: it installs nothing
# that is present and rebuilds only what changed.
#
#   scripts/setup.sh            # build in ./build
#   BUILD_DIR=out scripts/setup.sh
set -euo pipefail

cd "$(dirname "$0")/.."
build_dir="${BUILD_DIR:-build}"

packages=(
  build-essential cmake ninja-build pkg-config
  libeigen3-dev libyaml-cpp-dev libcli11-dev libboost-dev doctest-dev
  nlohmann-json3-dev libfmt-dev libbenchmark-dev
  # reference libraries the tests compare against
  python3 python3-iapws python3-pint python3-periodictable python3-numpy python3-scipy
  # headless browser the report test renders the HTML report with
  chromium
)

missing=()
for p in "${packages[@]}"; do
  dpkg-query -W -f='${Status}' "$p" 2>/dev/null | grep -q "install ok installed" || missing+=("$p")
done

if ((${#missing[@]})); then
  echo "setup: installing ${missing[*]}"
  sudo_cmd=()
  [ "$(id -u)" -eq 0 ] || sudo_cmd=(sudo)
  export DEBIAN_FRONTEND=noninteractive
  "${sudo_cmd[@]}" apt-get update -qq
  "${sudo_cmd[@]}" apt-get install -y -qq --no-install-recommends "${missing[@]}"
fi

# Warnings are errors in CI, where the compiler is the one we test with.
werror=OFF
[ "${CI:-}" = "true" ] && werror=ON

mkdir -p "$build_dir"
cmake -S . -B "$build_dir" -G Ninja -DCMAKE_BUILD_TYPE=RelWithDebInfo -DUNCHAIN_WERROR="$werror" \
  -DUNCHAIN_BUILD_BENCH=ON > "$build_dir/configure.log" 2>&1 || { cat "$build_dir/configure.log"; exit 1; }
cmake --build "$build_dir" -j"$(nproc)"
