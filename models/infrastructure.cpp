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
