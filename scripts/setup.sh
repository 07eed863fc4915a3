#!/usr/bin/env bash
# Install what quietbowl needs on Debian/Ubuntu, only what is missing: GDAL and PROJ development
# files (the gdal and proj crates link the system libraries; proj-sys generates its bindings with
# libclang), GDAL's command-line tools (tests compare with gdaldem and ogrinfo), Xvfb and
# ImageMagick (screenshots), GNU time (benchmarks). Safe to run again.
set -euo pipefail
packages=(libgdal-dev libproj-dev gdal-bin pkg-config libclang-dev xvfb imagemagick time)
missing=()
for p in "${packages[@]}"; do
  dpkg -s "$p" >/dev/null 2>&1 || missing+=("$p")
done
if ((${#missing[@]})); then
  echo "setup: installing ${missing[*]}"
  sudo=""
  [ "$(id -u)" -eq 0 ] || sudo="sudo"
  $sudo apt-get update -qq
  DEBIAN_FRONTEND=noninteractive $sudo apt-get install -y -qq --no-install-recommends "${missing[@]}" >/dev/null
fi
if ! command -v cargo >/dev/null 2>&1; then
  echo "setup: no Rust toolchain found. Install Rust 1.85 or newer (https://rustup.rs) and run again." >&2
  exit 1
fi
