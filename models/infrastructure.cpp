#include "models/infrastructure.hpp"

#include <algorithm>

#include <limits>

namespace knockon {

const char* to_string(AspectSystem a) {
    switch (a) {
        case AspectSystem::two_aspect: return "two_aspect";
        case AspectSystem::three_aspect: return "three_aspect";
        case AspectSystem::four_aspect: return "four_aspect";
        case AspectSystem::cab_fixed_block: return "cab_fixed_block";
    }
    return "?";
}

namespace {

// The band holding x: bands are sorted by `from` and each holds up to the next band's from.
// Before the first band the first holds, at or beyond the end of the last band the last holds.
const ChainageBand* band_at(const std::vector<ChainageBand>& bands, double x) {
    if (bands.empty()) return nullptr;
    const ChainageBand* found = &bands.front();
    for (const auto& b : bands) {
        if (b.from <= x)
            found = &b;
        else
            break;
    }
    return found;
}

}  // namespace

const Track* Infrastructure::find_track(const std::string& id) const {
    for (const auto& t : tracks)
        if (t.id == id) return &t;
    return nullptr;
}

const Station* Infrastructure::find_station(const std::string& id) const {
    for (const auto& s : stations)
        if (s.id == id) return &s;
    return nullptr;
}

const Track* Infrastructure::main_track_at(double x, Direction d) const {
    // Strict containment wins.  Where two main tracks of one direction meet at x, the train is
    // about to run onto the next one: for up the one starting at x, for down the one ending there.
    const Track* touching = nullptr;
    bool touching_ahead = false;
    for (const auto& t : tracks) {
        if (t.is_loop() || !t.allows(d) || x < t.from || x > t.to) continue;
        if (t.from < x && x < t.to) return &t;
        const bool ahead = d == Direction::up ? t.from == x : t.to == x;
        if (touching == nullptr || (ahead && !touching_ahead)) {
            touching = &t;
            touching_ahead = ahead;
        }
    }
    return touching;
}

bool Infrastructure::has_single_line() const {
    for (const Track& t : tracks) {
        if (t.is_loop() || !t.up || !t.down) continue;
        // Walk the track from its start past the loops beside it: a gap is single line.
        std::vector<std::pair<double, double>> beside;
        for (const Track& loop : tracks)
            if (loop.parent == t.id) beside.push_back({loop.from, loop.to});
        std::sort(beside.begin(), beside.end());
        double x = t.from;
        for (const auto& [from, to] : beside) {
            if (from > x + 1e-6) return true;
            x = std::max(x, to);
        }
        if (x < t.to - 1e-6) return true;
    }
    return false;
}

bool Infrastructure::single_line(const Track& track, double x_lo, double x_hi) const {
    if (track.is_loop() || !track.up || !track.down) return false;
    for (const Track& loop : tracks)
        if (loop.parent == track.id && loop.from < x_hi - 1e-6 && loop.to > x_lo + 1e-6) return false;
    return true;
}

AspectSystem Infrastructure::aspect_system_at(double x) const {
    if (areas.empty()) return AspectSystem::three_aspect;
    for (const auto& a : areas)
        if (a.from <= x && x < a.to) return a.system;
    return x < areas.front().from ? areas.front().system : areas.back().system;
}

double Infrastructure::gradient_at(double x) const {
    const ChainageBand* b = band_at(gradients, x);
    return b ? b->value : 0.0;
}

double Infrastructure::line_speed_at(double x) const {
    const ChainageBand* b = band_at(speed_limits, x);
    return b ? b->value : std::numeric_limits<double>::infinity();
}

}  // namespace knockon
