#include "tools/report/diagram_axis.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <map>
#include <set>

#include "tools/report/plan_charts.hpp"
#include "tools/results/plan_output.hpp"
#include "tools/report/svg.hpp"

namespace knockon {

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

std::string km(double metres) { return svg::number(metres / 1000.0, 3); }

// A line: chainage down the page, loops beside their main track drawn offset.
class LineAxis : public DiagramAxis {
public:
    explicit LineAxis(const Infrastructure& infra) : infra_(infra) {
        axis_label = "chainage [km], increasing downwards";
        signal_legend = "main signal: left column up, right column down direction";
        length = std::max(infra.length, 1.0);
        for (const Station& st : infra.stations)
            stations.push_back({st.id, st.name.empty() ? st.id : st.name, st.at, "km " + km(st.at)});
        for (const Signal& s : infra.signals)
            signals.push_back({s.at, s.direction == Direction::up,
                               "signal " + s.id + " (" + to_string(s.direction) + "), track " + s.track + ", km " +
                                   km(s.at)});
        for (const Track& t : infra.tracks)
            if (t.is_loop())
                bands.push_back({t.from, t.to,
                                 "loop " + t.id + " beside " + t.parent + ", km " + km(t.from) + " to " + km(t.to) +
                                     " (trains on it drawn offset)"});
    }

    std::vector<AxisPoint> planned(std::size_t, const TrainPlan& tp, double from, double to,
                                   double step) const override {
        std::vector<AxisPoint> out;
        for (const svg::Point& p : train_path_points(tp.run, {from, to}, step))
            out.push_back({p.x, p.y, on_loop_at(tp.run, p.y) ? 1 : 0});
        return out;
    }
    std::optional<AxisSpan> route(std::size_t, const TrainPlan& tp, const RouteBlocking& r) const override {
        const ChainageSpan span = route_span(tp, r);
        return AxisSpan{span.lo, span.hi};
    }
    std::optional<AxisSpan> section(std::size_t, const TrainPlan&, const SectionBlocking& b) const override {
        return AxisSpan{b.x_lo, b.x_hi};
    }
    double as_run(std::size_t, double y) const override { return y; }
    bool downwards(std::size_t, const TrainPlan& tp) const override {
        return tp.run.path.direction == Direction::up;
    }
    std::string offset_note(std::size_t, const TrainPlan& tp) const override {
        return tp.run.service->id + " on a loop track";
    }

private:
    // Whether the run is on a loop track where its head is at chainage x.
    bool on_loop_at(const ServiceRun& run, double x) const {
        for (const PathPiece& pc : run.path.pieces) {
            const double lo = std::min(pc.x_from, pc.x_to), hi = std::max(pc.x_from, pc.x_to);
            const Track* track = infra_.find_track(pc.track);
            if (track && track->is_loop() && x > lo + 1e-6 && x < hi - 1e-6) return true;
        }
        return false;
    }
    const Infrastructure& infra_;
};

// A corridor of a network: its stations at their distances along the trains' paths; at a
// crossing place (models/single_track: a loop of the single-track layout) a train on the
// place's k-th track is drawn k offsets aside, so a crossing reads as two trains side by side.
class CorridorDiagram : public DiagramAxis {
public:
    CorridorDiagram(const Scenario& scenario, const PlanResult& plan, const CorridorAxis& corridor)
        : corridor_(corridor) {
        name = corridor.name;
        axis_label = "distance along " + corridor.name + " [km], increasing downwards";
        signal_legend = "main signal: left column for trains running down the page, right column up it";
        length = std::max(corridor.length(), 1.0);
        for (const CorridorStation& st : corridor.stations)
            stations.push_back({st.id, station_name(scenario, st.id), st.at,
                                "km " + km(st.at) + " along " + corridor.name});
        for (const CrossingPlace& place : plan.single_track.places)
            if (place.kind == CrossingPlaceKind::loop && place.tracks.size() > 1)
                for (std::size_t k = 0; k < place.tracks.size(); ++k) slot_of_[place.tracks[k].track] = {&place, k};
        std::set<std::size_t> signals_seen;
        std::map<const CrossingPlace*, AxisSpan> band_of;
        for (const CorridorRun& run : corridor.runs) {
            const TrainPath& path = plan.trains[run.train].run.path;
            for (const PathSignal& ps : path.signals) {
                if (!(ps.s >= run.s_from() && ps.s <= run.s_to()) || !signals_seen.insert(ps.index).second) continue;
                const double at = run.position(ps.s);
                signals.push_back({at, run.along,
                                   "signal " + ps.signal.name + " (" + (run.along ? "down" : "up") + " the diagram), km " +
                                       km(at) + " along " + corridor.name});
            }
            for (const PathPiece& pc : path.pieces) {
                const auto it = slot_of_.find(pc.track);
                const double lo = std::max(pc.s_from, run.s_from()), hi = std::min(pc.s_to, run.s_to());
                if (it == slot_of_.end() || !(hi > lo)) continue;
                const double a = run.position(lo), b = run.position(hi);
                auto [band, fresh] = band_of.insert({it->second.first, {std::min(a, b), std::max(a, b)}});
                if (!fresh) band->second = {std::min({band->second.lo, a, b}), std::max({band->second.hi, a, b})};
            }
        }
        for (const auto& [place, span] : band_of) {
            std::string tracks;
            for (std::size_t k = 0; k < place->tracks.size(); ++k)
                tracks += (k ? ", " : "") + place->tracks[k].track + (k ? " (drawn offset)" : "");
            bands.push_back({span.lo, span.hi, "crossing place " + place->name + ": tracks " + tracks});
        }
        std::sort(bands.begin(), bands.end(), [](const AxisBand& a, const AxisBand& b) { return a.from < b.from; });
    }

    std::vector<AxisPoint> planned(std::size_t train, const TrainPlan& tp, double from, double to,
                                   double step) const override {
        std::vector<AxisPoint> out;
        const CorridorRun* run = corridor_.run_of(train);
        if (!run) return out;
        for (const svg::Point& p : train_path_positions(tp.run, {from, to}, step, run->s_from(), run->s_to()))
            out.push_back({p.x, run->position(p.y), slot_at(tp.run.path, p.y)});
        return out;
    }
    std::optional<AxisSpan> route(std::size_t train, const TrainPlan& tp, const RouteBlocking& r) const override {
        const double lo = r.s_entry, hi = r.s_exit + r.overlap;
        double from = INFINITY, to = -INFINITY;
        for (const SectionBlocking& b : tp.stairway.sections)
            if (std::min(hi, b.s_to) - std::max(lo, b.s_from) > 1e-6) {
                from = std::min(from, b.s_from);
                to = std::max(to, b.s_to);
            }
        if (from > to) return std::nullopt;
        return span(train, from, to);
    }
    std::optional<AxisSpan> section(std::size_t train, const TrainPlan&, const SectionBlocking& b) const override {
        return span(train, b.s_from, b.s_to);
    }
    double as_run(std::size_t train, double y) const override {
        const CorridorRun* run = corridor_.run_of(train);
        return run ? run->position(y) : kNaN;
    }
    bool downwards(std::size_t train, const TrainPlan&) const override {
        const CorridorRun* run = corridor_.run_of(train);
        return !run || run->along;
    }
    std::string offset_note(std::size_t, const TrainPlan& tp) const override {
        std::string tracks;
        for (const PathPiece& pc : tp.run.path.pieces) {
            const auto it = slot_of_.find(pc.track);
            if (it != slot_of_.end() && it->second.second > 0)
                tracks += (tracks.empty() ? "" : ", ") + pc.track + " at " + it->second.first->name;
        }
        return tp.run.service->id + " on track " + tracks;
    }

private:
    // The part of [from, to] (along the train's path) that lies on the corridor, on the axis.
    std::optional<AxisSpan> span(std::size_t train, double from, double to) const {
        const CorridorRun* run = corridor_.run_of(train);
        if (!run) return std::nullopt;
        const double lo = std::max(from, run->s_from()), hi = std::min(to, run->s_to());
        if (!(hi > lo)) return std::nullopt;
        const double a = run->position(lo), b = run->position(hi);
        return AxisSpan{std::min(a, b), std::max(a, b)};
    }
    int slot_at(const TrainPath& path, double s) const {
        for (const PathPiece& pc : path.pieces)
            if (s > pc.s_from + 1e-6 && s < pc.s_to - 1e-6) {
                const auto it = slot_of_.find(pc.track);
                return it == slot_of_.end() ? 0 : static_cast<int>(it->second.second);
            }
        return 0;
    }
    CorridorAxis corridor_;
    std::map<std::string, std::pair<const CrossingPlace*, std::size_t>> slot_of_;   // track -> place, index
};

}  // namespace

std::unique_ptr<DiagramAxis> line_axis(const Infrastructure& infra) { return std::make_unique<LineAxis>(infra); }

std::unique_ptr<DiagramAxis> corridor_diagram_axis(const Scenario& scenario, const PlanResult& plan,
                                                   const CorridorAxis& corridor) {
    return std::make_unique<CorridorDiagram>(scenario, plan, corridor);
}

std::vector<std::unique_ptr<DiagramAxis>> diagram_axes(const Scenario& scenario, const PlanResult& plan) {
    std::vector<std::unique_ptr<DiagramAxis>> out;
    if (!scenario.network) {
        out.push_back(line_axis(scenario.infrastructure));
        return out;
    }
    for (const CorridorAxis& c : corridor_axes(scenario, plan)) out.push_back(corridor_diagram_axis(scenario, plan, c));
    return out;
}

}  // namespace knockon
