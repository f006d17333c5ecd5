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
# UMBRA_FUZZ_BUILD (build folder, default build-fuzz), UMBRA_FUZZ_SEED (libFuzzer's random seed;
# CI fixes it so that a CI run repeats the same mutations; unset, every run explores anew).
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
# clang and its libFuzzer runtime (Debian 12: clang, libclang-rt-14-dev), installed when missing.
if ! command -v clang++ >/dev/null || ! ls /usr/lib/llvm-*/lib/clang/*/lib/linux/libclang_rt.fuzzer-x86_64.a >/dev/null 2>&1; then
  SUDO=""
  [ "$(id -u)" -eq 0 ] || SUDO="sudo"
  echo "fuzz.sh: installing clang and libclang-rt-14-dev"
  DEBIAN_FRONTEND=noninteractive $SUDO apt-get install -y -q --no-install-recommends clang libclang-rt-14-dev >/dev/null ||
    { DEBIAN_FRONTEND=noninteractive $SUDO apt-get update -q >/dev/null &&
      DEBIAN_FRONTEND=noninteractive $SUDO apt-get install -y -q --no-install-recommends clang libclang-rt-14-dev >/dev/null; }
fi
launcher=()
command -v ccache >/dev/null && launcher=(-DCMAKE_CXX_COMPILER_LAUNCHER=ccache -DCMAKE_C_COMPILER_LAUNCHER=ccache)
cmake -S . -B "$build" -DCMAKE_BUILD_TYPE=RelWithDebInfo -DCMAKE_C_COMPILER=clang -DCMAKE_CXX_COMPILER=clang++ \
      -DUMBRA_FUZZ=ON -DUMBRA_STATIC_HDF5=OFF -DUMBRA_BUILD_UI=OFF -DUMBRA_BUILD_TESTS=OFF -DUMBRA_BUILD_BENCHMARKS=OFF "${launcher[@]}" >/dev/null
cmake --build "$build" -j2 --target $(for t in $targets; do printf 'fuzz_%s ' "$t"; done)
# HDF5 targets: the HDF5 library (1.10) has memory errors of its own on some damaged files
# (captures are therefore read in a child process first). Those targets run in libFuzzer's fork
# mode, which keeps fuzzing past a crash; afterwards every crash input is run again and counted
# as the library's when the first stack frame outside the sanitizer runtime lies in libhdf5.
# Any other finding (in Umbra's code) fails the run.
hdf5_targets=" capture image "
classify() {  # $1 target binary, $2 input: prints "libhdf5", "umbra" or "none" (does not fail again)
  local out rc=0
  out=$(LSAN_OPTIONS=suppressions="$PWD/tests/fuzz/lsan.supp" ASAN_OPTIONS=allocator_may_return_null=1 \
        timeout 60 "$1" -timeout=10 -rss_limit_mb=2048 "$2" 2>&1) || rc=$?
  if [ $rc -eq 0 ]; then echo none; return; fi
  # The first stack frame that is either in libhdf5 or in Umbra's sources (file:line under core/,
  # reconstruction/, tests/ or app/; the fuzz build has debug information) decides. Everything
  # else is passed over: the sanitizer's interceptors (strdup, memcpy, ... live in the fuzz binary
  # without a source line), libFuzzer, the C and C++ runtimes and the compression libraries HDF5
  # calls (a timeout can interrupt HDF5 inside inflate(); an uncaught exception from Umbra's code
  # passes through std::terminate before reaching an Umbra frame).
  local first
  first=$(printf '%s\n' "$out" | grep -E '^ +#[0-9]+ ' |
          grep -v -E 'interceptor|__sanitizer|sanitizer_common|asan_|ubsan_|lsan_|libFuzzer|fuzzer::| in (malloc|calloc|realloc|memalign|posix_memalign|operator new)' |
          grep -E "libhdf5|/(core|reconstruction|tests|app)/[^ ]*\.(cpp|h):[0-9]+" | head -1 || true)
  case "$first" in
    *libhdf5*) echo libhdf5 ;;
    "") if printf '%s\n' "$out" | grep -q -E '^ +#[0-9]+ .*libhdf5'; then echo libhdf5; else echo umbra; fi ;;
    *) echo umbra ;;
  esac
}
status=0
for t in $targets; do
  corpus="$build/corpus/$t" artifacts="$build/artifacts/$t"
  mkdir -p "$corpus" "$artifacts"
  echo "== fuzz_$t for $seconds s (corpus $corpus, seeds tests/fuzz/corpus/$t)"
  mode=()
  case "$hdf5_targets" in *" $t "*) mode=(-fork=1 -ignore_crashes=1 -ignore_timeouts=1 -ignore_ooms=1) ;; esac
  # Leak checking stays on, except for allocations the HDF5 library itself keeps after a file
  # it failed to parse (tests/fuzz/lsan.supp). Limits: 2 GiB, 10 s per input, inputs up to 64 KiB.
  rc=0
  ASAN_OPTIONS=detect_leaks=1:allocator_may_return_null=1 UBSAN_OPTIONS=print_stacktrace=1 \
    LSAN_OPTIONS=suppressions="$PWD/tests/fuzz/lsan.supp" \
    "$build/fuzz/fuzz_$t" "$corpus" "tests/fuzz/corpus/$t" -max_total_time="$seconds" -timeout=10 \
    -rss_limit_mb=2048 -max_len=65536 $([ "$jobs" -gt 1 ] && echo "-jobs=$jobs -workers=$jobs") -print_final_stats=1 \
    -artifact_prefix="$artifacts/" $([ -n "${UMBRA_FUZZ_SEED:-}" ] && echo "-seed=$UMBRA_FUZZ_SEED") "${mode[@]}" 2>"$build/fuzz_$t.log" || rc=$?
  grep -E "stat::number_of_executed_units|stat::new_units_added" "$build/fuzz_$t.log" | tail -2 || true
  if [ ${#mode[@]} -eq 0 ] && [ $rc -ne 0 ]; then
    echo "fuzz_$t: FOUND a problem; see $build/fuzz_$t.log and $artifacts/" >&2
    grep -E "ERROR|SUMMARY|Test unit written" "$build/fuzz_$t.log" | head -20 >&2 || true
    status=1
  fi
  if [ ${#mode[@]} -gt 0 ]; then
    lib=0 ours=0 gone=0
    for a in "$artifacts"/crash-* "$artifacts"/timeout-* "$artifacts"/oom-* "$artifacts"/leak-*; do
      [ -f "$a" ] || continue
      case "$(classify "$build/fuzz/fuzz_$t" "$a")" in
        libhdf5*) lib=$((lib + 1)) ;;
        none) gone=$((gone + 1)) ;;
        *) ours=$((ours + 1)); echo "fuzz_$t: finding in Umbra's code: $a" >&2
           LSAN_OPTIONS=suppressions="$PWD/tests/fuzz/lsan.supp" timeout 60 "$build/fuzz/fuzz_$t" -timeout=10 "$a" 2>&1 |
             grep -E 'ERROR|SUMMARY|^ +#[0-9]+ ' | head -16 >&2 || true ;;
      esac
    done
    echo "fuzz_$t: inputs failing inside libhdf5: $lib (covered by the child-process check); in Umbra's code: $ours;" \
         "not failing again when rerun alone: $gone"
    [ "$ours" -eq 0 ] || status=1
  fi
done
exit $status
