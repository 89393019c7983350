#pragma once
// Comparing variants of a scenario (README, "Variants and `compare`").
//
// The studies being compared are run with the same seed, so replication k of every variant sees
// the same primary delays (common random numbers: the draws are keyed by seed, replication, the
// train's draw key and run number, and the station, never by a time, a signal or a position in a
// list, see sim/delay_draws.hpp).  The day-to-day spread of the delays then
// cancels in the difference figure(variant, k) - figure(first, k), and the mean of those paired
// differences has a far narrower confidence interval than the difference of two independent
// means: a small effect of the signalling shows through a large effect of the dice.
#include <cstddef>
#include <string>
#include <vector>

#include "models/plan.hpp"
#include "sim/study.hpp"

namespace knockon {

// One per-day figure of two studies: each study's mean with its 95 % CI, and the mean paired
// difference (other minus first) with its 95 % CI.
struct PairedFigure {
    Estimate first, other;
    Estimate difference;
};

struct StudyComparison {
    std::size_t replications = 0;
    std::size_t paired = 0;                   // days complete in both studies: the days paired
    std::vector<double> thresholds;           // punctuality thresholds [s]
    PairedFigure total_knock_on;              // knock-on delay per day, all trains [s]
    PairedFigure mean_arrival_delay;          // [s]
    PairedFigure total_primary;               // primary delay injected per day [s]
    std::vector<PairedFigure> punctuality;    // per threshold, share 0..1
};

// Per-replication paired difference estimate: mean and 95 % CI of other[k] - first[k].
// Throws std::invalid_argument when the lengths differ; no values give NaN estimates (n = 0).
PairedFigure paired_figure(const std::vector<double>& first, const std::vector<double>& other);

// Both studies must hold the same replications (same count, same replication numbers, in order)
// and punctuality shares for `thresholds`; otherwise std::invalid_argument.  Each study's own
// figures are over its complete days; the differences over the days complete in both (a day
// that deadlocked in either is left out of the pairs).
StudyComparison compare_studies(const StudyResult& first, const StudyResult& other,
                                const std::vector<double>& thresholds);

// Deterministic figures of a plan that a signalling variant changes.
struct PlanFigures {
    std::size_t headway_pairs = 0;
    double mean_minimum_headway = 0.0;   // over all consecutive pairs in all line sections [s]
    double peak_consumption = 0.0;       // largest peak-hour consumption of any line section (share)
    double day_consumption = 0.0;        // largest day consumption of any line section (share)
    std::string peak_section, day_section;   // where those maxima are ("A-B up")
};
PlanFigures plan_figures(const PlanResult& plan);

}  // namespace knockon
