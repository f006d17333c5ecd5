#!/usr/bin/env bash
# SPDX-License-Identifier: MIT
# Builds everything with AddressSanitizer + UndefinedBehaviorSanitizer (-DUMBRA_SANITIZE=ON,
# no recovery: the first finding fails the test) into build-asan/ and runs the whole ctest
# suite, the workstation tests offscreen. Prints the time taken.
#   scripts/sanitize-tests.sh            # everything
#   scripts/sanitize-tests.sh -L 'core|cli'          # extra arguments go to ctest (a subset)
#   UMBRA_ASAN_TARGETS="core_tests umbra-cli" scripts/sanitize-tests.sh -L 'core|cli'
#                                        # build only what that subset needs (CI on 2 cores)
# Environment: UMBRA_ASAN_BUILD (build folder, default build-asan), UMBRA_ASAN_JOBS (default 2),
# UMBRA_ASAN_TARGETS (targets to build, default all).
set -euo pipefail
cd "$(dirname "$0")/.."
build=${UMBRA_ASAN_BUILD:-build-asan}
jobs=${UMBRA_ASAN_JOBS:-2}
start=$(date +%s)
launcher=()
command -v ccache >/dev/null && launcher=(-DCMAKE_CXX_COMPILER_LAUNCHER=ccache -DCMAKE_C_COMPILER_LAUNCHER=ccache)
# RelWithDebInfo: optimised like the release build (the suite's run time stays reasonable),
# with line numbers in the reports. Benchmarks are not built (they are not tests).
cmake -S . -B "$build" -DCMAKE_BUILD_TYPE=RelWithDebInfo -DUMBRA_SANITIZE=ON -DUMBRA_STATIC_HDF5=OFF -DUMBRA_BUILD_BENCHMARKS=OFF "${launcher[@]}" >/dev/null
if [ -n "${UMBRA_ASAN_TARGETS:-}" ]; then
  cmake --build "$build" -j"$jobs" --target $UMBRA_ASAN_TARGETS
else
  cmake --build "$build" -j"$jobs"
fi
built=$(date +%s)
echo "sanitize-tests: built in $((built - start)) s"
# Suppressions: none for our code; tests/fuzz/lsan.supp for the HDF5 library's own allocations.
export ASAN_OPTIONS=${ASAN_OPTIONS:-detect_leaks=1:abort_on_error=0:halt_on_error=1:strict_string_checks=1:detect_stack_use_after_return=1}
export UBSAN_OPTIONS=${UBSAN_OPTIONS:-print_stacktrace=1:halt_on_error=1}
export LSAN_OPTIONS=${LSAN_OPTIONS:-suppressions=$PWD/tests/fuzz/lsan.supp:print_suppressions=0}  # the HDF5 library's own lists
export QT_QPA_PLATFORM=offscreen
rc=0
# The bounded-memory test caps the address space, which AddressSanitizer's shadow memory (terabytes
# of reserved address space) cannot live under: it runs in the normal build only.
(cd "$build" && ctest --output-on-failure -j"$jobs" --timeout 1800 -E 'bounded_memory' "$@") || rc=$?
end=$(date +%s)
echo "sanitize-tests: tests in $((end - built)) s; total $((end - start)) s; ctest exit $rc"
exit $rc
