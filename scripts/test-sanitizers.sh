#!/usr/bin/env bash
# Build in build-asan/ with AddressSanitizer and UndefinedBehaviorSanitizer and run the test
# suite (the fast label unless arguments say otherwise). Any sanitizer report fails the test
# that triggered it: UBSan halts on the first error, ASan always does.
set -euo pipefail
cd "$(dirname "$0")/.."
bash scripts/setup.sh
flags="-fsanitize=address,undefined -fno-omit-frame-pointer -fno-sanitize-recover=all"
cmake -S . -B build-asan -G Ninja -DCMAKE_BUILD_TYPE=RelWithDebInfo -DEDGELAW_BUILD_BENCH=OFF \
  -DCMAKE_C_FLAGS="$flags" -DCMAKE_CXX_FLAGS="$flags" \
  -DCMAKE_EXE_LINKER_FLAGS="-fsanitize=address,undefined" >/dev/null
cmake --build build-asan --parallel "$(nproc)"
# Leak checking is on: every HDF5 and SUNDIALS handle has an RAII owner, so a leak is a bug.
export ASAN_OPTIONS="detect_leaks=1:abort_on_error=0:strict_string_checks=1:detect_stack_use_after_return=1"
export LSAN_OPTIONS="suppressions=$PWD/tests/lsan.supp"
export UBSAN_OPTIONS="halt_on_error=1:print_stacktrace=1"
args=("$@")
[ ${#args[@]} -eq 0 ] && args=(-L fast)
ctest --test-dir build-asan --output-on-failure --parallel "$(nproc)" --timeout 3600 "${args[@]}"
