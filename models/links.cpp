#include "models/links.hpp"

#include <cmath>
#include <limits>

#include "models/path.hpp"

namespace knockon {

const char* to_string(LinkKind k) {
    switch (k) {
        case LinkKind::turnaround: return "turnaround";
        case LinkKind::connection: return "connection";
        case LinkKind::crew: return "crew";
    }
    return "?";
}

std::optional<LinkKind> link_kind_from_name(const std::string& name) {
    for (LinkKind k : {LinkKind::turnaround, LinkKind::connection, LinkKind::crew})
        if (name == to_string(k)) return k;
    return std::nullopt;
}

const char* minimum_name(LinkKind k) {
    switch (k) {
        case LinkKind::turnaround: return "turnaround";
        case LinkKind::connection: return "transfer";
        case LinkKind::crew: return "crew change";
    }
    return "?";
}

double LinkPlan::wait_until() const {
    return kind == LinkKind::connection ? departure + max_wait : std::numeric_limits<double>::infinity();
}

namespace {

// The earlier service's last call where it ends on the line, the later one's first where it
// starts on the line (turnarounds and crew links join those).
bool ends_on_line(const Service& s) { return !s.leaves_at_edge && !s.calls.empty() && s.calls.back().stops; }
bool starts_on_line(const Service& s) { return !s.enters_at_edge && !s.calls.empty() && s.calls.front().stops; }

// The call at `station` that stops there, or nothing.
std::optional<std::size_t> stop_at(const Service& s, const std::string& station) {
    for (std::size_t k = 0; k < s.calls.size(); ++k)
        if (s.calls[k].station == station) {
            if (!s.calls[k].stops) return std::nullopt;
            return k;
        }
    return std::nullopt;
}

// Where a connection's feeder arrives: a stop that is not the start of a service beginning on the
// line (that has no arrival).  Where its connecting service leaves: a stop that is not the end of
// a service ending on the line.
std::optional<std::size_t> feeder_call(const Service& s, const std::string& station) {
    auto k = stop_at(s, station);
    if (k && *k == 0 && !s.enters_at_edge) return std::nullopt;
    return k;
}
std::optional<std::size_t> connecting_call(const Service& s, const std::string& station) {
    auto k = stop_at(s, station);
    if (k && *k + 1 == s.calls.size() && !s.leaves_at_edge) return std::nullopt;
    return k;
}

// The track a path uses at s: for an end, the piece reaching s from behind; for a start, the
// piece leaving s.
const std::string* track_at(const TrainPath& path, double s, bool ending) {
    for (const PathPiece& p : path.pieces)
        if (ending ? (p.s_from < s - 1e-6 && s <= p.s_to + 1e-6) : (p.s_from - 1e-6 <= s && s < p.s_to - 1e-6))
            return &p.track;
    return nullptr;
}

}  // namespace

std::optional<LinkCalls> link_calls(const ServiceLink& link, const Service& from, const Service& to) {
    if (link.kind == LinkKind::connection) {
        auto a = feeder_call(from, link.station);
        auto b = connecting_call(to, link.station);
        if (!a || !b) return std::nullopt;
        return LinkCalls{*a, *b};
    }
    if (!ends_on_line(from) || !starts_on_line(to)) return std::nullopt;
    if (link.kind == LinkKind::turnaround && from.calls.back().station != to.calls.front().station)
        return std::nullopt;
    return LinkCalls{from.calls.size() - 1, 0};
}

std::optional<std::string> link_problem(const ServicePaths& paths, const ServiceLink& link, const Service& from,
                                        const Service& to) {
    const std::string what = std::string(to_string(link.kind)) + " from " + from.id + " to " + to.id;
    if (from.id == to.id) return what + ": a service cannot be linked to itself";
    if (link.kind == LinkKind::connection) {
        if (!feeder_call(from, link.station))
            return what + ": " + from.id + " does not arrive at " + link.station +
                   " (it must stop there, and not start its run there)";
        if (!connecting_call(to, link.station))
            return what + ": " + to.id + " does not depart from " + link.station +
                   " (it must stop there, and not end its run there)";
        return std::nullopt;
    }
    if (!ends_on_line(from))
        return what + ": " + from.id + " runs on beyond the line end; it must end at a stop on the line";
    if (!starts_on_line(to))
        return what + ": " + to.id + " comes from beyond the line end; it must start at a stop on the line";
    if (link.kind == LinkKind::crew) return std::nullopt;
    const std::string& end = from.calls.back().station;
    const std::string& start = to.calls.front().station;
    if (end != start)
        return what + ": " + from.id + " ends at " + end + " but " + to.id + " starts at " + start +
               "; the set can only form a service where it stands (a crew link may join different places)";
    TrainPath a, b;
    try {
        a = paths.lay(from);
        b = paths.lay(to);
    } catch (const PathError&) {
        return std::nullopt;   // the path's own problem is reported with the service
    }
    if (a.timing_points.empty()) return std::nullopt;
    const std::string* ta = track_at(a, a.timing_points.back().s, true);
    const std::string* tb = track_at(b, 0.0, false);
    if (ta && tb && *ta != *tb)
        return what + ": " + from.id + " ends at " + end + " on track " + *ta + " but " + to.id +
               " starts on track " + *tb + "; a turnaround keeps the set on its platform track (give the "
               "calls a track " + std::string(from.direction == to.direction ? "" : "worked in both directions, ") +
               "that both use)";
    return std::nullopt;
}

}  // namespace knockon
