#!/usr/bin/env bash
# Set up, build and run the test suite (the fast label unless arguments say otherwise,
# e.g. `scripts/test.sh -L slow`).
set -euo pipefail
cd "$(dirname "$0")/.."
bash scripts/build.sh
args=("$@")
[ ${#args[@]} -eq 0 ] && args=(-L fast)
ctest --test-dir build --output-on-failure --parallel "$(nproc)" "${args[@]}"
