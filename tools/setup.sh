#!/usr/bin/env bash
# Installs knockon's build dependencies from Debian 12's packages (when missing) and builds it
# into build/.  Safe to run again: it installs nothing twice and rebuilds only what changed.
# Open MPI is optional for knockon (studies over MPI ranks) but installed here, so that the tests
# of that path run too (tests/test_mpi_cli.cpp).
set -euo pipefail
cd "$(dirname "$0")/.."

tools/install_packages.sh g++ cmake make libboost-dev libboost-program-options-dev libyaml-cpp-dev \
  libhdf5-dev catch2 librandom123-dev nlohmann-json3-dev hdf5-tools python3 python3-h5py \
  openmpi-bin libopenmpi-dev

cmake -S . -B build -DCMAKE_BUILD_TYPE=Release >/dev/null
cmake --build build -j"$(nproc)"
