#!/usr/bin/env bash
# SPDX-License-Identifier: GPL-3.0-or-later
# Configures and builds voidsign (Release) in build/.
set -euo pipefail
cd "$(dirname "$0")/.."
cmake -S . -B build -DCMAKE_BUILD_TYPE=Release -DVOIDSIGN_WERROR=ON >/dev/null
cmake --build build -j"$(nproc)"
