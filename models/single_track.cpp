#include "models/single_track.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>

#include "models/path.hpp"

namespace knockon {
namespace {

constexpr double kEps = 1e-6;

std::string km_name(double x) {
    char buf[32];
    std::snprintf(buf, sizeof buf, "km %.3f", x / 1000.0);
    return buf;
}

// Room on `track` between lo and hi for a train entering at lo (up) or hi (down): up to the first
// signal facing it there, where it must stand.
CrossingTrack crossing_track(const Infrastructure& infra, const Track& track, double lo, double hi) {
    CrossingTrack ct{track.id, track.is_loop(), lo, hi, hi - lo, hi - lo};
    for (const Signal& s : infra.signals) {
        if (s.track != track.id || s.at <= lo + kEps || s.at >= hi - kEps) continue;
        if (s.direction == Direction::up) ct.usable_up = std::min(ct.usable_up, s.at - lo);
        else ct.usable_down = std::min(ct.usable_down, hi - s.at);
    }
    if (!track.allows(Direction::up)) ct.usable_up = 0.0;
    if (!track.allows(Direction::down)) ct.usable_down = 0.0;
    return ct;
}

std::vector<std::string> stations_within(const Infrastructure& infra, double lo, double hi) {
    std::vector<const Station*> in;
    for (const Station& s : infra.stations)
        if (s.at >= lo - kEps && s.at <= hi + kEps) in.push_back(&s);
    std::stable_sort(in.begin(), in.end(), [](const Station* a, const Station* b) { return a->at < b->at; });
    std::vector<std::string> ids;
    for (const Station* s : in) ids.push_back(s->id);
    return ids;
}

// A loop place is named after its station nearest the middle of the loops.
std::string loop_place_name(const Infrastructure& infra, double lo, double hi) {
    const Station* best = nullptr;
    const double mid = 0.5 * (lo + hi);
    for (const Station& s : infra.stations)
        if (s.at >= lo - kEps && s.at <= hi + kEps && (!best || std::fabs(s.at - mid) < std::fabs(best->at - mid)))
            best = &s;
    return best ? best->id : km_name(mid);
}

// An end place is named after the station nearest it on the stretch it closes (a terminus), if any.
CrossingPlace end_place(const Infrastructure& infra, double at, CrossingPlaceKind kind, double other_end,
                        const char* fallback) {
    CrossingPlace p;
    p.kind = kind;
    p.x_lo = p.x_hi = at;
    const Station* best = nullptr;
    const double lo = std::min(at, other_end), hi = std::max(at, other_end);
    for (const Station& s : infra.stations)
        if (s.at >= lo - kEps && s.at <= hi + kEps && (!best || std::fabs(s.at - at) < std::fabs(best->at - at)))
            best = &s;
    if (best) {
        p.name = best->id;
        p.stations = {best->id};
    } else {
        p.name = kind == CrossingPlaceKind::line_end ? fallback : km_name(at);
    }
    return p;
}

void add_track(const Infrastructure& infra, const Track& main, SingleTrackLayout& out) {
    // The loops beside this track, overlapping ones merged into one place.
    std::vector<const Track*> loops;
    for (const Track& t : infra.tracks)
        if (t.is_loop() && t.parent == main.id) loops.push_back(&t);
    std::sort(loops.begin(), loops.end(), [](const Track* a, const Track* b) { return a->from < b->from; });
    std::vector<CrossingPlace> places;
    for (const Track* l : loops) {
        if (!places.empty() && l->from < places.back().x_hi - kEps) {
            places.back().x_hi = std::max(places.back().x_hi, l->to);
            continue;
        }
        CrossingPlace p;
        p.kind = CrossingPlaceKind::loop;
        p.x_lo = l->from;
        p.x_hi = l->to;
        places.push_back(p);
    }
    for (CrossingPlace& p : places) {
        p.name = loop_place_name(infra, p.x_lo, p.x_hi);
        p.stations = stations_within(infra, p.x_lo, p.x_hi);
        p.tracks.push_back(crossing_track(infra, main, p.x_lo, p.x_hi));
        for (const Track* l : loops)
            if (l->from >= p.x_lo - kEps && l->to <= p.x_hi + kEps)
                p.tracks.push_back(crossing_track(infra, *l, l->from, l->to));
    }
    // The ends of the single track: the line's ends, or where other main tracks take over.
    const bool starts_line = main.from <= kEps, ends_line = main.to >= infra.length - kEps;
    if (places.empty() || places.front().x_lo > main.from + kEps)
        places.insert(places.begin(),
                      end_place(infra, main.from,
                                starts_line ? CrossingPlaceKind::line_end : CrossingPlaceKind::track_end,
                                places.empty() ? main.to : places.front().x_lo, "line start"));
    if (places.back().x_hi < main.to - kEps)
        places.push_back(end_place(infra, main.to,
                                   ends_line ? CrossingPlaceKind::line_end : CrossingPlaceKind::track_end,
                                   places.back().x_hi, "line end"));

    const std::vector<double> bounds = section_boundaries(infra, main);
    const std::size_t first = out.places.size();
    for (CrossingPlace& p : places) out.places.push_back(std::move(p));
    for (std::size_t k = first; k + 1 < out.places.size(); ++k) {
        SingleTrackStretch st;
        st.track = main.id;
        st.lower = k;
        st.upper = k + 1;
        st.x_lo = out.places[k].x_hi;
        st.x_hi = out.places[k + 1].x_lo;
        if (st.x_hi - st.x_lo <= kEps) continue;
        st.name = out.places[k].name + "-" + out.places[k + 1].name;
        for (std::size_t b = 0; b + 1 < bounds.size(); ++b)
            if (bounds[b] >= st.x_lo - kEps && bounds[b + 1] <= st.x_hi + kEps)
                st.sections.push_back(section_id(main.id, bounds[b], bounds[b + 1]));
        out.stretches.push_back(std::move(st));
    }
}

}  // namespace

const char* to_string(CrossingPlaceKind k) {
    switch (k) {
        case CrossingPlaceKind::loop: return "loop";
        case CrossingPlaceKind::line_end: return "line end";
        case CrossingPlaceKind::track_end: return "end of single track";
    }
    return "?";
}

bool CrossingPlace::contains(double x) const { return x >= x_lo - kEps && x <= x_hi + kEps; }

bool SingleTrackStretch::has_section(const std::string& id) const {
    return std::find(sections.begin(), sections.end(), id) != sections.end();
}

const SingleTrackStretch* SingleTrackLayout::stretch_of_section(const std::string& id) const {
    for (const SingleTrackStretch& s : stretches)
        if (s.has_section(id)) return &s;
    return nullptr;
}

const CrossingPlace* SingleTrackLayout::place_at(double x) const {
    for (const CrossingPlace& p : places)
        if (p.kind == CrossingPlaceKind::loop && p.contains(x)) return &p;
    for (const CrossingPlace& p : places)
        if (p.contains(x)) return &p;
    return nullptr;
}

SingleTrackLayout single_track_layout(const Infrastructure& infra) {
    std::vector<const Track*> mains;
    for (const Track& t : infra.tracks)
        if (!t.is_loop() && t.up && t.down) mains.push_back(&t);
    std::sort(mains.begin(), mains.end(), [](const Track* a, const Track* b) { return a->from < b->from; });
    SingleTrackLayout out;
    for (const Track* t : mains) add_track(infra, *t, out);
    return out;
}

std::optional<AxisPosition> position_on(const std::vector<AxisSegment>& axis, const TrainPath& path, double s) {
    if (axis.empty()) return AxisPosition{path.chainage_at(s), path.direction};
    for (const PathRun& r : path.runs) {
        if (s < r.s_from - kEps || s > r.s_to + kEps) continue;
        for (const AxisSegment& a : axis) {
            if (a.segment != r.segment) continue;
            const double offset = r.offset_at(std::clamp(s, r.s_from, r.s_to));
            const bool up = r.heading == a.up;
            return AxisPosition{a.start + (a.up == net::Heading::forward ? offset : a.length - offset),
                                up ? Direction::up : Direction::down};
        }
    }
    return std::nullopt;
}

std::vector<StretchPass> stretch_passes(const SingleTrackLayout& layout, const TrainPath& path) {
    std::vector<StretchPass> out;
    for (std::size_t k = 0; k < path.sections.size(); ++k) {
        const SingleTrackStretch* st = layout.stretch_of_section(path.sections[k].id);
        if (!st) continue;
        const auto i = static_cast<std::size_t>(st - layout.stretches.data());
        if (out.empty() || out.back().stretch != i || out.back().end != k) out.push_back({i, k, k, path.direction});
        out.back().end = k + 1;
    }
    // The way the path runs in the middle of the first of its sections there that lies on the
    // stretch's own segments (a section may reach beyond the stretch's end into a place).
    for (StretchPass& p : out) {
        const SingleTrackStretch& st = layout.stretches[p.stretch];
        for (std::size_t k = p.first; k < p.end; ++k) {
            const double lo = std::max(path.sections[k].s_from, path.s_min), hi = std::min(path.sections[k].s_to, path.s_max);
            if (hi < lo) continue;
            if (const auto at = position_on(st.axis, path, 0.5 * (lo + hi))) {
                p.direction = at->direction;
                break;
            }
        }
    }
    return out;
}

StandingFit standing_fit(double lo, double hi, double head_x, Direction d, double length) {
    const double tail = d == Direction::up ? head_x - length : head_x + length;
    const bool head_in = head_x >= lo - kEps && head_x <= hi + kEps;
    const bool tail_in = tail >= lo - kEps && tail <= hi + kEps;
    return {tail, head_in && tail_in};
}

}  // namespace knockon
