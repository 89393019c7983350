#pragma once
// A run over part of one segment, and how runs are strung together: the pieces routes, overlaps
// and paths are made of.
#include <cmath>
#include <cstddef>
#include <vector>

#include "models/network/network.hpp"

namespace knockon::net {

// A run over one segment from offset `from` to offset `to` in `heading`.
struct Stretch {
    std::size_t segment = kNone;
    double from = 0.0, to = 0.0;
    Heading heading = Heading::forward;
    double length() const { return heading == Heading::forward ? to - from : from - to; }
};

// Lengthens `last` by `next` where `next` runs on from where `last` ends, same segment and heading.
inline bool run_on(Stretch& last, const Stretch& next) {
    if (last.segment != next.segment || last.heading != next.heading || std::fabs(last.to - next.from) >= kSamePlace)
        return false;
    last.to = next.to;
    return true;
}

// Appends `next` to a run, as one stretch with the last where it runs on from it; a stretch of no
// length is left out.
inline void append(std::vector<Stretch>& run, const Stretch& next) {
    if (std::fabs(next.to - next.from) < kSamePlace) return;
    if (run.empty() || !run_on(run.back(), next)) run.push_back(next);
}

}  // namespace knockon::net
