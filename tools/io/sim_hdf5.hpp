#pragma once
// Simulation results as one HDF5 file (layout: tools/io/HDF5_LAYOUT.md): one table of records per
// kind of SimResult record under /day, run facts as attributes on the root.
#include <cstdint>
#include <string>

#include "sim/sim_result.hpp"

namespace knockon {

// The layout version written as the root attribute schema_version; raise it when the layout changes.
inline constexpr int kSimHdf5SchemaVersion = 1;

// Facts about the run that the results alone do not carry.
struct Hdf5RunInfo {
    std::string scenario_file;
    std::string scenario_name;
    std::string command_line;
    std::uint64_t seed = 0;
    std::string program_version;  // empty: this build's version
};

// Writes `result` to `path` whole or not at all: built under a temporary name in the same directory
// and renamed over `path` once closed. On failure removes the temporary file and throws
// std::runtime_error naming `path` and what failed.
void write_sim_hdf5(const std::string& path, const SimResult& result, const Hdf5RunInfo& info);

}  // namespace knockon
