#pragma once
// Monte Carlo delay-propagation study: many independent simulated days with drawn primary
// delays, run on several threads, reduced in replication order so that the result is
// bit-identical whatever the thread count.
#include <atomic>
#include <cstdint>
#include <functional>
#include <optional>
#include <string>
#include <vector>

#include "sim/estimates.hpp"
#include "sim/simulation.hpp"
#include "sim/study_figures.hpp"

namespace knockon {

struct StudyOptions {
    std::uint32_t replications = 100;   // days to run, replications first .. first + replications - 1
    std::uint32_t first = 0;            // the first replication: > 0 for a later shard of a study
    std::uint32_t planned = 0;          // days of the whole study, when this run is its first block
                                        // and the later days are folded in afterwards (fold_day);
                                        // 0: `replications`.  Sizes the figures (StudyFigures).
    unsigned threads = 1;
    double until_ci = 0.0;              // >0: go on until the 95 % CI half-width of the mean total
                                        // knock-on per day (over the complete days, at least 10 of
                                        // them) is below this [s] (replications = cap)
    std::uint32_t batch = 50;           // replications between checks of until_ci / stop
    std::vector<double> thresholds = {180.0, 300.0};
    SimOptions sim;
    // The primary delays of one replication (draws keyed by seed and replication).
    std::function<InjectedDelays(std::uint32_t replication)> draw;
    // Called on the calling thread, in replication order, for the replications whose traces are
    // wanted (trace(k) true): e.g. to stream them to a file.
    std::function<bool(std::uint32_t replication)> trace;
    std::function<void(std::uint32_t replication, const SimResult& day)> on_trace;
    // Every day's full contribution, called on the calling thread in replication order before it
    // is folded in: e.g. to keep it in a shard file, from which a merge folds it in again.
    std::function<void(const ReplicationFigures& day)> on_day;
    // Progress (done, planned), called on the calling thread after each batch.
    std::function<void(std::uint32_t done, std::uint32_t planned)> progress;
    const std::atomic<bool>* stop = nullptr;   // set (e.g. by Ctrl-C): finish the batch, then stop
};

// The first day of a study, in replication order, that ended in deadlock: which, and why.
struct DeadlockedDay {
    std::uint32_t replication = 0;
    DeadlockReport report;   // read back from a results file: time, cause and description only
};

// A day that ended in deadlock is a result, never a figure: it keeps its per-day record
// (ReplicationStats, flagged `deadlocked`), but enters no figure across days (StudyFigures, the
// summary, the --until-ci rule); those are of the days that ran to the end.
struct StudyResult {
    std::vector<ReplicationStats> replications;   // in replication order, 0..n-1, deadlocked days too
    bool partial = false;                         // stopped before the planned replications
    std::vector<std::string> train_ids, section_names;
    std::vector<TimingRecord> timing_template;    // scheduled times, stations (from the first replication run)
    StudyFigures figures;                         // the other across-day figures, of the complete days
    std::optional<DeadlockedDay> first_deadlock;  // none when no day deadlocked
};

StudyResult run_study(const SimModel& model, const StudyOptions& options);

// Folds the next day, in replication order, into a study: its per-day record always, its figures
// only when it ran to the end, and the first deadlocked day's report.  run_study folds each day
// with it, and a merge of shard files does the same with the days read back, so that both give
// the same study to the bit.  `study.figures` must have been made for the planned days.
void fold_day(StudyResult& study, ReplicationFigures&& day);

// ---- Statistics across replications (Estimate, Quantiles: sim/estimates.hpp) ----------------

struct TimingPointStats {
    std::uint32_t train = 0;
    std::string station;
    bool stops = true;
    std::size_t reached = 0;            // replications in which the train got there
    Estimate delay;                     // arrival delay, early counted as 0
    Estimate knock_on;                  // knock-on gathered on the way here and waiting to leave
    Quantiles delay_quantiles;
    std::vector<Estimate> punctuality;  // per threshold: share within
};

struct TrainStats {
    std::uint32_t train = 0;
    Estimate primary, knock_on, final_delay;
};

// How much of a planned buffer the days used: as-run buffer = follower's blocking start minus the
// leader's blocking end on the planned critical section (negative: the follower was held up).
struct BufferStats {
    std::size_t pair = 0;   // index into SimModel::buffer_pairs()
    double planned = 0.0;
    Estimate as_run;
    double p10 = 0.0;       // 10 % of days had less buffer than this [s]
};

struct SignalStats {
    std::string signal;
    Estimate held;   // time trains stood at it, per day [s]
};

// Every figure is over the complete days alone (none when no day ran to the end: NaN means,
// empty tables).
struct StudySummary {
    std::size_t replications = 0, deadlocked = 0;   // days simulated; of them, ended in deadlock
    std::size_t complete = 0;                       // the rest: the days every figure is over
    std::optional<DeadlockedDay> first_deadlock;
    std::vector<double> thresholds;
    Estimate total_primary, total_knock_on, mean_arrival_delay;
    std::size_t connections = 0;        // connections in the timetable (models/links)
    Estimate missed_connections;        // per day, of those
    Estimate moved_crossings, changed_orders;   // per day (SimResult::crossing_changes)
    double knock_on_ratio = 0.0;        // mean knock-on / mean primary per day
    std::vector<Estimate> punctuality;  // per threshold, per-day shares averaged
    std::vector<TimingPointStats> timing_points;
    std::vector<TrainStats> trains;
    std::vector<SignalStats> signals;   // largest mean held time first
    std::vector<Estimate> section_blocked_share;   // per section: share of the day blocked
    std::vector<BufferStats> buffers;   // thinnest first (smallest mean as-run buffer)
    AttributionSummary attribution;     // where the knock-on came from (sim/attribution_figures)
};

// `thresholds` must be those the study ran with (StudyOptions::thresholds); otherwise
// std::invalid_argument.
StudySummary summarize_study(const SimModel& model, const StudyResult& study, const std::vector<double>& thresholds);

}  // namespace knockon
