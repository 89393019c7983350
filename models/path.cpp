#include "models/path.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <limits>
#include <map>
#include <set>
#include <utility>

namespace knockon {
namespace {

const double kEps = 1e-6;

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

double TrainPath::station_s(const std::string& station) const {
    for (const StationPass& p : stations)
        if (p.station == station) return p.s;
    return std::numeric_limits<double>::quiet_NaN();
}

namespace {

// The segments a path runs over within section `id` (runs of positive length inside it), with the
// heading on each, in running order.
std::vector<std::pair<std::size_t, net::Heading>> runs_over(const TrainPath& path, const std::string& id) {
    constexpr double kEps = 1e-6;
    std::vector<std::pair<std::size_t, net::Heading>> out;
    for (const PathSection& sec : path.sections) {
        if (sec.id != id) continue;
        for (const PathRun& r : path.runs)
            if (std::min(r.s_to, sec.s_to) - std::max(r.s_from, sec.s_from) > kEps) out.push_back({r.segment, r.heading});
    }
    return out;
}

}  // namespace

SectionMeeting section_meeting(const TrainPath& a, const TrainPath& b, const std::string& section) {
    const auto over_b = runs_over(b, section);
    for (const auto& [segment, heading] : runs_over(a, section))
        for (const auto& [other, other_heading] : over_b)
            if (other == segment) return heading == other_heading ? SectionMeeting::same : SectionMeeting::opposing;
    return SectionMeeting::apart;
}

double TrainPath::gradient_at(double s) const { return gradient.at(s); }

ProfileStretch TrainPath::steepest_fall(double from, double to) const { return gradient.lowest(from, to); }

double TrainPath::speed_limit_at(double s) const { return speed_limit.at(s); }

}  // namespace knockon
