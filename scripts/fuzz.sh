#!/usr/bin/env bash
# SPDX-License-Identifier: MIT
# Builds the libFuzzer targets (clang, -DUMBRA_FUZZ=ON, into build-fuzz/) and runs TARGET (or
# all of them, one after the other) for SECONDS each, starting from the committed seed corpus
# tests/fuzz/corpus/TARGET/. New inputs go to build-fuzz/corpus/TARGET/ (kept between runs);
# a crash, sanitizer report, leak, timeout or out-of-memory input is written to
# build-fuzz/artifacts/TARGET/ and the script exits 1.
#   scripts/fuzz.sh all 30          # the CI run
#   scripts/fuzz.sh capture 3600    # one target for an hour
# Environment: UMBRA_FUZZ_JOBS (parallel fuzzing processes per target, default 1),
# UMBRA_FUZZ_BUILD (build folder, default build-fuzz).
set -euo pipefail
cd "$(dirname "$0")/.."
if [ $# -ne 2 ]; then
  echo "usage: scripts/fuzz.sh TARGET|all SECONDS   (targets: $(ls tests/fuzz/fuzz_*.cpp | sed 's/.*fuzz_//;s/\.cpp//' | tr '\n' ' '))" >&2
  exit 2
fi
what=$1 seconds=$2
build=${UMBRA_FUZZ_BUILD:-build-fuzz}
jobs=${UMBRA_FUZZ_JOBS:-1}
if [ "$what" = all ]; then
  targets=$(ls tests/fuzz/fuzz_*.cpp | sed 's/.*fuzz_//;s/\.cpp//')
else
  [ -f "tests/fuzz/fuzz_$what.cpp" ] || { echo "fuzz.sh: no target '$what' (tests/fuzz/fuzz_$what.cpp)" >&2; exit 2; }
  targets=$what
fi
launcher=()
command -v ccache >/dev/null && launcher=(-DCMAKE_CXX_COMPILER_LAUNCHER=ccache -DCMAKE_C_COMPILER_LAUNCHER=ccache)
cmake -S . -B "$build" -DCMAKE_BUILD_TYPE=RelWithDebInfo -DCMAKE_C_COMPILER=clang -DCMAKE_CXX_COMPILER=clang++ \
      -DUMBRA_FUZZ=ON -DUMBRA_BUILD_UI=OFF -DUMBRA_BUILD_TESTS=OFF -DUMBRA_BUILD_BENCHMARKS=OFF "${launcher[@]}" >/dev/null
cmake --build "$build" -j2 --target $(for t in $targets; do printf 'fuzz_%s ' "$t"; done)
status=0
for t in $targets; do
  corpus="$build/corpus/$t" artifacts="$build/artifacts/$t"
  mkdir -p "$corpus" "$artifacts"
  echo "== fuzz_$t for $seconds s (corpus $corpus, seeds tests/fuzz/corpus/$t)"
  # Leak checking stays on; the HDF5 library keeps some global state until exit, which LSan
  # does not count as a leak. Limits: 2 GiB of memory, 10 s per input, inputs up to 64 KiB.
  if ! ASAN_OPTIONS=detect_leaks=1:allocator_may_return_null=1 UBSAN_OPTIONS=print_stacktrace=1 \
       "$build/fuzz/fuzz_$t" "$corpus" "tests/fuzz/corpus/$t" -max_total_time="$seconds" -timeout=10 \
       -rss_limit_mb=2048 -max_len=65536 $([ "$jobs" -gt 1 ] && echo "-jobs=$jobs -workers=$jobs") -print_final_stats=1 \
       -artifact_prefix="$artifacts/" 2>"$build/fuzz_$t.log"; then
    echo "fuzz_$t: FOUND a problem; see $build/fuzz_$t.log and $artifacts/" >&2
    grep -E "ERROR|SUMMARY|==[0-9]+==|Test unit written" "$build/fuzz_$t.log" | head -20 >&2 || true
    status=1
  else
    grep -E "stat::number_of_executed_units|stat::new_units_added|cov: " "$build/fuzz_$t.log" | tail -3
  fi
done
exit $status
