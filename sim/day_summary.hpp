#pragma once
// Figures of one simulated day that a planner reads first: punctuality at arrival, delays, time
// standing at signals.
#include <string>
#include <vector>

#include "sim/sim_result.hpp"

namespace knockon {

// "Within N minutes" counts an arrival whose delay is strictly below N minutes (2:59 is within
// 3 minutes, 3:00 is not), the usual reading of the published definitions (REFERENCES.md C4).
bool within(double delay_seconds, double threshold_seconds);

struct TrainDelay {
    std::uint32_t train = 0;
    double final_delay = 0.0;     // at its last timing point (arrival, or pass when it runs on) [s]
    double max_delay = 0.0;       // largest arrival delay at any timing point [s]
    double held = 0.0;            // time standing at signals [s]
};

struct DaySummary {
    std::size_t trains = 0, finished = 0;   // finished: reached their last timing point
    std::size_t arrivals = 0;     // timing points with an as-run arrival (stops and passes)
    std::vector<double> thresholds;          // [s]
    std::vector<double> punctuality;         // share of arrivals within each threshold
    double mean_arrival_delay = 0.0;         // negative (early) counts as 0 [s]
    double total_final_delay = 0.0;          // sum over trains, early counts as 0 [s]
    double total_held = 0.0;                 // [s]
    std::vector<TrainDelay> trains_by_delay; // largest final delay first
};

DaySummary summarize_day(const SimResult& result, const std::vector<double>& thresholds = {180.0, 300.0});

}  // namespace knockon
