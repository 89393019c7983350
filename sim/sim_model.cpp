#include "sim/sim_model.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <map>
#include <stdexcept>

#include "models/junction_headway.hpp"
#include "models/single_track.hpp"

namespace knockon {
namespace {

constexpr double kInf = std::numeric_limits<double>::infinity();
constexpr double kEps = kSamePlace;

int aspect_cap(AspectSystem a) {
    switch (a) {
        case AspectSystem::two_aspect: return 1;
        case AspectSystem::three_aspect: return 2;
        case AspectSystem::four_aspect: return 3;
        case AspectSystem::cab_fixed_block: return 1 << 20;
    }
    return 2;
}

Place place_on(const ServiceRun& run, double s, bool skip = false) {
    for (std::size_t k = 0; k < run.legs.size(); ++k) {
        const Trajectory& lt = run.legs[k].trajectory;
        if (s > lt.s0 + kEps && s <= lt.s_end + kEps) return {s, static_cast<long>(k), lt.time_at(std::min(s, lt.s_end)), skip};
    }
    return {s, -1, 0.0, skip};
}

// Sets Place::at_enter of `others`: the enter place (not skipped) at the same spot.
// (Sections follow the path, so their starts ascend.)
void mark_enter_at_same_place(const std::vector<Place>& enters, std::vector<Place>& others) {
    const bool ascending =
        std::is_sorted(enters.begin(), enters.end(), [](const Place& a, const Place& b) { return a.s < b.s; });
    if (!ascending) return;   // no merged events: each place keeps its own
    for (std::size_t i = 0; i < others.size(); ++i) {
        if (others[i].skip) continue;
        auto e = std::lower_bound(enters.begin(), enters.end(), others[i].s - kSamePlace,
                                  [](const Place& p, double s) { return p.s < s; });
        if (e != enters.end() && !e->skip && std::fabs(e->s - others[i].s) <= kSamePlace && e->leg == others[i].leg &&
            e->t == others[i].t)
            others[i].at_enter = static_cast<std::int32_t>(e - enters.begin());
    }
}

}  // namespace

const StretchUse* SimModel::Train::use_of(std::int32_t stretch) const {
    for (const StretchUse& u : stretch_uses)
        if (u.stretch == stretch) return &u;
    return nullptr;
}

SimModel::SimModel(const Scenario& scenario, const std::vector<TrainPlan>& plan)
    : SimModel(*service_paths(scenario), plan) {}

SimModel::SimModel(const ServicePaths& paths, const std::vector<TrainPlan>& plan)
    : interlocking_(paths.interlocking()), single_track_(paths.single_track()) {
    // Sections are numbered in the order trains first meet them, found by the network's index
    // of each (every path of a plan is laid over one network); the ids are kept for the edges.
    constexpr std::uint32_t kUnnumbered = UINT32_MAX;
    std::vector<std::uint32_t> number_of;   // by network section index
    auto section_of = [&](std::size_t network, const std::string& id) {
        if (network == net::kNone) throw std::logic_error("section " + id + " of a plan has no network index");
        if (number_of.size() <= network) number_of.resize(network + 1, kUnnumbered);
        std::uint32_t& n = number_of[network];
        if (n == kUnnumbered) {
            n = static_cast<std::uint32_t>(section_names_.size());
            section_names_.push_back(id);
        }
        return n;
    };
    // Planned blocking start of every (section, train), to order the trains per section.
    std::vector<std::vector<std::pair<double, std::uint32_t>>> starts;

    for (std::uint32_t t = 0; t < plan.size(); ++t) {
        const TrainPlan& tp = plan[t];
        const TrainPath& path = tp.run.path;
        Train tr;
        tr.plan = &tp;
        for (const PathSection& sec : path.sections) tr.section_index.push_back(section_of(sec.index, sec.id));
        tr.dispatch_weight = tp.run.service->dispatch_weight;
        {
            const auto n = static_cast<std::uint32_t>(path.sections.size());
            tr.stretch_of.assign(n, -1);
            for (const StretchPass& pass : stretch_passes(single_track_, path)) {
                const auto i = static_cast<std::int32_t>(pass.stretch);
                StretchUse u{i, static_cast<std::uint32_t>(pass.first), static_cast<std::uint32_t>(pass.end), kInf, -kInf,
                             pass.direction};
                for (std::uint32_t k = u.first; k < u.end; ++k) {
                    tr.stretch_of[k] = i;
                    for (const SectionBlocking& b : tp.stairway.sections)
                        if (b.section == path.sections[k].id) {
                            u.start = std::min(u.start, b.start);
                            u.release = std::max(u.release, b.end);
                            break;
                        }
                }
                tr.stretch_uses.push_back(u);
            }
            tr.advance.assign(n + 1, {n, n});
            for (std::uint32_t k = n; k-- > 0;) {
                const PathSection& sec = path.sections[k];
                // Where trains can stand clear of opposing traffic: everywhere but the single-track stretches.
                const bool clear_place = tr.stretch_of[k] < 0;
                if (!clear_place) tr.advance[k] = tr.advance[k + 1];
                else if (k + 1 < n && tr.advance[k + 1].first == k + 1) tr.advance[k] = {k, tr.advance[k + 1].second};
                else tr.advance[k] = {k, k + 1};
            }
        }
        const double length = tp.run.type->length;
        // Sections it appears on: where it stands at its origin, or, entering over the line end,
        // those before the first signal (no route of its own protects them).
        const double first_signal = tp.stairway.routes.empty() ? path.length : tp.stairway.routes.front().s_entry;
        for (std::size_t k = 0; k < path.sections.size(); ++k)
            if (path.starts_at_edge ? path.sections[k].s_from < first_signal - kEps
                                    : stands_at_start(tp.run, path.sections[k])) {
                tr.origin_sections.push_back(tr.section_index[k]);
                tr.origin_path_sections.push_back(static_cast<std::uint32_t>(k));
            }

        // Routes: the same ones, in the same order, as the planned stairway.
        std::size_t sig_i = 0;
        for (const RouteBlocking& rb : tp.stairway.routes) {
            while (sig_i < path.signals.size() && path.signals[sig_i].signal.name != rb.entry_signal) ++sig_i;
            const PathSignal& ps = path.signals.at(sig_i);
            Route r;
            r.entry_signal = rb.entry_signal;
            r.exit_signal = rb.exit_signal;
            r.s_entry = rb.s_entry;
            r.authority_end = rb.exit_signal.empty() && path.ends_at_edge ? kInf : rb.s_exit;
            r.warning_point = rb.warning_point;
            r.read_point = aspect_read_point(ps);
            r.aspect_cap = aspect_cap(ps.system);
            r.after_stop = rb.departure_call;
            if (r.after_stop < 0)
                for (std::size_t k = 0; k < tp.run.calls.size(); ++k) {
                    const PlannedCall& c = tp.run.calls[k];
                    if (c.stops && !std::isnan(c.planned_departure) && c.s < rb.warning_point - kEps) {
                        r.stop_before_warning = static_cast<long>(k);
                        r.warning_after_departure = tp.run.head_reach(rb.warning_point) - c.planned_departure;
                    }
                }
            for (std::size_t k = 0; k < path.sections.size(); ++k) {
                const PathSection& sec = path.sections[k];
                if (std::min(rb.s_exit + rb.overlap, sec.s_to) - std::max(rb.s_entry, sec.s_from) > kEps)
                {
                    r.sections.push_back(tr.section_index[k]);
                    r.path_sections.push_back(static_cast<std::uint32_t>(k));
                }
            }
            tr.routes.push_back(std::move(r));
        }
        for (const RunLeg& leg : tp.run.legs) {
            const Trajectory& lt = leg.trajectory;
            tr.leg_ends.push_back({lt.s0, lt.s_end, lt.duration(), lt.v.back()});
            double b_min = kInf;
            for (std::size_t j = 0; j < lt.v.size(); ++j) {
                const double sj = std::min(lt.s0 + static_cast<double>(j) * lt.step, lt.s_end);
                b_min = std::min(b_min, braking_deceleration(*tp.run.type, lt.v[j], path.gradient_at(sj)));
            }
            const double margin = 2.0 * lt.step + 1.0;
            std::vector<double> reach(lt.v.size());
            double run_max = -kInf;
            for (std::size_t j = 0; j < lt.v.size(); ++j) {
                const double sj = std::min(lt.s0 + static_cast<double>(j) * lt.step, lt.s_end);
                const double d = lt.v[j] > 0.0 ? lt.v[j] * lt.v[j] / (2.0 * b_min) + margin : 0.0;
                run_max = std::max(run_max, sj + d);
                reach[j] = run_max;
            }
            tr.leg_reach_index.emplace_back().build(reach);
            tr.leg_reach.push_back(std::move(reach));
        }
        // Authority ends the engine can meet: route entries and ends, the path's ends, and the
        // timing points (slow running starts at one and is braked for like an authority end).
        std::vector<double> ends = {0.0, path.length};
        for (const Route& r : tr.routes) ends.insert(ends.end(), {r.s_entry, r.authority_end});
        for (const PlannedCall& c : tp.run.calls) ends.push_back(c.s);
        std::sort(ends.begin(), ends.end());
        ends.erase(std::unique(ends.begin(), ends.end()), ends.end());
        for (std::size_t k = 0; k < tp.run.legs.size(); ++k) {
            auto& table = tr.leg_brake_points.emplace_back();
            for (double e : ends) table.emplace_back(e, tr.brake_point_searched(k, e));
        }
        // (the engine's rules for which places get no event, decided once here)
        for (const PathSection& sec : path.sections) {
            tr.enters.push_back(place_on(tp.run, sec.s_from, sec.s_from >= path.length - kEps && !path.ends_at_edge));
            tr.leaves.push_back(place_on(tp.run, sec.s_to, sec.s_to > path.length + kEps && !path.ends_at_edge));
            tr.clears.push_back(place_on(tp.run, sec.s_to + length));
        }
        for (const Route& r : tr.routes) {
            tr.sightings.push_back(place_on(tp.run, r.read_point, std::isinf(r.read_point)));
            tr.passes.push_back(place_on(tp.run, r.s_entry));
            tr.warnings.push_back(place_on(tp.run, r.warning_point));
        }
        for (const PlannedCall& c : tp.run.calls) tr.calls.push_back(place_on(tp.run, c.s, c.stops));
        mark_enter_at_same_place(tr.enters, tr.leaves);
        mark_enter_at_same_place(tr.enters, tr.passes);
        for (const SectionBlocking& b : tp.stairway.sections) {
            std::uint32_t s = section_of(b.index, b.section);
            if (starts.size() <= s) starts.resize(s + 1);
            starts[s].push_back({b.start, t});
        }
        trains_.push_back(std::move(tr));
    }
    // Buffers a study measures: consecutive trains of each line section, then of each junction
    // (models/junction_headway), on the critical section found by its network index.
    const std::vector<LineSection> line_sections = paths.line_sections();
    std::vector<HeadwayPair> pairs = consecutive_headways(line_sections, plan);
    const std::vector<HeadwayPair> at_junctions = junction_headways(line_sections, paths.node_sections(), plan, pairs);
    pairs.insert(pairs.end(), at_junctions.begin(), at_junctions.end());
    for (const HeadwayPair& h : pairs) {
        if (h.critical_index >= number_of.size() || number_of[h.critical_index] == kUnnumbered) continue;
        buffer_pairs_.push_back({static_cast<std::uint32_t>(h.leader), static_cast<std::uint32_t>(h.follower),
                                 number_of[h.critical_index], headway_place(h), h.buffer});
    }
    {
        std::vector<std::string> stations;   // the engine's timing records, in its order
        for (const TrainPlan& tp : plan)
            for (const PlannedCall& c : tp.run.calls) stations.push_back(c.station);
        record_places_ = knockon::record_places(stations);
    }
    for (const TrainPlan& tp : plan)
        for (const LinkPlan& l : tp.incoming) links_.push_back(l);
    std::sort(links_.begin(), links_.end(), [](const LinkPlan& a, const LinkPlan& b) { return a.link < b.link; });
    for (std::uint32_t l = 0; l < links_.size(); ++l) {
        trains_[links_[l].to].links_in.push_back(l);
        trains_[links_[l].from].links_out.push_back(l);
        if (turns_back(links_[l], plan[links_[l].to].run)) {
            Train& from = trains_[links_[l].from];
            from.turns_into = static_cast<std::uint32_t>(links_[l].to);
            from.hands_over = platform_handover(plan[links_[l].from].run, plan[links_[l].to].run);
        }
    }
    starts.resize(section_names_.size());
    planned_order_.resize(section_names_.size());
    for (std::size_t s = 0; s < starts.size(); ++s) {
        std::stable_sort(starts[s].begin(), starts[s].end());
        for (auto& [time, train] : starts[s]) planned_order_[s].push_back(train);
    }
}

SimModel::Train::BrakePoint SimModel::Train::brake_point_searched(std::size_t k, double eoa) const {
    const Trajectory& leg = plan->run.legs[k].trajectory;
    const auto& reach = leg_reach[k];
    const std::size_t j = leg_reach_index[k].upper_bound(reach, eoa);
    if (j == reach.size()) return {};
    const std::size_t i = j == 0 ? 0 : j - 1;
    const double s = leg.point(i);
    return {s, leg.time_at(std::min(s, leg.s_end)), i};
}

SimModel::Train::BrakePoint SimModel::Train::brake_point(std::size_t k, double eoa) const {
    const auto& table = leg_brake_points[k];
    const auto it = std::lower_bound(table.begin(), table.end(), eoa,
                                     [](const auto& e, double x) { return e.first < x; });
    if (it != table.end() && it->first == eoa) return it->second;
    return brake_point_searched(k, eoa);
}

}  // namespace knockon
