#pragma once
// knockon's HDF5 results files read back (layout: tools/results/HDF5_LAYOUT.md) for the report and the
// charts: a simulated day (kind "day"), a Monte Carlo study ("study") or a comparison of variants
// ("comparison").  Figures come back in the types that produced them (SimResult for a day,
// StudySummary and ReplicationStats for a study's figures, DifferenceRow for a comparison), so the
// report reads a file exactly as the run's own output would have shown it.
//
// Every problem (missing file, not HDF5, another kind of file, a missing table or field, an index
// out of range, a newer schema) throws ResultsFileError naming the file, the object and what is
// wrong.
#include <cstdint>
#include <map>
#include <optional>
#include <stdexcept>
#include <string>
#include <vector>

#include "sim/comparison.hpp"
#include "sim/sim_result.hpp"
#include "sim/study.hpp"
#include "tools/results/comparison_hdf5.hpp"

namespace knockon {

struct ResultsFileError : std::runtime_error {
    using std::runtime_error::runtime_error;
};

enum class ResultsKind { day, study, comparison };
std::string to_string(ResultsKind kind);

// The root attributes.
struct ResultsFacts {
    ResultsKind kind = ResultsKind::day;
    int schema_version = 0;
    std::string program_version, scenario_file, scenario_name, command_line, caution;
    std::string variant;          // "base" or a variant's name; empty when the file does not say
                                  // (schema 2 and older, comparison files)
    double step = 0.0;            // [m]; NaN when the file does not say (schema 2 and older)
    std::uint64_t seed = 0;
    std::uint32_t replications = 0;   // study and comparison files
    bool partial = false;             // study files
};

// One consecutive pair of /study/buffers with its names resolved (summary.buffers[i].pair = i).
struct BufferPairNames {
    std::string leader, follower, line_section, section;
};

// Where a study's knock-on came from (schema 8 and later: /study/attribution_*), names resolved.
struct StoredAttribution {
    struct Source {
        std::string kind, train, place, section;   // train and section empty where they do not apply
        Estimate damage;
    };
    struct Place {
        std::string place;
        Estimate received, caused;
    };
    struct Through {
        std::string kind;                 // "buffer", "link" or "section"
        std::uint32_t index = 0;
        std::string leader, follower;     // buffer and link: the two trains; section: empty
        std::string section;              // section: its id; else empty
        Estimate knock_on;
    };
    struct Cause {
        std::string cause;
        Estimate knock_on;
    };
    std::vector<Source> sources;   // largest mean damage first
    std::vector<Place> places;
    std::vector<Through> through;
    std::vector<Cause> causes;
};

// The figures of one study: /study of a study file, /variants/<name> of a comparison file.
// summary.timing_points[i].train and summary.trains[i].train index train_ids; the per-day records
// hold the scalar figures only (replication, deadlocked, events, block_passages, totals, mean
// arrival delay and punctuality shares).
struct StoredStudy {
    StudySummary summary;
    std::vector<ReplicationStats> per_day;
    std::vector<std::string> train_ids, section_ids;
    std::vector<BufferPairNames> buffer_pairs;   // parallel to summary.buffers
    bool partial = false;
    std::optional<StoredAttribution> attribution;   // none in files of schema 7 and older
};

struct VariantFigures {
    std::string name, description;
    PlanFigures plan;
    StoredStudy study;
};

struct ResultsFile {
    std::string path;
    ResultsFacts facts;
    std::optional<SimResult> day;              // kind day: /day (routes are not read)
    // kind day: /day/attribution_sources (schema 8), in the file's order; none in older files
    std::optional<std::vector<StoredAttribution::Source>> day_sources;
    std::optional<StoredStudy> study;         // kind study
    std::string traces;                        // kind study: the --traces choice ("none", ...)
    std::vector<std::uint32_t> traced;         // kind study: replications under /replications, ascending
    std::vector<VariantFigures> variants;      // kind comparison: the reference first
    std::vector<DifferenceRow> differences;    // kind comparison
};

ResultsFile read_results(const std::string& path);

// A traced day of a study file, /replications/<k> (routes are not read).
SimResult read_traced_day(const std::string& path, std::uint32_t replication);

// A day's delay trees as a results file keeps them (/attribution_sources and /attribution_edges
// of a day group, schema 8 and later): each source that caused knock-on, by its number in the
// day, and the edges, knock-on `seconds` that `source` passed from train `from` (the holder or
// the link's earlier train; kNoTrain for a cause that is no train) to timing record `record`.
struct StoredDelayTrees {
    static constexpr std::uint32_t kNoTrain = UINT32_MAX;
    struct Edge {
        std::uint32_t source = 0;
        std::string cause;                 // "train", "link", "disruption", "dispatch", "none"
        std::uint32_t from = kNoTrain;     // index into the day's trains
        std::uint32_t record = 0;          // index into the day's timing records
        double seconds = 0.0;
    };
    std::map<std::uint32_t, StoredAttribution::Source> sources;   // by source number
    std::vector<Edge> edges;
};
// Of the day file's /day (no replication) or a study's traced day /replications/<k>; nothing
// where the file holds no delay trees.  `day` is that day as read.
std::optional<StoredDelayTrees> read_delay_trees(const std::string& path, std::optional<std::uint32_t> replication,
                                                 const SimResult& day);

namespace h5 {
class InputFile;
}
// A per_day table (a study's /study/per_day, a shard file's /shard/per_day) of the given schema,
// every number held to its rule: the one reading of a day's ReplicationStats.
std::vector<ReplicationStats> read_per_day_table(const h5::InputFile& f, const std::string& table,
                                                 const std::vector<double>& thresholds, int schema);

}  // namespace knockon
