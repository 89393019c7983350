#include "tools/report/as_run.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <limits>
#include <map>
#include <stdexcept>
#include <tuple>

#include "tools/results/attribution_output.hpp"

namespace knockon {

namespace {

std::map<std::string, std::size_t> plan_index(const PlanResult& plan) {
    std::map<std::string, std::size_t> out;
    for (std::size_t i = 0; i < plan.trains.size(); ++i) out.emplace(plan.trains[i].run.service->id, i);
    return out;
}

std::string minutes_text(double s) {
    char buf[48];
    std::snprintf(buf, sizeof buf, "%.1f min", s / 60.0);
    return buf;
}

}  // namespace

double median(std::vector<double> v) {
    if (v.empty()) return std::numeric_limits<double>::quiet_NaN();
    std::sort(v.begin(), v.end());
    const std::size_t n = v.size();
    return n % 2 ? v[n / 2] : (v[n / 2 - 1] + v[n / 2]) / 2.0;
}

std::optional<ReplicationChoice> choose_replication(const std::vector<ReplicationStats>& per_day,
                                                    const std::vector<std::uint32_t>& traced,
                                                    std::optional<std::uint32_t> requested) {
    if (requested) {
        if (std::find(traced.begin(), traced.end(), *requested) == traced.end()) {
            std::string list;
            for (std::size_t i = 0; i < traced.size() && i < 20; ++i) list += (i ? ", " : "") + std::to_string(traced[i]);
            if (traced.size() > 20) list += ", ...";
            throw std::invalid_argument("replication " + std::to_string(*requested) + " was not traced; " +
                                        (traced.empty() ? std::string("the file holds no traced day")
                                                        : "traced: " + list));
        }
        return ReplicationChoice{*requested, "replication " + std::to_string(*requested) + ", as asked for"};
    }
    if (traced.empty()) return std::nullopt;
    // Deadlocked days are no typical day: they enter neither the median nor the choice.
    std::vector<double> all;
    std::map<std::uint32_t, double> knock_on;
    std::size_t deadlocked_traced = 0;
    for (const ReplicationStats& r : per_day) {
        if (r.deadlocked) {
            deadlocked_traced += std::count(traced.begin(), traced.end(), r.replication);
            continue;
        }
        all.push_back(r.total_knock_on);
        knock_on[r.replication] = r.total_knock_on;
    }
    const double m = median(all);
    std::optional<std::uint32_t> best;
    double best_gap = INFINITY;
    for (std::uint32_t k : traced) {   // ascending: the lower number wins a tie
        const auto it = knock_on.find(k);
        if (it == knock_on.end()) continue;
        const double gap = std::abs(it->second - m);
        if (gap < best_gap) {
            best_gap = gap;
            best = k;
        }
    }
    if (!best) best = traced.front();   // no complete traced day (or no per-day figures): the first one
    const auto it = knock_on.find(*best);
    std::string reason = "replication " + std::to_string(*best) + ", the traced day";
    if (it != knock_on.end() && std::isfinite(m))
        reason += " whose knock-on delay (" + minutes_text(it->second) + ") is nearest the median over all " +
                  std::to_string(all.size()) + " complete days (" + minutes_text(m) + ")";
    else if (deadlocked_traced == traced.size())
        reason += " first traced: every traced day ended in deadlock";
    if (deadlocked_traced > 0 && deadlocked_traced < traced.size())
        reason += "; " + std::to_string(deadlocked_traced) + " traced day" + (deadlocked_traced == 1 ? "" : "s") +
                  " that ended in deadlock left out";
    reason += "; " + std::to_string(traced.size()) + " day" + (traced.size() == 1 ? " was" : "s were") +
              " traced; --replication K draws another";
    return ReplicationChoice{*best, reason};
}

namespace {

// The overlay of `day` in the coordinate `where` gives: a line's chainage, or a network's distance
// along each train's path.  `where` says where a train's stop at a station, its stand at a signal,
// its head on entering or leaving a section and a trajectory sample lie (NaN: not known), and the
// ends of its path.
template <class Where>
AsRunOverlay overlay_in(const SimResult& day, const PlanResult& plan, const std::string& label, const Where& where) {
    AsRunOverlay out;
    out.label = label;
    out.along_path = where.along_path;
    const std::map<std::string, std::size_t> index = plan_index(plan);
    std::vector<const TrainPlan*> to_plan(day.train_ids.size(), nullptr);
    std::vector<std::size_t> plan_of(day.train_ids.size(), 0);
    for (std::size_t t = 0; t < day.train_ids.size(); ++t) {
        const auto it = index.find(day.train_ids[t]);
        if (it != index.end()) {
            to_plan[t] = &plan.trains[it->second];
            plan_of[t] = it->second;
        }
    }
    std::vector<std::vector<svg::Point>> pts(day.train_ids.size());
    std::vector<bool> sampled(day.train_ids.size(), false);
    for (const TrajectorySample& s : day.samples) {
        if (s.train >= pts.size() || !std::isfinite(s.time)) continue;
        const double y = where.sample(s);
        if (std::isfinite(y)) {
            pts[s.train].push_back({s.time, y});
            sampled[s.train] = true;
        }
    }
    auto add = [&](std::uint32_t train, double time, double y) {
        if (train < pts.size() && !sampled[train] && std::isfinite(time) && std::isfinite(y))
            pts[train].push_back({time, y});
    };
    for (const TimingRecord& r : day.timing) {
        const double y = where.station(r.train < to_plan.size() ? to_plan[r.train] : nullptr, r.station);
        if (std::isnan(y)) continue;
        add(r.train, r.arrival, y);
        add(r.train, r.departure, y);
    }
    for (const SectionRecord& r : day.sections) {
        if (r.train >= to_plan.size() || !to_plan[r.train] || r.section >= day.section_names.size()) continue;
        const TrainPlan& tp = *to_plan[r.train];
        const std::string& name = day.section_names[r.section];
        const auto sb = std::find_if(tp.stairway.sections.begin(), tp.stairway.sections.end(),
                                     [&](const SectionBlocking& b) { return b.section == name; });
        if (sb == tp.stairway.sections.end()) continue;
        add(r.train, r.head_enters, where.section_end(tp, *sb, true));
        add(r.train, r.head_leaves, where.section_end(tp, *sb, false));
    }
    for (const HoldRecord& h : day.holds) {
        const double y = where.signal(h.train < to_plan.size() ? to_plan[h.train] : nullptr, h.signal);
        if (std::isnan(y)) continue;
        add(h.train, h.from, y);
        add(h.train, h.to, y);
        if (h.train < to_plan.size() && to_plan[h.train]) out.holds.push_back({plan_of[h.train], h.signal, h.from, h.to, y});
    }

    for (std::size_t t = 0; t < pts.size(); ++t) {
        if (!to_plan[t] || pts[t].size() < 2) continue;
        std::vector<svg::Point>& p = pts[t];
        std::stable_sort(p.begin(), p.end(), [](const svg::Point& a, const svg::Point& b) { return a.x < b.x; });
        // The head runs from the path's start to its end: a section's far boundary behind an
        // originating train's stopping mark, or beyond its terminus, is where the head never was.
        const TrainPath& path = to_plan[t]->run.path;
        const double a = where.at(path, 0.0), b = where.at(path, path.length);
        for (svg::Point& q : p) q.y = std::clamp(q.y, std::min(a, b), std::max(a, b));
        // A train never runs back: where records disagree by a few metres (a stand just short of
        // a signal, a section boundary a metre off), the path keeps its furthest point.
        const bool up = b >= a;
        for (std::size_t i = 1; i < p.size(); ++i) p[i].y = up ? std::max(p[i].y, p[i - 1].y) : std::min(p[i].y, p[i - 1].y);
        out.paths.push_back({plan_of[t], std::move(p)});
    }
    return out;
}

// A line: chainage, from the line's stations and signals and the sections' extents.
struct LineWhere {
    static constexpr bool along_path = false;
    std::map<std::string, double> station_at, signal_at;
    double sample(const TrajectorySample& s) const { return s.chainage; }
    double station(const TrainPlan*, const std::string& id) const { return find(station_at, id); }
    double signal(const TrainPlan*, const std::string& id) const { return find(signal_at, id); }
    double section_end(const TrainPlan& tp, const SectionBlocking& b, bool enters) const {
        const bool up = tp.run.path.direction == Direction::up;
        return enters == up ? b.x_lo : b.x_hi;
    }
    double at(const TrainPath& path, double s) const { return path.chainage_at(s); }
    static double find(const std::map<std::string, double>& m, const std::string& id) {
        const auto it = m.find(id);
        return it == m.end() ? NAN : it->second;
    }
};

// A network: distance along each train's own path (the diagram's corridor axis places it).
struct PathWhere {
    static constexpr bool along_path = true;
    double sample(const TrajectorySample& s) const { return s.position; }
    double station(const TrainPlan* tp, const std::string& id) const { return tp ? tp->run.path.station_s(id) : NAN; }
    double signal(const TrainPlan* tp, const std::string& id) const {
        if (tp)
            for (const PathSignal& ps : tp->run.path.signals)
                if (ps.signal.name == id) return ps.s;
        return NAN;
    }
    double section_end(const TrainPlan&, const SectionBlocking& b, bool enters) const {
        return enters ? b.s_from : b.s_to;
    }
    double at(const TrainPath&, double s) const { return s; }
};

}  // namespace

AsRunOverlay as_run_overlay(const SimResult& day, const Infrastructure& infra, const PlanResult& plan,
                            const std::string& label) {
    LineWhere where;
    for (const Station& s : infra.stations) where.station_at[s.id] = s.at;
    for (const Signal& s : infra.signals) where.signal_at[s.id] = s.at;
    return overlay_in(day, plan, label, where);
}

AsRunOverlay as_run_overlay(const SimResult& day, const Scenario& scenario, const PlanResult& plan,
                            const std::string& label) {
    if (!scenario.network) return as_run_overlay(day, scenario.infrastructure, plan, label);
    return overlay_in(day, plan, label, PathWhere{});
}

namespace {

// The time a path (time-ordered, never running back) passes chainage x, or the point of it
// nearest x in chainage where it never does.
svg::Point where_path_meets(const std::vector<svg::Point>& p, double x) {
    for (std::size_t i = 1; i < p.size(); ++i) {
        const double lo = std::min(p[i - 1].y, p[i].y), hi = std::max(p[i - 1].y, p[i].y);
        if (x < lo || x > hi) continue;
        const double f = hi > lo ? (x - p[i - 1].y) / (p[i].y - p[i - 1].y) : 0.0;
        return {p[i - 1].x + f * (p[i].x - p[i - 1].x), x};
    }
    return std::fabs(p.front().y - x) <= std::fabs(p.back().y - x) ? p.front() : p.back();
}

}  // namespace

std::vector<AsRunTree> largest_delay_trees(const SimResult& day, const StoredDelayTrees& trees,
                                           const AsRunOverlay& overlay, const Scenario& scenario,
                                           const PlanResult& plan, std::size_t count) {
    std::map<std::uint32_t, double> damage;   // source -> all its knock-on
    for (const StoredDelayTrees::Edge& e : trees.edges)
        if (e.seconds > 0.0) damage[e.source] += e.seconds;
    std::vector<std::pair<std::uint32_t, double>> ranked(damage.begin(), damage.end());
    std::stable_sort(ranked.begin(), ranked.end(), [](const auto& a, const auto& b) { return a.second > b.second; });
    if (ranked.size() > count) ranked.resize(count);

    const std::map<std::string, std::size_t> index = plan_index(plan);
    auto plan_train = [&](std::uint32_t t) -> std::optional<std::size_t> {
        if (t >= day.train_ids.size()) return std::nullopt;
        const auto it = index.find(day.train_ids[t]);
        return it == index.end() ? std::nullopt : std::optional<std::size_t>(it->second);
    };
    std::map<std::size_t, const std::vector<svg::Point>*> path_of;   // plan train -> as-run path
    for (const AsRunPath& p : overlay.paths) path_of[p.train] = &p.points;
    // Where a train passes a station, in the overlay's coordinate (NaN: it does not): a line's
    // station chainage whichever the train, a network's distance along that train's path.
    std::map<std::string, double> station_at;
    if (!overlay.along_path)
        for (const Station& s : scenario.infrastructure.stations) station_at[s.id] = s.at;
    auto place_of = [&](std::size_t train, const std::string& station) {
        if (overlay.along_path) return plan.trains[train].run.path.station_s(station);
        const auto it = station_at.find(station);
        return it == station_at.end() ? NAN : it->second;
    };

    std::vector<AsRunTree> out;
    for (const auto& [source, total] : ranked) {
        AsRunTree tree;
        const auto s = trees.sources.find(source);
        tree.label = s == trees.sources.end() ? "source " + std::to_string(source)
                                              : describe_source(s->second.kind, s->second.train, s->second.place,
                                                                s->second.section);
        tree.damage = total;
        // (causing train, record, cause) -> seconds, in that order
        std::map<std::tuple<std::uint32_t, std::uint32_t, std::string>, double> summed;
        for (const StoredDelayTrees::Edge& e : trees.edges)
            if (e.source == source && e.from != StoredDelayTrees::kNoTrain) summed[{e.from, e.record, e.cause}] += e.seconds;
        for (const auto& [key, seconds] : summed) {
            const auto& [from, record, cause] = key;
            const TimingRecord& r = day.timing[record];
            const auto a = plan_train(from), b = plan_train(r.train);
            if (!a || !b || !path_of.count(*a)) continue;
            const double to_y = place_of(*b, r.station);
            const double when = std::isfinite(r.departure) ? r.departure : r.arrival;
            if (!std::isfinite(to_y) || !std::isfinite(when)) continue;
            const std::vector<svg::Point>& causing = *path_of[*a];
            const double from_y = place_of(*a, r.station);
            AsRunArrow arrow;
            arrow.from_train = *a;
            arrow.to_train = *b;
            arrow.place = r.station;
            arrow.cause = cause;
            if (std::isfinite(from_y))
                arrow.from = where_path_meets(causing, from_y);
            else   // a network train that never passes the place: its path's end nearest in time
                arrow.from = std::fabs(causing.front().x - when) <= std::fabs(causing.back().x - when) ? causing.front()
                                                                                                       : causing.back();
            arrow.to = {when, to_y};
            arrow.seconds = seconds;
            tree.arrows.push_back(std::move(arrow));
        }
        out.push_back(std::move(tree));
    }
    return out;
}

std::vector<std::string> unknown_trains(const SimResult& day, const PlanResult& plan) {
    const std::map<std::string, std::size_t> index = plan_index(plan);
    std::vector<std::string> out;
    for (const std::string& id : day.train_ids)
        if (!index.count(id)) out.push_back(id);
    return out;
}

std::optional<LossHour> worst_knock_on_hour(const SimResult& day) {
    constexpr double kHour = 3600.0;
    std::map<double, double> per_hour;   // hour start -> knock-on [s]
    for (const TimingRecord& r : day.timing) {
        if (!(r.knock_on > 0.0)) continue;
        const double when = std::isfinite(r.departure) ? r.departure : r.arrival;
        if (!std::isfinite(when)) continue;
        per_hour[std::floor(when / kHour) * kHour] += r.knock_on;
    }
    std::optional<LossHour> worst;
    for (const auto& [from, lost] : per_hour)   // ascending: the earliest wins a tie
        if (!worst || lost > worst->knock_on) worst = LossHour{{from, from + kHour}, lost};
    return worst;
}

}  // namespace knockon
