#pragma once
// One shard of a Monte Carlo study as an HDF5 file (kind "shard"; layout: tools/io/HDF5_LAYOUT.md,
// "Shard files"), and reading it back for `knockon merge`.
//
// A shard file keeps every day's full contribution (ReplicationFigures, each float and double as
// it was) rather than its figures: running sums and quantiles cannot be combined after the fact to
// the bit, but folding the days again in replication order (fold_day, sim/study.hpp) gives exactly
// the study one run would have gathered.  It also keeps the scenario text it ran, so the merge
// builds the same model without the scenario file, and every option the days depend on, so the
// merge can refuse shards that do not belong together.  Its traced days are under /replications as
// in a study file, and are copied into the merged file as they are.
#include <cstdint>
#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "sim/study.hpp"
#include "tools/io/sim_hdf5.hpp"

namespace knockon {

// What a shard file says of its run, beyond the results: what a merge compares and needs.
struct ShardRun {
    std::uint32_t shard = 0, shards = 0;   // shard `shard` (1-based) of `shards`
    std::uint32_t planned = 0;             // replications of the whole study
    std::uint32_t first = 0, end = 0;      // the replications this shard ran: [first, end)
    std::string scenario_text;             // the scenario as read, before the variant was applied
    std::vector<double> thresholds;        // punctuality thresholds [s]
    std::string order;                     // route-setting order: timetable or first-come
    double sample = 0.0;                   // trajectory sample interval [s] (0: none)
    std::string traces;                    // TraceSelection::text()
};

class ShardHdf5Writer {
public:
    // Creates the file under its temporary name with the root attributes (kind "shard") and the
    // run facts; throws h5::Error naming `path` if it cannot.
    ShardHdf5Writer(const std::string& path, const Hdf5RunInfo& info, const ShardRun& run);
    ~ShardHdf5Writer();  // without a successful finish(): removes the temporary file
    ShardHdf5Writer(const ShardHdf5Writer&) = delete;
    ShardHdf5Writer& operator=(const ShardHdf5Writer&) = delete;

    // The next day, in replication order (StudyOptions::on_day).
    void add_day(const ReplicationFigures& day);
    // One traced day, as /replications/<replication>.
    void write_trace(std::uint32_t replication, const SimResult& day, const DayAttribution* attribution = nullptr);
    // The names, the timing template, the first deadlock and whether the shard ran to its end;
    // closes the file and renames it into place.
    void finish(const StudyResult& study);

private:
    struct State;
    std::unique_ptr<State> state_;
};

// A shard file read back: the root facts and the run, without the days.
struct ShardFile {
    std::string path;
    std::string program_version, scenario_file, scenario_name, scenario_hash, variant;
    std::uint64_t seed = 0;
    double step = 0.0;
    ShardRun run;
    bool partial = false;                        // stopped (Ctrl-C) before its last replication
    std::uint32_t days = 0;                      // days in the file
    std::vector<std::string> train_ids, section_names;
    std::vector<TimingRecord> timing_template;   // train, call, station and stops of each record
    std::optional<DeadlockedDay> first_deadlock;
    std::vector<std::uint32_t> traced;           // replications under /replications, ascending
};

// Throws h5::Error naming the file and the object for a file that is not a readable shard file.
ShardFile read_shard_file(const std::string& path);

// The days of a shard file, in replication order.  A deadlocked day carries the shard's first
// deadlock report when it is that day (all a study keeps of deadlock reports).
std::vector<ReplicationFigures> read_shard_days(const ShardFile& shard);

}  // namespace knockon
