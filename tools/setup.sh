#!/usr/bin/env bash
# Installs knockon's build dependencies from Debian 12's packages (when missing) and builds it
# into build/.  Safe to run again: it installs nothing twice and rebuilds only what changed.
set -euo pipefail
cd "$(dirname "$0")/.."

packages=(g++ cmake make libboost-dev libboost-program-options-dev libyaml-cpp-dev libhdf5-dev
          catch2 librandom123-dev nlohmann-json3-dev hdf5-tools python3-h5py)
missing=()
for p in "${packages[@]}"; do
  dpkg-query -W -f='${Status}' "$p" 2>/dev/null | grep -q "install ok installed" || missing+=("$p")
done
if ((${#missing[@]})); then
  sudo=""
  [ "$(id -u)" -eq 0 ] || sudo="sudo"
  echo "setup: installing ${missing[*]}" >&2
  $sudo apt-get update -qq
  DEBIAN_FRONTEND=noninteractive $sudo apt-get install -y -qq --no-install-recommends "${missing[@]}" >/dev/null
fi

cmake -S . -B build -DCMAKE_BUILD_TYPE=Release >/dev/null
cmake --build build -j"$(nproc)"
