#!/usr/bin/env bash
# Builds knockon with clang into build-asan/ under AddressSanitizer and UndefinedBehaviorSanitizer
# (float-cast-overflow named as well: a float cast to an integer that cannot hold it), every report
# fatal, so a test or a fuzz run that meets one fails.  The code is also instrumented for libFuzzer's
# coverage, so the same build holds the fuzz targets (tests/fuzz, tools/ci_fuzz.sh).  Line tables
# and frame pointers make the reports readable (file and line of every frame) at a fraction of the
# compile time of full debug information; -O1 keeps the tests fast enough.
# Builds the given targets (default: all).  Installs clang and its runtimes when missing.
set -euo pipefail
cd "$(dirname "$0")/.."

tools/install_packages.sh g++ cmake make libboost-dev libboost-program-options-dev libyaml-cpp-dev \
  libhdf5-dev catch2 librandom123-dev nlohmann-json3-dev hdf5-tools python3 python3-h5py clang libclang-rt-dev

flags="-fsanitize=address,undefined,float-cast-overflow -fno-sanitize-recover=all -fsanitize=fuzzer-no-link"
flags+=" -fno-omit-frame-pointer -gline-tables-only -O1"
cmake -S . -B build-asan -DCMAKE_BUILD_TYPE=None -DCMAKE_C_COMPILER=clang -DCMAKE_CXX_COMPILER=clang++ \
  -DCMAKE_C_FLAGS="$flags" -DCMAKE_CXX_FLAGS="$flags" \
  -DCMAKE_EXE_LINKER_FLAGS="-fsanitize=address,undefined" >/dev/null
if (($#)); then
  cmake --build build-asan -j"$(nproc)" --target "$@"
else
  cmake --build build-asan -j"$(nproc)"
fi
