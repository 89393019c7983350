#pragma once
// Simulation results as one HDF5 file (layout: tools/results/HDF5_LAYOUT.md): one table of records per
// kind of SimResult record under /day, run facts as attributes on the root. The pieces (run facts,
// one day's tables) are also used by the study writer (study_hdf5.hpp), which puts days under
// /replications/<k>.
#include <cstdint>
#include <string>
#include <vector>

#include "sim/attribution.hpp"
#include "sim/sim_result.hpp"

namespace knockon {

namespace h5 {
class Group;
class RecordTable;
}

// The layout version written as the root attribute schema_version; raise it when the layout changes.
// 2: root attribute `kind`, study files, knock_on in the timing table.
// 3: comparison files; root attributes `variant` (day and study files) and `step_m`.
// 4: days that ended in deadlock enter no study figure; root attributes deadlocked_days and
//    deadlock_notice; /day deadlock_cause, trains_not_finished and the tables deadlock and
//    deadlock_blocks; study groups complete_days and first_deadlock_*.
// 5: root attribute scenario_hash (day and study files); study shard files (kind "shard").
// 8: where knock-on comes from: a day's attribution_sources and attribution_edges, a study's
//    attribution_sources, attribution_places, attribution_through and attribution_causes, a
//    shard's attribution_figures.
// 9: a deadlocked day's train kept by a link whose earlier train never came: waits_for "link"
//    and the fields link and link_from of /day/deadlock.
inline constexpr int kSimHdf5SchemaVersion = 9;

// Facts about the run that the results alone do not carry.
struct Hdf5RunInfo {
    std::string scenario_file;
    std::string scenario_name;
    std::string command_line;
    std::uint64_t seed = 0;
    std::string program_version;  // empty: this build's version
    std::string variant;          // the scenario variant run ("base": as written); empty: not one
                                  // variant (a comparison), not written
    double step = 2.0;            // distance step of the motion integration [m]
    std::string scenario_hash;    // tools/read/scenario_hash of the text and variant; empty: not written
};

// Writes `result` to `path` whole or not at all: built under a temporary name in the same directory
// and renamed over `path` once closed. On failure removes the temporary file and throws
// std::runtime_error naming `path` and what failed.
// `attribution`: where the day's knock-on came from (null: not written).
void write_sim_hdf5(const std::string& path, const SimResult& result, const Hdf5RunInfo& info,
                    const DayAttribution* attribution = nullptr);

// The root attributes every results file has (schema and program version, scenario, command line,
// seed, time unit, caution, variant, step, scenario hash) plus `kind` ("day", "study", "shard" or
// "comparison").
void write_run_attributes(const h5::Group& root, const Hdf5RunInfo& info, const std::string& kind);

// The root attributes that state the deadlock first: deadlocked_days (u32; a day file: 0 or 1) and
// deadlock_notice (text, tools/results/deadlock_output; empty when none).  Written when the results
// are known (a study's or comparison's at the end).
void write_deadlock_attributes(const h5::Group& root, std::size_t deadlocked_days, const std::string& notice);

// The two text attributes every table carries. units: "field: unit" for every field in field order,
// comma-separated (no commas inside a unit); description: what one record is.
void describe(const h5::RecordTable& table, const std::string& units, const std::string& description);

// A table of {index u32, id text}: the names that integer fields elsewhere refer to by row number.
void write_names(const h5::Group& group, const std::string& name, const std::vector<std::string>& ids,
                 const std::string& description);

// One day's facts (attributes) and tables (trains, sections, timing, occupancy, routes, holds,
// trajectories, deadlock, deadlock_blocks) into `group`, e.g. /day or /replications/000042.
// With `attribution`, also its tables (tools/results/attribution_hdf5).
void write_day(const h5::Group& group, const SimResult& result, const DayAttribution* attribution = nullptr);

}  // namespace knockon
