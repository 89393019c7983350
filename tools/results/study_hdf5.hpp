#pragma once
// A Monte Carlo study as one HDF5 file (layout: tools/results/HDF5_LAYOUT.md, "Study files"): the
// per-day figures of every replication and their statistics under /study, and the full records of
// the traced replications under /replications/<k>, each laid out like the /day group of a day file.
//
// The file is opened before the study runs and the traced days are written as they are handed over
// (StudyOptions::on_trace, in replication order), so no day's records are kept in memory; /study is
// written at the end. Until finish() succeeds the file exists only under a temporary name, which is
// removed if the writer is destroyed first: the target path gets a whole file or nothing.
// Everything is written on the calling thread (sim/ENGINEERING.md "HDF5": one writer owns the handles).
#include <cstdint>
#include <memory>
#include <optional>
#include <string>

#include "sim/sim_model.hpp"
#include "sim/sim_result.hpp"
#include "sim/study.hpp"
#include "tools/results/sim_hdf5.hpp"

namespace knockon {

namespace h5 {
class Attributes;
class RecordLayout;
}

// Which replications keep their full records: none, all, or K of the N planned spread evenly
// (replication k is traced when floor((k+1)K/N) > floor(kK/N): the last of each N/K block).
struct TraceSelection {
    enum class Mode { none, all, sample };
    Mode mode = Mode::none;
    std::uint32_t sample = 0;  // K, for Mode::sample (at least 1)

    bool traced(std::uint32_t replication, std::uint32_t planned) const;
    std::string text() const;  // "none", "all" or "sample:K", as on the command line
};

// "none", "all" or "sample:K" with K a whole number >= 1; nullopt for anything else.
std::optional<TraceSelection> parse_trace_selection(const std::string& text);

// The name of the punctuality figure of a threshold [s] in the tables: "punctual_3min" for whole
// minutes, else e.g. "punctual_150s".
std::string punctuality_field(double threshold_seconds);

// The first deadlocked day of a study (its replication, time, cause and description) as
// first_deadlock_* attributes: of /study and of a shard file's /shard.
void write_first_deadlock(const h5::Attributes& a, const DeadlockedDay& d);

// One simulated day's record of a per_day table (/study/per_day, and the shard file's): the layout
// with a punctuality field per threshold, and a day's record appended to a table of it.
h5::RecordLayout per_day_layout(const std::vector<double>& thresholds);
void add_per_day_record(h5::RecordTable& table, const ReplicationStats& day, const std::vector<double>& thresholds);

// The fields of an estimate with its 95 % interval in a table of figures (/study/summary,
// /comparison/differences): mean, ci95_half_width, ci95_lower, ci95_upper (f64) and n (u64), in the
// unit the record's `unit` field names; and their units as describe() takes them.
void add_estimate_fields(h5::RecordLayout& layout);
inline constexpr const char* kEstimateUnits =
    "mean: in unit, ci95_half_width: in unit, ci95_lower: in unit, ci95_upper: in unit, n: days";

// The attributes and tables of a study's figures (replications, partial, deadlocked_days,
// knock_on_ratio, thresholds_s; per_day, summary, timing_points, trains, signals, sections, buffers,
// trains_index, sections_index) into `group`: /study of a study file, /variants/<name> of a
// comparison file.  `model` is the one the study ran on (it names the buffer pairs).
void write_study_tables(const h5::Group& group, const SimModel& model, const StudyResult& study,
                        const StudySummary& summary);

// The /replications/<k> group name: the 0-based replication number with at least 6 digits.
std::string replication_group_name(std::uint32_t replication);

class StudyHdf5Writer {
public:
    // Creates the file under its temporary name and writes the root attributes (kind "study");
    // throws h5::Error naming `path` if it cannot.
    StudyHdf5Writer(const std::string& path, const Hdf5RunInfo& info, const TraceSelection& traces);
    ~StudyHdf5Writer();  // without a successful finish(): removes the temporary file
    StudyHdf5Writer(const StudyHdf5Writer&) = delete;
    StudyHdf5Writer& operator=(const StudyHdf5Writer&) = delete;

    // One traced day, as /replications/<replication>.
    void write_trace(std::uint32_t replication, const SimResult& day, const DayAttribution* attribution = nullptr);
    // The traced day /replications/<replication> of another file (a study shard) copied whole,
    // under the same name; throws h5::Error naming that file if it cannot.
    void copy_trace(const std::string& file, std::uint32_t replication);
    // Writes /study and the root's replications/partial, closes the file and renames it into place.
    // `model` is the one the study ran on (it names the buffer pairs).
    void finish(const SimModel& model, const StudyResult& study, const StudySummary& summary);

private:
    struct State;
    std::unique_ptr<State> state_;
};

}  // namespace knockon
