#!/usr/bin/env bash
# Set up, build and run the main job on its built-in default: the beta = 2 table; then one
# statistical question on the invented demo dataset shipped in tests/data (20 bridge sensors,
# one interfering source): the p-value of its top eigenvalue under "no spike".
set -euo pipefail
cd "$(dirname "$0")/.."
bash scripts/build.sh
build/cli/edgelaw table "$@"
echo
echo "demo dataset tests/data/bridge_sensors.csv (invented): is there a spike?"
build/cli/edgelaw pvalue --model covariance --beta 1 --data tests/data/bridge_sensors.csv
