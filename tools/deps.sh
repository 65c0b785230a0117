#!/usr/bin/env bash
# SPDX-License-Identifier: GPL-3.0-or-later
# Installs the Debian 12 packages voidsign builds against (run as root). Shared by demo.sh and test.sh.
set -euo pipefail
packages=(cmake g++ make libeigen3-dev libspectra-dev libvtk9-dev libyaml-cpp-dev doctest-dev
          libsuitesparse-dev libmetis-dev libhypre-dev libmumps-dev libmumps-seq-dev libcli11-dev libgmsh-dev libopenblas0-pthread nlohmann-json3-dev
          chromium fonts-dejavu-core)  # the browser check of the HTML report (tests/report/)
missing=()
for p in "${packages[@]}"; do
  dpkg-query -W -f='${Status}' "$p" 2>/dev/null | grep -q "install ok installed" || missing+=("$p")
done
if [ ${#missing[@]} -gt 0 ]; then
  echo "voidsign: installing ${missing[*]}" >&2
  export DEBIAN_FRONTEND=noninteractive
  apt-get update -qq
  apt-get install -y -qq --no-install-recommends "${missing[@]}" >/dev/null
fi
