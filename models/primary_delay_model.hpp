#pragma once
// Where primary delays strike and how large they are (README, "Primary delays"): rules for late
// entry, extra dwell and slow running, matched against each train and place, and disruptions
// that take a stretch of track out of use on some days.  Draws for one simulated day are made in
// sim/delay_draws; this is only the description.
#include <string>
#include <vector>

#include "models/delay_distribution.hpp"

namespace knockon {

// The first rule in a list whose category (when given) equals the service's category and whose
// station (when given) equals the place's station applies; no matching rule, no delay.
struct DelayRule {
    std::string category;   // empty = any
    std::string station;    // empty = any; entry: the first call's station; running: the station
                            // the stretch starts at
    DelayDistribution distribution;
};

// A stretch of track out of use for a drawn time, on days drawn with daily_probability.  Its
// place is given in the scenario's own terms: on a line a track and a chainage range, on a network
// a segment and a range of offsets from the segment's start (one segment per rule).  Exactly one
// of `track` and `segment` is set.  Which detection sections that takes out of use is worked out
// in one place for both, ServicePaths::sections_out_of_use.
struct DisruptionRule {
    std::string track;                  // a line's track id
    std::string segment;                // a network's segment id
    double from = 0.0, to = 0.0;        // chainage (line) or offset (network) range [m]
    double daily_probability = 0.0;     // in [0, 1]
    DelayDistribution duration;         // its probability field is unused (1)
    double window_from = 0.0, window_to = 86400.0;   // start drawn uniformly in this window [s]
};

struct PrimaryDelayModel {
    std::vector<DelayRule> entry, dwell, running;
    std::vector<DisruptionRule> disruptions;

    bool empty() const { return entry.empty() && dwell.empty() && running.empty() && disruptions.empty(); }
};

}  // namespace knockon
