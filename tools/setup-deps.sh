#!/usr/bin/env bash
# Installs every Debian 12 package gwdivide needs to build, test and run its demo.
# Only Debian's own archive is used; nothing is downloaded from elsewhere.
set -euo pipefail
PKGS=(
  build-essential cmake pkg-config
  libsuitesparse-dev libopenblas0-pthread libopenblas-dev libopenblas-pthread-dev
  libpng-dev libcmocka-dev libfyaml-dev libcairo2-dev libgdal-dev gdal-bin
  libgsl-dev
  python3 python3-numpy python3-scipy python3-gdal python3-yaml
  chromium fonts-dejavu-core
)
SUDO=""
if [ "$(id -u)" -ne 0 ]; then SUDO="sudo"; fi
missing=()
for p in "${PKGS[@]}"; do
  dpkg-query -W -f='${Status}' "$p" 2>/dev/null | grep -q "install ok installed" || missing+=("$p")
done
if [ "${#missing[@]}" -gt 0 ]; then
  echo "gwdivide set-up: installing ${missing[*]}"
  export DEBIAN_FRONTEND=noninteractive
  $SUDO apt-get update -q
  $SUDO apt-get install -y -q --no-install-recommends "${missing[@]}"
else
  echo "gwdivide set-up: all packages present"
fi
