#!/usr/bin/env bash
# SPDX-License-Identifier: MIT
# Configures and builds Umbra (Release) in ./build. Extra arguments go to cmake's configure step.
set -euo pipefail
cd "$(dirname "$0")/.."
cmake -S . -B build -DCMAKE_BUILD_TYPE=Release "$@"
cmake --build build -j"$(nproc)"
