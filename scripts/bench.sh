#!/usr/bin/env bash
# Build and run the benchmarks; prints Markdown rows for BENCHMARKS.md.
set -euo pipefail
cd "$(dirname "$0")/.."
bash scripts/build.sh
echo "machine: $(nproc) cores, $(grep -m1 'model name' /proc/cpuinfo | cut -d: -f2 | xargs), load $(cut -d' ' -f1-3 /proc/loadavg)"
build/bench/default_table_bench "${@:-1e-8 1e-9 1e-10}"
