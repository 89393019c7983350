#pragma once
// One shard of a Monte Carlo study or of a comparison as an HDF5 file (kinds "shard" and
// "comparison_shard"; layout: tools/results/HDF5_LAYOUT.md, "Shard files"), and reading it back for
// `knockon merge`.
//
// A shard file keeps every day's full contribution (ReplicationFigures, each float and double as
// it was) rather than its figures: running sums and quantiles cannot be combined after the fact to
// the bit, but folding the days again in replication order (fold_day, sim/study.hpp) gives exactly
// the study one run would have gathered.  It also keeps the scenario text it ran, so the merge
// builds the same model without the scenario file, and every option the days depend on, so the
// merge can refuse shards that do not belong together.  A study shard keeps its days under /shard;
// a comparison shard keeps each variant's under /shard/variants/<name>, the same tables.  A study
// shard's traced days are under /replications as in a study file, and are copied into the merged
// file as they are (a comparison has no traced days).
#include <cstdint>
#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "sim/study.hpp"
#include "tools/results/sim_hdf5.hpp"

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

// One variant of a comparison, as a comparison shard names it.
struct ShardVariant {
    std::string name, description;
};

// A comparison's shard (compare --shard K/N --out): the run facts under /shard as in a study shard,
// then each variant's days, one variant after the other, in the order compared.
class ComparisonShardHdf5Writer {
public:
    // Creates the file under its temporary name with the root attributes (kind "comparison_shard"),
    // the run facts and the variants' names and descriptions; throws h5::Error naming `path`.
    ComparisonShardHdf5Writer(const std::string& path, const Hdf5RunInfo& info, const ShardRun& run,
                              const std::vector<ShardVariant>& variants);
    ~ComparisonShardHdf5Writer();  // without a successful finish(): removes the temporary file
    ComparisonShardHdf5Writer(const ComparisonShardHdf5Writer&) = delete;
    ComparisonShardHdf5Writer& operator=(const ComparisonShardHdf5Writer&) = delete;

    // The days of the next variant (in the order given) follow, in replication order.
    void begin_variant();
    void add_day(const ReplicationFigures& day);
    // Its names, timing template and first deadlock, once its study has ended.
    void end_variant(const StudyResult& study);
    // Closes the file and renames it into place; every variant must have ended.
    void finish();

private:
    struct State;
    std::unique_ptr<State> state_;
};

// One study's days in a shard file: a study shard's (group /shard), or one variant's of a
// comparison shard (/shard/variants/<name>).
struct ShardDays {
    std::string group;                           // where its tables are
    ShardVariant variant;                        // a comparison shard's variant (empty in a study shard)
    bool partial = false;                        // stopped (Ctrl-C) before its last replication
    std::uint32_t days = 0;                      // days in the file
    std::vector<std::string> train_ids, section_names;
    std::vector<TimingRecord> timing_template;   // train, call, station and stops of each record
    std::optional<DeadlockedDay> first_deadlock;
};

// A shard file read back: the root facts and the run, without the days.
struct ShardFile {
    std::string path;
    std::string kind;                            // "shard" (a study's) or "comparison_shard"
    std::string program_version, scenario_file, scenario_name, scenario_hash, variant;
    std::uint64_t seed = 0;
    double step = 0.0;
    ShardRun run;
    std::vector<ShardDays> studies;              // one in a study shard; one per variant, in order
    std::vector<std::uint32_t> traced;           // replications under /replications, ascending
    bool comparison() const { return kind == kComparisonShardKind; }
    static constexpr const char* kComparisonShardKind = "comparison_shard";
};

// Throws h5::Error naming the file and the object for a file that is not a readable shard file.
ShardFile read_shard_file(const std::string& path);

// The days of one study of a shard file (one of shard.studies), in replication order.  A
// deadlocked day carries the study's first deadlock report when it is that day (all a study keeps
// of deadlock reports).
std::vector<ReplicationFigures> read_shard_days(const ShardFile& shard, const ShardDays& study);

}  // namespace knockon
