#include "models/path.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <limits>
#include <map>
#include <set>

namespace knockon {
namespace {

// Progress coordinate p: distance travelled in the service's direction from chainage 0 (up) or
// from the far end (down).  Working in p lets one walk serve both directions.
struct Axis {
    Direction dir;
    double length;
    double to_p(double x) const { return dir == Direction::up ? x : length - x; }
    double to_x(double p) const { return dir == Direction::up ? p : length - p; }
};

const double kEps = 1e-6;

// A loop the service is routed through, in progress coordinates.
struct LoopUse {
    const Track* track;
    double p_from, p_to;
};

}  // namespace

std::vector<double> section_boundaries(const Infrastructure& infra, const Track& track) {
    std::vector<double> b{track.from, track.to};
    auto add_if_on = [&](double x) {
        if (x > track.from + kEps && x < track.to - kEps) b.push_back(x);
    };
    for (const Signal& sig : infra.signals) {
        // Signal positions split sections on their own track.
        if (sig.track == track.id) add_if_on(sig.at);
        // The overlap end is a clearing point: it bounds a section on whichever track it falls.
        double end = sig.direction == Direction::up ? sig.at + sig.overlap : sig.at - sig.overlap;
        if (sig.overlap <= 0.0) continue;
        const Track* own = infra.find_track(sig.track);
        bool on_own = own && end >= own->from - kEps && end <= own->to + kEps;
        if (on_own) {
            if (sig.track == track.id) add_if_on(end);
        } else if (own && own->is_loop() && own->parent == track.id) {
            add_if_on(end);
        } else if (!track.is_loop() && own && !own->is_loop() && track.allows(sig.direction)) {
            add_if_on(end);  // overlap running on from one main track into the next
        }
    }
    // Turnouts: a loop's ends split its parent.
    for (const Track& t : infra.tracks)
        if (t.parent == track.id) {
            add_if_on(t.from);
            add_if_on(t.to);
        }
    for (const auto& [tid, x] : infra.extra_joints)
        if (tid == track.id) add_if_on(x);
    std::sort(b.begin(), b.end());
    b.erase(std::unique(b.begin(), b.end(), [](double a, double c) { return std::fabs(a - c) < kEps; }),
            b.end());
    return b;
}

namespace {

std::string km(double x) {
    char buf[32];
    std::snprintf(buf, sizeof buf, "%.3f", x / 1000.0);
    return buf;
}

// Gradient and speed-limit profiles along the path, from the chainage bands and track limits, so
// that the running-time integration looks them up by a short binary search.
void build_profiles(const Infrastructure& infra, const Axis& axis, double p_start, TrainPath& path) {
    std::vector<double> breaks;
    for (const PathPiece& pc : path.pieces) {
        breaks.push_back(pc.s_from);
        double xlo = std::min(pc.x_from, pc.x_to), xhi = std::max(pc.x_from, pc.x_to);
        for (const auto* bands : {&infra.gradients, &infra.speed_limits})
            for (const ChainageBand& b : *bands)
                for (double x : {b.from, b.to})
                    if (x > xlo + kEps && x < xhi - kEps) breaks.push_back(axis.to_p(x) - p_start);
    }
    std::sort(breaks.begin(), breaks.end());
    breaks.erase(std::unique(breaks.begin(), breaks.end(), [](double a, double b) { return b - a < kEps; }),
                 breaks.end());
    const double sign = path.direction == Direction::up ? 1.0 : -1.0;
    for (std::size_t k = 0; k < breaks.size(); ++k) {
        const double end = k + 1 < breaks.size() ? breaks[k + 1] : path.s_max;
        const double mid = 0.5 * (breaks[k] + end);  // inside the interval: no boundary ambiguity
        const double x = axis.to_x(mid + p_start);
        const Track* track = nullptr;
        for (const PathPiece& pc : path.pieces)
            if (mid < pc.s_to || &pc == &path.pieces.back()) {
                track = pc.track;
                break;
            }
        path.gradient.s.push_back(breaks[k]);
        path.gradient.value.push_back(sign * infra.gradient_at(x));
        path.speed_limit.s.push_back(breaks[k]);
        path.speed_limit.value.push_back(std::min(infra.line_speed_at(x), track->speed_limit));
    }
}

}  // namespace

double PathProfile::at(double pos) const {
    auto it = std::upper_bound(s.begin(), s.end(), pos);
    return value[it == s.begin() ? 0 : static_cast<std::size_t>(it - s.begin()) - 1];
}

ProfileStretch PathProfile::lowest(double from, double to) const {
    constexpr double kInf = std::numeric_limits<double>::infinity();
    ProfileStretch best{kInf, from, to};
    for (std::size_t k = 0; k < value.size(); ++k) {
        const double lo = k == 0 ? -kInf : s[k];
        const double hi = k + 1 < s.size() ? s[k + 1] : kInf;
        if (lo > to || hi <= from) continue;   // no part of [from, to]
        if (value[k] < best.value) best = {value[k], std::max(lo, from), std::min(hi, to)};
    }
    return best;
}

std::string section_id(const std::string& track, double x_from, double x_to) {
    return track + ":" + km(x_from) + "-" + km(x_to);
}

TrainPath build_path(const Infrastructure& infra, const Service& service, double rear, double ahead) {
    if (service.calls.empty()) throw PathError("service has no calls");
    const Axis axis{service.direction, infra.length};
    TrainPath path;
    path.infrastructure = &infra;
    path.direction = service.direction;
    path.starts_at_edge = service.enters_at_edge;
    path.ends_at_edge = service.leaves_at_edge;

    auto station_p = [&](const Call& c) {
        const Station* st = infra.find_station(c.station);
        if (!st) throw PathError("unknown station '" + c.station + "'");
        return axis.to_p(st->at);
    };
    const double p_start = service.enters_at_edge ? 0.0 : station_p(service.calls.front());
    const double p_end = service.leaves_at_edge ? infra.length : station_p(service.calls.back());
    if (p_end < p_start - kEps)
        throw PathError("the calls run against the service's direction (" +
                        std::string(to_string(service.direction)) + ")");

    // Loops the calls ask for, in running order.
    std::vector<LoopUse> loops;
    for (const Call& c : service.calls) {
        if (c.track.empty()) continue;
        const Track* t = infra.find_track(c.track);
        if (!t) throw PathError("call at " + c.station + ": unknown track '" + c.track + "'");
        if (!t->allows(service.direction))
            throw PathError("call at " + c.station + ": track " + t->id + " is not worked in the " +
                            to_string(service.direction) + " direction");
        double sp = station_p(c);
        double a = axis.to_p(t->from), b = axis.to_p(t->to);
        if (a > b) std::swap(a, b);
        if (sp < a - kEps || sp > b + kEps)
            throw PathError("call at " + c.station + ": track " + t->id + " does not pass the station");
        if (!t->is_loop()) continue;  // a main track is the default anyway
        if (!loops.empty() && a < loops.back().p_to - kEps)
            throw PathError("call at " + c.station + ": loop " + t->id + " overlaps the previous loop used");
        loops.push_back({t, a, b});
    }

    // Walk from the rear of the layout to beyond the end, choosing main track or loop.
    const double p_lo = std::max(0.0, p_start - rear);
    const double p_hi = std::min(infra.length, p_end + ahead);
    double p = p_lo;
    std::size_t next_loop = 0;
    while (p < p_hi - kEps) {
        while (next_loop < loops.size() && loops[next_loop].p_to <= p + kEps) ++next_loop;
        PathPiece piece;
        double piece_end;
        if (next_loop < loops.size() && loops[next_loop].p_from <= p + kEps) {
            piece.track = loops[next_loop].track;
            piece_end = std::min(loops[next_loop].p_to, p_hi);
        } else {
            // Probe just ahead of p so that a junction between two main tracks picks the next.
            double probe = std::min(p + 0.5, (p + p_hi) / 2.0);
            const Track* main = infra.main_track_at(axis.to_x(probe), service.direction);
            if (!main)
                throw PathError("no main track for the " + std::string(to_string(service.direction)) +
                                " direction at " + km(axis.to_x(probe)) + " km");
            piece.track = main;
            double a = axis.to_p(main->from), b = axis.to_p(main->to);
            piece_end = std::min(std::max(a, b), p_hi);
            if (next_loop < loops.size()) piece_end = std::min(piece_end, loops[next_loop].p_from);
        }
        if (piece_end <= p + kEps) throw PathError("track layout does not connect at " + km(axis.to_x(p)) + " km");
        piece.s_from = p - p_start;
        piece.s_to = piece_end - p_start;
        piece.x_from = axis.to_x(p);
        piece.x_to = axis.to_x(piece_end);
        path.pieces.push_back(piece);
        p = piece_end;
    }
    if (path.pieces.empty()) throw PathError("the path has no length");
    path.s_min = p_lo - p_start;
    path.s_max = p_hi - p_start;
    path.length = p_end - p_start;
    if (path.s_max < path.length - kEps) throw PathError("the path runs beyond the line");

    // Detection sections crossed, in order (one entry per section even across piece joins).
    std::map<std::string, std::vector<double>> bounds_cache;
    for (const PathPiece& pc : path.pieces) {
        auto& bounds = bounds_cache[pc.track->id];
        if (bounds.empty()) bounds = section_boundaries(infra, *pc.track);
        double plo = std::min(axis.to_p(pc.x_from), axis.to_p(pc.x_to));
        double phi = std::max(axis.to_p(pc.x_from), axis.to_p(pc.x_to));
        std::vector<PathSection> local;
        for (std::size_t k = 0; k + 1 < bounds.size(); ++k) {
            double a = axis.to_p(bounds[k]), b = axis.to_p(bounds[k + 1]);
            if (a > b) std::swap(a, b);
            double lo = std::max(a, plo), hi = std::min(b, phi);
            if (hi - lo <= kEps) continue;
            local.push_back({section_id(pc.track->id, bounds[k], bounds[k + 1]), lo - p_start, hi - p_start,
                             bounds[k], bounds[k + 1], pc.track});
        }
        std::sort(local.begin(), local.end(),
                  [](const PathSection& l, const PathSection& r) { return l.s_from < r.s_from; });
        for (auto& sec : local) {
            if (!path.sections.empty() && path.sections.back().id == sec.id)
                path.sections.back().s_to = sec.s_to;
            else
                path.sections.push_back(sec);
        }
    }

    // Main signals facing the train.
    std::set<const Signal*> seen;
    for (const PathPiece& pc : path.pieces) {
        double xlo = std::min(pc.x_from, pc.x_to), xhi = std::max(pc.x_from, pc.x_to);
        for (const Signal& sig : infra.signals) {
            if (sig.track != pc.track->id || sig.direction != service.direction) continue;
            if (sig.at < xlo - kEps || sig.at > xhi + kEps || !seen.insert(&sig).second) continue;
            path.signals.push_back({&sig, axis.to_p(sig.at) - p_start, infra.aspect_system_at(sig.at)});
        }
    }
    std::sort(path.signals.begin(), path.signals.end(),
              [](const PathSignal& a, const PathSignal& b) { return a.s < b.s; });

    build_profiles(infra, axis, p_start, path);

    for (std::size_t i = 0; i < service.calls.size(); ++i)
        path.timing_points.push_back({i, station_p(service.calls[i]) - p_start, service.calls[i].stops});
    for (std::size_t i = 1; i < path.timing_points.size(); ++i)
        if (path.timing_points[i].s < path.timing_points[i - 1].s - kEps)
            throw PathError("call at " + service.calls[i].station + " lies behind the previous call");
    return path;
}

namespace {
const PathPiece& piece_at(const TrainPath& path, double s) {
    // Pieces are few; a linear scan from the back is fine and handles s beyond the ends.
    for (const PathPiece& pc : path.pieces)
        if (s < pc.s_to) return pc;
    return path.pieces.back();
}
}  // namespace

double TrainPath::chainage_at(double s) const {
    const PathPiece& pc = piece_at(*this, s);
    double span = pc.s_to - pc.s_from;
    double f = span > 0 ? (s - pc.s_from) / span : 0.0;
    return pc.x_from + f * (pc.x_to - pc.x_from);
}

double TrainPath::s_at_chainage(double x) const {
    for (const PathPiece& pc : pieces) {
        double lo = std::min(pc.x_from, pc.x_to), hi = std::max(pc.x_from, pc.x_to);
        if (x < lo - kEps || x > hi + kEps) continue;
        double s = pc.s_from + std::fabs(x - pc.x_from);
        if (s >= -kEps && s <= length + kEps) return s;
    }
    return std::numeric_limits<double>::quiet_NaN();
}

// The profiles are a cache of the direct look-up below; a path laid by hand (tests) has none.
double TrainPath::gradient_at(double s) const {
    if (!gradient.s.empty()) return gradient.at(s);
    double g = infrastructure->gradient_at(chainage_at(s));
    return direction == Direction::up ? g : -g;
}

ProfileStretch TrainPath::steepest_fall(double from, double to) const {
    if (!gradient.s.empty()) return gradient.lowest(from, to);
    // A path laid by hand without profiles: the bands of the line, as gradient_at reads them.
    ProfileStretch best{gradient_at(from), from, to};
    for (const ChainageBand& b : infrastructure->gradients) {
        const double sa = s_at_chainage(b.from), sb = s_at_chainage(b.to);
        for (double at : {sa, sb})
            if (std::isfinite(at) && at > from && at < to && gradient_at(at) < best.value)
                best = {gradient_at(at), at, to};
    }
    return best;
}

double TrainPath::speed_limit_at(double s) const {
    if (!speed_limit.s.empty()) return speed_limit.at(s);
    const PathPiece& pc = piece_at(*this, s);
    return std::min(infrastructure->line_speed_at(chainage_at(s)), pc.track->speed_limit);
}

}  // namespace knockon
