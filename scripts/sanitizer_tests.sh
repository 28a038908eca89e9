#!/usr/bin/env bash
# Builds the test suite with AddressSanitizer (leak checking included) and
# UndefinedBehaviorSanitizer in build-sanitize/ and runs it. Any sanitizer
# report fails the run. Expects scripts/setup.sh to have installed the
# packages.
#
#   scripts/sanitizer_tests.sh
set -euo pipefail

cd "$(dirname "$0")/.."
build_dir="${SANITIZE_BUILD_DIR:-build-sanitize}"
flags="-fsanitize=address,undefined -fno-sanitize-recover=undefined -fno-omit-frame-pointer"

mkdir -p "$build_dir"
cmake -S . -B "$build_dir" -G Ninja -DCMAKE_BUILD_TYPE=Debug -DUNCHAIN_BUILD_BENCH=OFF \
  -DCMAKE_CXX_FLAGS="$flags -O1" -DCMAKE_EXE_LINKER_FLAGS="$flags" > "$build_dir/configure.log" 2>&1 ||
  { cat "$build_dir/configure.log"; exit 1; }
cmake --build "$build_dir" -j"$(nproc)"

export ASAN_OPTIONS="detect_leaks=1:abort_on_error=1:strict_string_checks=1"
export UBSAN_OPTIONS="print_stacktrace=1:halt_on_error=1"
ctest --test-dir "$build_dir" --output-on-failure -j2
