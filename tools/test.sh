#!/usr/bin/env bash
# SPDX-License-Identifier: GPL-3.0-or-later
# Set-up command 2: install what is missing, build, run the whole test suite.
set -euo pipefail
here="$(cd "$(dirname "$0")/.." && pwd)"
"$here/tools/deps.sh"
"$here/tools/build.sh"
cd "$here/build"
ctest --output-on-failure -j2 --timeout 900
