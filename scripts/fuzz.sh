#!/usr/bin/env bash
# Build the libFuzzer harnesses (clang, ASan + UBSan) in build-fuzz/ and run each for SECONDS
# (default 45) over its corpus in tests/fuzz/corpus/<harness>/, one process at a time.
# New inputs go to build-fuzz/corpus/<harness>/, not into the repository; crashes are written
# to build-fuzz/crashes/ and fail the script. Usage: scripts/fuzz.sh [SECONDS] [HARNESS...]
set -euo pipefail
cd "$(dirname "$0")/.."
seconds=${1:-45}
shift || true
harnesses=("$@")
[ ${#harnesses[@]} -eq 0 ] && harnesses=(table_reader_fuzz csv_reader_fuzz matrix_csv_fuzz)
bash scripts/setup.sh clang libclang-rt-14-dev
CC=clang CXX=clang++ cmake -S . -B build-fuzz -G Ninja -DCMAKE_BUILD_TYPE=RelWithDebInfo -DEDGELAW_FUZZ=ON \
  -DEDGELAW_BUILD_TESTS=OFF -DEDGELAW_BUILD_BENCH=OFF >/dev/null
cmake --build build-fuzz --parallel "$(nproc)" --target "${harnesses[@]}"
export UBSAN_OPTIONS="halt_on_error=1:print_stacktrace=1"
export ASAN_OPTIONS="detect_leaks=1"
export LSAN_OPTIONS="suppressions=$PWD/tests/lsan.supp"
mkdir -p build-fuzz/crashes
for h in "${harnesses[@]}"; do
  name=${h%_fuzz}
  mkdir -p "build-fuzz/corpus/$name"
  dict=()
  [ -f "tests/fuzz/$name.dict" ] && dict=(-dict="tests/fuzz/$name.dict")
  echo "fuzz: $h for $seconds s" >&2
  # -timeout: one input taking over 10 s counts as a hang; -rss_limit_mb bounds memory.
  status=0
  "build-fuzz/tests/fuzz/$h" -max_total_time="$seconds" -timeout=10 -rss_limit_mb=2048 \
    -print_final_stats=1 -artifact_prefix="build-fuzz/crashes/$name-" "${dict[@]}" \
    "build-fuzz/corpus/$name" "tests/fuzz/corpus/$name" > "build-fuzz/$name.log" 2>&1 || status=$?
  grep -E '^(#[0-9]+.*DONE|Done|stat::number_of_executed_units|stat::peak_rss_mb)' "build-fuzz/$name.log" >&2 || true
  if [ "$status" -ne 0 ]; then
    tail -n 40 "build-fuzz/$name.log" >&2
    echo "fuzz: $h failed (exit $status); reproducer in build-fuzz/crashes/" >&2
    exit 1
  fi
done
