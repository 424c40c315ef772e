#!/usr/bin/env bash
# Install the Debian packages edgelaw needs to build and test, when any is missing.
# Safe to run again: it only calls apt-get when a package is absent. Extra package names on
# the command line are added (the sanitizer and fuzz scripts ask for clang this way).
set -euo pipefail
packages=(
  build-essential cmake ninja-build pkg-config
  libeigen3-dev libsundials-dev libhdf5-dev hdf5-tools netcdf-bin
  libgtest-dev libgmock-dev libbenchmark-dev libcli11-dev nlohmann-json3-dev libfmt-dev
  libboost-math-dev zlib1g-dev
  python3-numpy python3-scipy python3-mpmath python3-h5py python3-xarray python3-h5netcdf
  r-cran-hdf5r
  "$@"
)
missing=()
for p in "${packages[@]}"; do
  dpkg-query -W -f='${Status}' "$p" 2>/dev/null | grep -q "install ok installed" || missing+=("$p")
done
if [ ${#missing[@]} -gt 0 ]; then
  echo "setup: installing ${missing[*]}" >&2
  sudo_cmd=""
  [ "$(id -u)" -ne 0 ] && sudo_cmd="sudo"
  export DEBIAN_FRONTEND=noninteractive
  $sudo_cmd apt-get update -qq
  $sudo_cmd apt-get install -y -qq --no-install-recommends "${missing[@]}" >/dev/null
fi
