#!/usr/bin/env bash
# SPDX-License-Identifier: GPL-3.0-or-later
# Set-up command 1: install what is missing, build, run the demo scenario.
set -euo pipefail
here="$(cd "$(dirname "$0")/.." && pwd)"
"$here/tools/deps.sh"
"$here/tools/build.sh"
"$here/build/cli/voidsign" run "$here/scenarios/shallow-working-village.yaml" --force
