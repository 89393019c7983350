#include "models/single_track_plan.hpp"

#include <algorithm>
#include <optional>
#include <set>

#include "models/blocking_time.hpp"

namespace knockon {
namespace {

// One stretch's consecutive opposing runs: `first` releases the stretch at `place`, `second`
// then enters it from there.
struct Half {
    std::size_t stretch = 0, place = 0;
    StretchRun first, second;
};

// The planned stop of the run at a station of the place, or nullptr.
const PlannedCall* stop_at(const ServiceRun& run, const CrossingPlace& place) {
    for (const PlannedCall& c : run.calls) {
        if (!c.stops) continue;
        if (std::find(place.stations.begin(), place.stations.end(), c.station) != place.stations.end()) return &c;
    }
    return nullptr;
}

// Whether the path runs over any segment of a network track's axis between its start and end.
bool runs_over(const TrainPath& path, const std::vector<AxisSegment>& axis) {
    for (const PathRun& r : path.runs) {
        if (r.s_to <= 0.0 || r.s_from >= path.length) continue;
        for (const AxisSegment& a : axis)
            if (a.segment == r.segment) return true;
    }
    return false;
}

// The track the run uses at a loop place: on a network the one whose segments its path runs over;
// on a line a loop of the place its path runs through, else the main.  Nullptr at an end.
const CrossingTrack* track_at(const ServiceRun& run, const CrossingPlace& place) {
    if (place.tracks.empty()) return nullptr;
    for (const CrossingTrack& t : place.tracks)
        if (!t.axis.empty() && runs_over(run.path, t.axis)) return &t;
    for (const PathPiece& pc : run.path.pieces)
        for (const CrossingTrack& t : place.tracks)
            if (t.loop && t.axis.empty() && pc.track == t.track) return &t;
    return &place.tracks.front();
}

std::string track_name_at(const ServiceRun& run, const CrossingPlace& place) {
    const CrossingTrack* t = track_at(run, place);
    return t ? t->track : std::string();
}

// Whether `later` is the set of `earlier` turned back (models/blocking_time, turns_back): one set
// running in and out again, which meets no other train, so no crossing of two trains.
bool turned_back(const std::vector<TrainPlan>& trains, std::size_t earlier, std::size_t later) {
    for (const LinkPlan& l : trains[later].incoming)
        if (l.from == earlier && turns_back(l, trains[later].run)) return true;
    return false;
}

Crossing make_crossing(const SingleTrackLayout& layout, const std::vector<TrainPlan>& trains, const Half& h) {
    Crossing c;
    c.place = h.place;
    c.stretch = h.stretch;
    c.waiting = h.second.train;
    c.opposing = h.first.train;
    c.opposing_release = h.first.end;
    c.waiting_blocks = h.second.start;
    c.buffer = c.waiting_blocks - c.opposing_release;
    const CrossingPlace& place = layout.places[h.place];
    c.waiting_track = track_name_at(trains[c.waiting].run, place);
    c.waiting_stops = stop_at(trains[c.waiting].run, place) != nullptr;
    return c;
}

}  // namespace

std::optional<Direction> stretch_direction(const SingleTrackLayout& layout, std::size_t stretch, const TrainPath& path) {
    for (const StretchPass& p : stretch_passes(layout, path))
        if (p.stretch == stretch) return p.direction;
    return std::nullopt;
}

std::vector<StretchRun> stretch_runs(const SingleTrackLayout& layout, std::size_t stretch,
                                     const std::vector<TrainPlan>& trains) {
    const SingleTrackStretch& st = layout.stretches[stretch];
    std::vector<StretchRun> runs;
    for (std::size_t i = 0; i < trains.size(); ++i) {
        bool any = false;
        StretchRun r{i, stretch_direction(layout, stretch, trains[i].run.path).value_or(trains[i].run.path.direction),
                     0.0, 0.0};
        for (const SectionBlocking& b : trains[i].stairway.sections) {
            if (!st.has_section(b.section)) continue;
            r.start = any ? std::min(r.start, b.start) : b.start;
            r.end = any ? std::max(r.end, b.end) : b.end;
            any = true;
        }
        if (any) runs.push_back(r);
    }
    std::stable_sort(runs.begin(), runs.end(), [](const StretchRun& a, const StretchRun& b) {
        return a.start < b.start || (a.start == b.start && a.train < b.train);
    });
    return runs;
}

std::vector<Crossing> find_crossings(const SingleTrackLayout& layout, const std::vector<TrainPlan>& trains) {
    std::vector<Half> halves;
    for (std::size_t s = 0; s < layout.stretches.size(); ++s) {
        const SingleTrackStretch& st = layout.stretches[s];
        const std::vector<StretchRun> runs = stretch_runs(layout, s, trains);
        for (std::size_t k = 1; k < runs.size(); ++k)
            if (runs[k - 1].direction != runs[k].direction && !turned_back(trains, runs[k - 1].train, runs[k].train))
                halves.push_back({s, st.exit_place(runs[k - 1].direction), runs[k - 1], runs[k]});
    }
    // A crossing proper: each train arrives over the stretch the other leaves by.  The train that
    // arrives first waits; its half is the one whose releasing train arrives last.
    std::vector<bool> used(halves.size(), false);
    std::vector<Crossing> out;
    for (std::size_t i = 0; i < halves.size(); ++i) {
        if (used[i]) continue;
        const Half& h = halves[i];
        std::size_t partner = halves.size();
        for (std::size_t j = i + 1; j < halves.size() && partner == halves.size(); ++j) {
            const Half& g = halves[j];
            if (!used[j] && g.place == h.place && g.stretch != h.stretch && g.first.train == h.second.train &&
                g.second.train == h.first.train)
                partner = j;
        }
        used[i] = true;
        if (partner == halves.size()) {
            out.push_back(make_crossing(layout, trains, h));
            continue;
        }
        used[partner] = true;
        const Half& g = halves[partner];
        const bool h_main = h.first.end >= g.first.end;
        const Half& main = h_main ? h : g;
        const Half& other = h_main ? g : h;
        Crossing c = make_crossing(layout, trains, main);
        c.proper = true;
        c.other_stretch = other.stretch;
        c.other_buffer = other.second.start - other.first.end;
        out.push_back(c);
    }
    std::stable_sort(out.begin(), out.end(), [](const Crossing& a, const Crossing& b) {
        return a.place < b.place || (a.place == b.place && a.opposing_release < b.opposing_release);
    });
    return out;
}

std::vector<StretchCapacity> stretch_capacity(const SingleTrackLayout& layout, const std::vector<TrainPlan>& trains,
                                              LineType type) {
    const ConsumptionLimit limit = uic406_limit(type);
    std::vector<StretchCapacity> out;
    for (std::size_t s = 0; s < layout.stretches.size(); ++s) {
        const SingleTrackStretch& st = layout.stretches[s];
        // Each train's stairway on the stretch's sections, referred to its blocking start there.
        std::vector<SectionStairway> both, up, down;
        for (const StretchRun& r : stretch_runs(layout, s, trains)) {
            SectionStairway sw;
            sw.train = r.train;
            sw.reference = r.start;
            for (const SectionBlocking& b : trains[r.train].stairway.sections)
                if (st.has_section(b.section)) sw.sections.push_back(b);
            (r.direction == Direction::up ? up : down).push_back(sw);
            both.push_back(std::move(sw));
        }
        auto figure = [&](const char* window, const WindowConsumption& w, double lim) {
            const WindowConsumption u = window_consumption(up, w.from, w.to);
            const WindowConsumption d = window_consumption(down, w.from, w.to);
            return StretchCapacity{s, window, w.from, w.to, u.trains, d.trains, u.consumption, d.consumption,
                                   w.occupation, w.consumption, lim};
        };
        const WindowConsumption peak = peak_hour_consumption(both);
        if (peak.trains == 0) continue;
        out.push_back(figure("peak hour", peak, limit.peak));
        out.push_back(figure("day", day_consumption(both), limit.day));
    }
    return out;
}

std::vector<CrossingTooShort> crossings_too_short(const SingleTrackLayout& layout,
                                                  const std::vector<TrainPlan>& trains,
                                                  const std::vector<Crossing>& crossings) {
    std::vector<CrossingTooShort> out;
    std::set<std::pair<std::size_t, std::size_t>> seen;   // (train, place)
    for (std::size_t i = 0; i < crossings.size(); ++i) {
        const Crossing& c = crossings[i];
        const CrossingPlace& place = layout.places[c.place];
        if (place.kind != CrossingPlaceKind::loop) continue;
        for (std::size_t t : {c.waiting, c.opposing}) {
            const ServiceRun& run = trains[t].run;
            const PlannedCall* stop = stop_at(run, place);
            const CrossingTrack* track = track_at(run, place);
            if (!stop || !track || !seen.insert({t, c.place}).second) continue;
            const std::optional<AxisPosition> head = position_on(track->axis, run.path, stop->s);
            if (!head) continue;   // it stops at the place's station beyond the track it uses
            const StandingFit fit = standing_fit(track->x_lo, track->x_hi, head->x, head->direction, run.type->length);
            if (!fit.fits) out.push_back({i, t, track->track, head->x, fit.tail, track->x_lo, track->x_hi});
        }
    }
    return out;
}

}  // namespace knockon
