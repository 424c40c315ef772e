#!/usr/bin/env bash
# Set up, build and run the main job on its built-in default: the beta = 2 table.
set -euo pipefail
cd "$(dirname "$0")/.."
bash scripts/build.sh
build/cli/edgelaw table "$@"
