#pragma once
// Figures of one simulated day that a planner reads first: punctuality at arrival, delays, time
// standing at signals.
#include <string>
#include <vector>

#include "sim/sim_result.hpp"

namespace knockon {

// "Within N minutes" counts an arrival whose delay is strictly below N minutes (2:59 is within
// 3 minutes, 3:00 is not), the usual reading of the published definitions (tests/REFERENCES.md C4).
bool within(double delay_seconds, double threshold_seconds);

struct TrainDelay {
    std::uint32_t train = 0;
    double final_delay = 0.0;     // at the last timing point it reached (arrival, or pass when it runs on) [s]
    double max_delay = 0.0;       // largest arrival delay at any timing point [s]
    double held = 0.0;            // time standing at signals [s]
    bool finished = false;        // it reached its last timing point
    long last_reached = -1;       // index into SimResult::timing of the last timing point it reached or
                                  // left, or -1
};

// A day that ended in deadlock is incomplete: its trains that never reached their last timing
// point have no delay there, so no share or mean over the arrivals it did record stands for the
// day.  Those figures are NaN; counts and times up to the deadlock are kept, for what it did.
struct DaySummary {
    bool complete = true;                   // false: the day ended in deadlock
    std::size_t trains = 0, finished = 0;   // finished: reached their last timing point
    std::size_t arrivals = 0;     // timing points with an as-run arrival (stops and passes)
    std::vector<double> thresholds;          // [s]
    std::vector<double> punctuality;         // share of arrivals within each threshold; NaN if incomplete
    double mean_arrival_delay = 0.0;         // negative (early) counts as 0 [s]; NaN if incomplete
    double total_final_delay = 0.0;          // sum over trains, early counts as 0 [s]; NaN if incomplete
    double total_held = 0.0;                 // [s] (incomplete day: stands closed before the deadlock)
    // Links (models/links): connections of the timetable, those missed (the connecting train left
    // without its feeder), and the time links kept trains beyond their own readiness [s].
    std::size_t connections = 0, missed_connections = 0;
    double total_link_wait = 0.0;
    std::vector<TrainDelay> trains_by_delay; // largest final delay first
};

DaySummary summarize_day(const SimResult& result, const std::vector<double>& thresholds = {180.0, 300.0});

}  // namespace knockon
