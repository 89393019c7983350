#pragma once
// What one simulated day of a study contributes, and the across-day figures it is folded into.
//
// A study keeps three kinds of figure, so that its memory does not grow with the per-record
// detail of every day (README, "Monte Carlo studies", Memory):
// - per-day scalars (ReplicationStats), one record a day: they feed
//   /study/per_day, compare's paired differences and the choice of a typical traced day;
// - figures reported only as a mean with its confidence interval (knock-on per timing record,
//   per-train delays, time held at each signal, section blocked share, as-run buffer mean): one
//   RunningMean each, whatever the number of days;
// - figures that need the distribution: the delay quantiles per timing record keep the days'
//   delays as float, one column per record, the days on time counted rather than stored (their
//   delay is exactly 0); the 10th percentile of each as-run buffer keeps only the smallest tenth
//   of the planned days' values, all it can need.
// Punctuality shares per timing record are counts.
#include <cstddef>
#include <cstdint>
#include <deque>
#include <map>
#include <string>
#include <vector>

#include "sim/attribution_figures.hpp"
#include "sim/estimates.hpp"
#include "sim/simulation.hpp"

namespace knockon {

// The figures of one simulated day that are kept for every day of a study.  A day that ended in
// deadlock keeps its sums up to the deadlock, but no mean or share over the arrivals it recorded
// (NaN: DaySummary); it enters no figure across days.
struct ReplicationStats {
    std::uint32_t replication = 0;
    bool deadlocked = false;
    std::uint64_t events = 0, block_passages = 0;
    double total_primary = 0.0;      // primary delay injected into all trains [s]
    double total_knock_on = 0.0;     // knock-on (secondary) delay of all trains [s]
    double mean_arrival_delay = 0.0; // over arrivals and passes, early counted as 0 [s]; NaN if deadlocked
    std::vector<double> punctuality; // share of arrivals within each threshold; NaN if deadlocked
    std::uint32_t missed_connections = 0;   // connections the connecting train left without
    // Single-track stretches: crossings moved to another place, pairs of one direction in another
    // order (SimResult::crossing_changes).
    std::uint32_t moved_crossings = 0, changed_orders = 0;
};

// Everything one simulated day contributes to a study: its ReplicationStats, and the detail that
// StudyFigures folds into its running figures before the day is dropped.
struct ReplicationFigures {
    ReplicationStats stats;
    DeadlockReport deadlock;            // the day's, when it ended in deadlock (else empty)
    std::vector<float> arrival_delay;   // per timing record (SimResult::timing order) [s]; NaN: not reached
    std::vector<float> knock_on;        // per timing record [s]
    std::vector<float> train_primary, train_knock_on, train_final_delay;   // per train [s]
    std::map<std::string, double> held;   // signal id -> time trains stood at it [s]
    std::vector<float> section_blocked;   // per section: as-run blocked time [s]
    std::vector<float> buffer;            // per SimModel::buffer_pairs(): as-run buffer [s]; NaN: not run
    // Where the day's knock-on came from (sim/attribution_figures): one row laid out by `attribution_layout`.
    AttributionLayout attribution_layout;
    std::vector<float> attribution;
};

ReplicationFigures replication_figures(const SimModel& model, const SimResult& day, const InjectedDelays& delays,
                                       const std::vector<double>& thresholds, std::uint32_t replication);

// One column of float values, one per day that has one.  Chunked (std::deque, 512-byte blocks),
// so that a column grows without copying itself into a block twice its size: no transient
// doubling of the peak memory and no freed blocks left behind to fragment the heap.
using DayColumn = std::deque<float>;

// Across-day figures of one timing record.
struct TimingRecordFigures {
    RunningMean delay;                   // arrival delay over the days it was reached, early as 0 [s]
    RunningMean knock_on;                // over all days [s]
    std::size_t on_time = 0;             // days reached with delay 0 (early counted as 0)
    DayColumn late;                      // the delays of the other days reached (> 0) [s]
    std::vector<std::size_t> within;     // per threshold: days reached with delay strictly below it
    std::size_t reached() const { return on_time + late.size(); }
    // The arrival delays of the days reached (early as 0), unsorted; for quantiles.
    std::vector<double> delays() const;
};

struct TrainFigures {
    RunningMean primary, knock_on, final_delay;   // per day [s]
};

// Position (0-based, ascending) of the 10th percentile among n as-run buffers: the order statistic
// at floor(0.1 (n - 1)), no interpolation ("10 % of days had less buffer than this").
std::size_t buffer_p10_index(std::size_t n);

// The `keep` smallest of the values added, in a max-heap: the k-th smallest of all the values
// is exact for any k < keep, however many values came, with at most `keep` of them stored.
class SmallestValues {
public:
    explicit SmallestValues(std::size_t keep = static_cast<std::size_t>(-1)) : keep_(keep) {}
    void add(float x);
    std::size_t size() const { return heap_.size(); }
    std::vector<double> sorted() const;   // the values kept, ascending

private:
    std::size_t keep_;
    std::vector<float> heap_;   // largest on top, so that it is the one to go
};

struct BufferFigures {
    RunningMean as_run;      // over the days both trains ran on the section [s]
    SmallestValues lowest;   // the smallest of the same days' values, enough for buffer_p10_index [s]
};

// The across-day figures of a study, gathered day by day.  Days must be added in replication
// order: the running sums then add up in the same order whatever the thread count, and the
// results are bit-identical.
class StudyFigures {
public:
    StudyFigures() = default;
    // planned_days: the most days that will be added (0: not known, every buffer value is kept).
    StudyFigures(std::vector<double> thresholds, std::size_t planned_days);

    // The first day fixes the number of timing records, trains, sections and buffer pairs; a
    // later day of another shape, or a day beyond the planned ones, is a std::logic_error (the
    // days of one study share one model).
    void add(const ReplicationFigures& day);

    std::size_t days() const { return days_; }
    const std::vector<double>& thresholds() const { return thresholds_; }
    const std::vector<TimingRecordFigures>& timing() const { return timing_; }
    const std::vector<TrainFigures>& trains() const { return trains_; }
    const std::map<std::string, RunningMean>& held() const { return held_; }   // by signal id
    const std::vector<RunningMean>& section_blocked_share() const { return section_blocked_share_; }
    const std::vector<BufferFigures>& buffers() const { return buffers_; }
    const AttributionLayout& attribution_layout() const { return attribution_layout_; }
    const std::vector<RunningMean>& attribution() const { return attribution_; }   // per figure of the row

private:
    std::size_t days_ = 0, planned_days_ = 0;
    std::size_t buffer_values_kept_ = static_cast<std::size_t>(-1);   // per buffer pair
    std::vector<double> thresholds_;
    std::vector<TimingRecordFigures> timing_;
    std::vector<TrainFigures> trains_;
    std::map<std::string, RunningMean> held_;
    std::vector<RunningMean> section_blocked_share_;   // blocked time / 86 400 s
    std::vector<BufferFigures> buffers_;
    AttributionLayout attribution_layout_;
    std::vector<RunningMean> attribution_;
};

}  // namespace knockon
