#!/usr/bin/env bash
# SPDX-License-Identifier: MIT
# Installs every Debian 12 package Umbra needs to build, test and run. Idempotent: when all
# packages are already present it does nothing. Run as root (or with sudo available).
set -euo pipefail
PACKAGES=(
  build-essential cmake pkg-config git
  qt6-base-dev qt6-base-dev-tools libgl-dev fonts-dejavu-core
  libhdf5-dev libfftw3-dev libeigen3-dev nlohmann-json3-dev
  libopencv-dev libpng-dev libssl-dev
  libgtest-dev libgmock-dev googletest libbenchmark-dev
  libdcmtk-dev dcmtk
  python3 python3-numpy python3-scipy python3-h5py python3-sklearn python3-statsmodels python3-pydicom
  xvfb xauth time poppler-utils
)
missing=()
for p in "${PACKAGES[@]}"; do
  dpkg-query -W -f='${Status}' "$p" 2>/dev/null | grep -q "install ok installed" || missing+=("$p")
done
if [ ${#missing[@]} -eq 0 ]; then
  echo "install-deps: all ${#PACKAGES[@]} packages present"
  exit 0
fi
SUDO=""
[ "$(id -u)" -eq 0 ] || SUDO="sudo"
echo "install-deps: installing ${missing[*]}"
export DEBIAN_FRONTEND=noninteractive
$SUDO apt-get update -q
$SUDO apt-get install -y -q --no-install-recommends "${PACKAGES[@]}"
