#!/usr/bin/env bash
# Fuzzes the case loader and the solver entry (fuzz/fuzz_case_loader.cpp)
# with libFuzzer, AddressSanitizer (leaks included) and
# UndefinedBehaviorSanitizer, for a bounded time.
#
#   scripts/fuzz.sh [SECONDS]        (default 180)
#
# Installs clang-14 and libclang-rt-14-dev with apt-get when missing, builds
# in build-fuzz/ (its own build directory, at low priority), and runs on a
# copy of the seed corpus (the shipped cases, the price list, the bad-input
# fixtures and the CLI test cases) in a temporary folder, so the sources are
# never touched. An input slower than 1 s counts as a failure (-timeout=1).
# Exits non-zero on any crash, timeout, leak, out-of-memory or sanitizer
# report; the failing input is kept as fuzz-findings/crash-* (or timeout-*,
# leak-*, oom-*) and its stack trace is in the log printed above. Prints
# libFuzzer's final figures: runs, exec/s, coverage (cov) and features (ft).
#
# FUZZ_BUILD_DIR, FUZZ_JOBS and FUZZ_EXTRA_ARGS (more libFuzzer flags) can be
# set in the environment.
set -euo pipefail

cd "$(dirname "$0")/.."
source_dir="$(pwd)"
seconds="${1:-180}"
build_dir="${FUZZ_BUILD_DIR:-build-fuzz}"
findings_dir="$source_dir/fuzz-findings"

case "$seconds" in
  ''|*[!0-9]*) echo "usage: scripts/fuzz.sh [SECONDS]" >&2; exit 2 ;;
esac

# ---- tools ------------------------------------------------------------------
missing=()
command -v clang++-14 > /dev/null || missing+=(clang-14)
# The libFuzzer driver and the sanitizer runtimes.
ls /usr/lib/llvm-14/lib/clang/*/lib/linux/libclang_rt.fuzzer-x86_64.a > /dev/null 2>&1 ||
  missing+=(libclang-rt-14-dev)
if ((${#missing[@]})); then
  echo "fuzz.sh: installing ${missing[*]}"
  sudo_cmd=()
  [[ $(id -u) -ne 0 ]] && sudo_cmd=(sudo)
  "${sudo_cmd[@]}" apt-get update -qq
  DEBIAN_FRONTEND=noninteractive "${sudo_cmd[@]}" apt-get install -y -qq "${missing[@]}"
fi

# ---- build ------------------------------------------------------------------
mkdir -p "$build_dir"
if [[ ! -f "$build_dir/CMakeCache.txt" ]]; then
  cmake -S . -B "$build_dir" -G Ninja -DCMAKE_BUILD_TYPE=Debug \
    -DCMAKE_CXX_COMPILER=clang++-14 -DUNCHAIN_BUILD_FUZZ=ON \
    -DUNCHAIN_BUILD_TESTS=OFF -DUNCHAIN_BUILD_BENCH=OFF > "$build_dir/configure.log" 2>&1 ||
    { cat "$build_dir/configure.log"; exit 1; }
fi
nice -n 10 cmake --build "$build_dir" --target fuzz_case_loader -j"${FUZZ_JOBS:-2}"
fuzzer="$build_dir/fuzz/fuzz_case_loader"

# ---- corpus -----------------------------------------------------------------
work="$(mktemp -d "${TMPDIR:-/tmp}/unchain-fuzz.XXXXXX")"
trap 'rm -rf "$work"' EXIT
mkdir -p "$work/corpus" "$findings_dir"
# Flattened names, so that fixtures with the same base name do not collide.
for seed in cases/*.yaml cases/prices/*.yaml tests/bad_inputs/*.yaml tests/cli/*.yaml; do
  cp "$seed" "$work/corpus/$(echo "$seed" | tr / _)"
done

# ---- run --------------------------------------------------------------------
# -timeout=1: an input over 1 s is a failure. -max_len: the largest seed
# is about 10 kB; 64 kB leaves room to grow without wasting runs on huge
# inputs (the 16 MiB limit of the reader is tested in tests/cli).
# -rss_limit_mb: far above a normal solve, so only a runaway allocation
# trips it. detect_leaks: a leak fails the run. malloc_context_size: the
# solver allocates small vectors by the million, and recording 30 frames of
# stack for each took a tenth of the time; 8 frames still locate a leak.
export ASAN_OPTIONS="detect_leaks=1:abort_on_error=1:strict_string_checks=1:malloc_context_size=8"
export UBSAN_OPTIONS="print_stacktrace=1:halt_on_error=1"
log="$work/fuzz.log"
status=0
# shellcheck disable=SC2086
nice -n 10 "$fuzzer" "$work/corpus" \
  -dict=fuzz/yaml.dict -max_total_time="$seconds" -timeout=1 -rss_limit_mb=2048 \
  -max_len=65536 -print_final_stats=1 -artifact_prefix="$findings_dir/" \
  ${FUZZ_EXTRA_ARGS:-} > "$log" 2>&1 || status=$?

# The findings and their stack traces first, then the figures.
grep -v -E '^#[0-9]+[[:space:]]+(NEW|REDUCE|pulse)' "$log" | grep -v '^stat::' | tail -n 80 || true
echo "---- fuzz.sh: libFuzzer's final figures ($seconds s budget) ----"
grep -E '^#[0-9]+[[:space:]]+(DONE|INITED)' "$log" | tail -n 2 || true
grep '^stat::' "$log" || true
if ((status != 0)) || grep -q -E 'ERROR: (AddressSanitizer|LeakSanitizer|libFuzzer)|runtime error:|ALARM: working on the last Unit' "$log"; then
  echo "fuzz.sh: FINDING (libFuzzer exit $status); input saved in $findings_dir/" >&2
  ls -1 "$findings_dir" >&2 || true
  exit 1
fi
echo "fuzz.sh: no finding"
