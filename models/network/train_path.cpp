#include "models/network/train_path.hpp"

#include <algorithm>
#include <cmath>
#include <set>

namespace knockon::net {
namespace {

// A stretch of the laid path with where it starts along the path.
struct Placed {
    Stretch run;
    double s_from = 0.0;
    double s_at(double offset) const {
        return s_from + (run.heading == Heading::forward ? offset - run.from : run.from - offset);
    }
    double s_to() const { return s_at(run.to); }
};

// On from (segment, offset) in `h` for `distance` metres over the first way the graph gives, as
// far as the track goes.
std::vector<Stretch> walk_ahead(const NetworkGraph& g, Location at, Heading h, double distance) {
    std::vector<Stretch> out;
    for (;;) {
        const double end = g.offset_of(exit_end(at.segment, h));
        const double to_end = std::fabs(end - at.offset);
        if (distance <= to_end + kSamePlace) {
            append(out, {at.segment, at.offset, h == Heading::forward ? at.offset + distance : at.offset - distance, h});
            return out;
        }
        append(out, {at.segment, at.offset, end, h});
        distance -= to_end;
        const std::vector<EndRef> next = g.onward(exit_end(at.segment, h));
        auto way = std::find_if(next.begin(), next.end(),
                                [&](const EndRef& e) { return g.segment(e.segment).allows(heading_from(e)); });
        if (way == next.end()) return out;
        at = {way->segment, g.offset_of(*way)};
        h = heading_from(*way);
    }
}

// Back from (segment, offset) for `distance` metres against `h`, over the first way a train
// running in `h` could have come by: the stretches in running order, ending at the start.
std::vector<Stretch> walk_behind(const NetworkGraph& g, Location at, Heading h, double distance) {
    std::vector<Stretch> back;
    for (;;) {
        const double start = g.offset_of(entry_end(at.segment, h));
        const double to_start = std::fabs(at.offset - start);
        if (distance <= to_start + kSamePlace) {
            back.push_back({at.segment, h == Heading::forward ? at.offset - distance : at.offset + distance, at.offset, h});
            break;
        }
        back.push_back({at.segment, start, at.offset, h});
        distance -= to_start;
        const std::vector<EndRef> next = g.onward(entry_end(at.segment, h));
        auto way = std::find_if(next.begin(), next.end(),
                                [&](const EndRef& e) { return g.segment(e.segment).allows(opposite(heading_from(e))); });
        if (way == next.end()) break;
        at = {way->segment, g.offset_of(*way)};
        h = opposite(heading_from(*way));
    }
    std::vector<Stretch> out;
    for (auto it = back.rbegin(); it != back.rend(); ++it) append(out, *it);
    return out;
}

// The stretches of the laid path with their s: behind the start counted back from 0, the path
// and what lies ahead of it counted on from 0, stretches that run on from each other joined.
std::vector<Placed> place(const std::vector<Stretch>& rear, const std::vector<Stretch>& runs,
                          const std::vector<Stretch>& ahead) {
    std::vector<Placed> out;
    double s = 0.0;
    for (auto it = rear.rbegin(); it != rear.rend(); ++it) {
        s -= it->length();
        out.push_back({*it, s});
    }
    std::reverse(out.begin(), out.end());
    auto add = [&](const Stretch& r, double at) {
        if (out.empty() || !run_on(out.back().run, r)) out.push_back({r, at});
    };
    s = 0.0;
    for (const Stretch& r : runs) {
        add(r, s);
        s += r.length();
    }
    for (const Stretch& r : ahead) {
        add(r, s);
        s += r.length();
    }
    return out;
}

const std::string& name_of(const std::vector<std::string>& names, std::size_t i, const std::string& own) {
    return i < names.size() ? names[i] : own;
}

// Pieces: runs over one track, segments of one track name joined end to end as one.
void lay_pieces(const NetworkGraph& g, const PathNames& names, const std::vector<Placed>& placed, TrainPath& path) {
    for (const Placed& p : placed) {
        const Segment& seg = g.segment(p.run.segment);
        const std::string& track = name_of(names.tracks, p.run.segment, seg.name);
        const double x_from = seg.shown_at(p.run.from), x_to = seg.shown_at(p.run.to);
        if (!path.pieces.empty() && path.pieces.back().track == track &&
            std::fabs(path.pieces.back().x_to - x_from) < kSamePlace) {
            path.pieces.back().s_to = p.s_to();
            path.pieces.back().x_to = x_to;
            continue;
        }
        path.pieces.push_back({track, p.run.segment, p.s_from, p.s_to(), x_from, x_to});
    }
}

// A switch leg's (or diamond end's) speed, held over the node's own section along that end.
struct SpeedWindow {
    double s_from, s_to, speed;
};

std::vector<SpeedWindow> leg_speeds(const NetworkGraph& g, const std::vector<Placed>& placed) {
    std::vector<SpeedWindow> out;
    for (std::size_t k = 0; k + 1 < placed.size(); ++k) {
        const Placed& a = placed[k];
        const Placed& b = placed[k + 1];
        const NodeSlot leaving = g.node_at(exit_end(a.run.segment, a.run.heading));
        const NodeSlot entering = g.node_at(entry_end(b.run.segment, b.run.heading));
        if (leaving.node != entering.node) continue;
        const Node& nd = g.network().nodes[leaving.node];
        const double at = a.s_to();
        for (const auto& [slot, before] : {std::pair{leaving.slot, true}, std::pair{entering.slot, false}}) {
            const double speed = nd.ends[slot].speed, reach = nd.reach(slot);
            if (!std::isfinite(speed) || !(reach > 0.0)) continue;
            out.push_back(before ? SpeedWindow{at - reach, at, speed} : SpeedWindow{at, at + reach, speed});
        }
    }
    return out;
}

// Gradient and speed profiles, broken where a piece begins, where a band of a segment begins
// inside a stretch, where a band's value changes from one segment to the next, and at the ends
// of switch legs' speeds; each value taken in the middle of its interval.
void lay_profiles(const NetworkGraph& g, const std::vector<Placed>& placed, TrainPath& path) {
    std::vector<double> breaks;
    for (const PathPiece& pc : path.pieces) breaks.push_back(pc.s_from);
    for (std::size_t k = 0; k < placed.size(); ++k) {
        const Placed& p = placed[k];
        const Segment& seg = g.segment(p.run.segment);
        const double lo = std::min(p.run.from, p.run.to), hi = std::max(p.run.from, p.run.to);
        for (const auto* bands : {&seg.gradient, &seg.speed})
            for (const OffsetBand& b : *bands)
                if (b.from > lo + kSamePlace && b.from < hi - kSamePlace) breaks.push_back(p.s_at(b.from));
        if (k == 0) continue;
        const Placed& q = placed[k - 1];
        const Segment& before = g.segment(q.run.segment);
        if (before.gradient_at(q.run.to) != seg.gradient_at(p.run.from) || before.speed_at(q.run.to) != seg.speed_at(p.run.from))
            breaks.push_back(p.s_from);
    }
    const std::vector<SpeedWindow> windows = leg_speeds(g, placed);
    for (const SpeedWindow& w : windows)
        for (double s : {w.s_from, w.s_to})
            if (s > path.s_min && s < path.s_max) breaks.push_back(s);
    std::sort(breaks.begin(), breaks.end());
    breaks.erase(std::unique(breaks.begin(), breaks.end(), [](double a, double b) { return b - a < kSamePlace; }),
                 breaks.end());
    std::size_t at = 0;
    for (std::size_t k = 0; k < breaks.size(); ++k) {
        const double end = k + 1 < breaks.size() ? breaks[k + 1] : path.s_max;
        const double mid = 0.5 * (breaks[k] + end);   // inside the interval: no boundary ambiguity
        while (at + 1 < placed.size() && placed[at].s_to() <= mid) ++at;
        const Placed& p = placed[at];
        const double offset = p.run.heading == Heading::forward ? p.run.from + (mid - p.s_from) : p.run.from - (mid - p.s_from);
        const Segment& seg = g.segment(p.run.segment);
        const double sign = p.run.heading == Heading::forward ? 1.0 : -1.0;
        double speed = seg.speed_at(offset);
        for (const SpeedWindow& w : windows)
            if (mid > w.s_from && mid < w.s_to) speed = std::min(speed, w.speed);
        path.gradient.s.push_back(breaks[k]);
        path.gradient.value.push_back(sign * seg.gradient_at(offset));
        path.speed_limit.s.push_back(breaks[k]);
        path.speed_limit.value.push_back(speed);
    }
}

// The detection sections crossed, in order, one entry per section even across stretches.
// Every station timing point the runs pass within [0, length], in running order (a station once,
// where the path first meets it).
void lay_stations(const NetworkGraph& g, const std::vector<Placed>& placed, TrainPath& path) {
    const Network& n = g.network();
    std::vector<std::pair<double, std::size_t>> met;   // (s, station)
    for (const TimingPoint& tp : n.timing_points)
        for (const Placed& p : placed) {
            if (p.run.segment != tp.at.segment) continue;
            const double lo = std::min(p.run.from, p.run.to), hi = std::max(p.run.from, p.run.to);
            if (tp.at.offset < lo - kSamePlace || tp.at.offset > hi + kSamePlace) continue;
            const double s = p.s_at(tp.at.offset);
            if (s < -kSamePlace || s > path.length + kSamePlace) continue;
            met.emplace_back(s, tp.station);
            break;
        }
    std::sort(met.begin(), met.end());
    for (const auto& [s, station] : met) {
        const std::string& id = n.stations[station].id;
        if (std::none_of(path.stations.begin(), path.stations.end(),
                         [&](const StationPass& p) { return p.station == id; }))
            path.stations.push_back({id, s});
    }
}

void lay_sections(const NetworkGraph& g, const DetectionSections& sections, const PathNames& names,
                  const std::vector<Placed>& placed, TrainPath& path) {
    for (const Placed& p : placed) {
        const double lo = std::min(p.run.from, p.run.to), hi = std::max(p.run.from, p.run.to);
        for (std::size_t i : sections.crossed(p.run.segment, p.run.from, p.run.to)) {
            const DetectionSection& d = sections[i];
            double a = hi, b = lo;   // the section's extent on this stretch
            for (const SectionPiece& pc : d.pieces)
                if (pc.segment == p.run.segment && std::min(hi, pc.to) - std::max(lo, pc.from) > kSamePlace) {
                    a = std::min(a, std::max(lo, pc.from));
                    b = std::max(b, std::min(hi, pc.to));
                }
            double s_from = p.s_at(a), s_to = p.s_at(b);
            if (s_from > s_to) std::swap(s_from, s_to);
            if (!path.sections.empty() && path.sections.back().index == i) {
                path.sections.back().s_to = s_to;
                continue;
            }
            const SectionPiece& first = d.pieces.front();
            const Segment& seg = g.segment(first.segment);
            const double x0 = seg.shown_at(first.from), x1 = seg.shown_at(first.to);
            path.sections.push_back({name_of(names.sections, i, d.name), s_from, s_to, std::min(x0, x1), std::max(x0, x1), i});
        }
    }
}

// Main signals facing the train, in running order.
void lay_signals(const NetworkGraph& g, const std::vector<Placed>& placed, TrainPath& path) {
    const Network& net = g.network();
    std::set<std::size_t> seen;
    for (const Placed& p : placed) {
        const double lo = std::min(p.run.from, p.run.to), hi = std::max(p.run.from, p.run.to);
        for (std::size_t i : g.signals_on(p.run.segment)) {
            const Signal& sig = net.signals[i];
            if (sig.heading != p.run.heading || sig.at.offset < lo - kSamePlace || sig.at.offset > hi + kSamePlace) continue;
            if (!seen.insert(i).second) continue;
            path.signals.push_back({i, sig, p.s_at(sig.at.offset), sig.system});
        }
    }
    std::stable_sort(path.signals.begin(), path.signals.end(),
                     [](const PathSignal& a, const PathSignal& b) { return a.s < b.s; });
}

}  // namespace

TrainPath train_path(const NetworkGraph& g, const DetectionSections& sections, const PathNames& names,
                     const PathRequest& request, const NetworkPath& path, const PathReach& reach) {
    std::vector<Stretch> runs;
    for (const PathStep& step : path.steps) {
        if (step.kind == PathStep::Kind::reversal)
            throw NetworkError("the path reverses at call " + std::to_string(step.call + 1) +
                               "; a train path runs in one heading");
        runs.push_back(step.run);
    }
    const Location start = runs.empty() ? path.calls.front().at : Location{runs.front().segment, runs.front().from};
    const Heading heading = runs.empty() ? path.calls.front().heading : runs.front().heading;
    const Location end = runs.empty() ? start : Location{runs.back().segment, runs.back().to};
    const Heading end_heading = runs.empty() ? heading : runs.back().heading;
    const std::vector<Placed> placed = place(walk_behind(g, start, heading, reach.rear), runs,
                                             walk_ahead(g, end, end_heading, reach.ahead));
    if (placed.empty()) throw NetworkError("the path has no length");

    TrainPath out;
    out.direction = heading == Heading::forward ? Direction::up : Direction::down;
    out.length = path.length;
    out.starts_at_edge = request.enters_at != kNone;
    out.ends_at_edge = request.leaves_at != kNone;
    out.s_min = placed.front().s_from;
    out.s_max = placed.back().s_to();
    lay_pieces(g, names, placed, out);
    for (const Placed& p : placed) out.runs.push_back({p.run.segment, p.run.from, p.run.to, p.run.heading, p.s_from, p.s_to()});
    lay_sections(g, sections, names, placed, out);
    lay_signals(g, placed, out);
    lay_profiles(g, placed, out);
    for (std::size_t k = 0; k < path.calls.size(); ++k)
        out.timing_points.push_back({k, path.calls[k].s, request.calls[k].stops});
    lay_stations(g, placed, out);
    return out;
}

}  // namespace knockon::net
