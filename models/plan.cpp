#include "models/plan.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <map>
#include <optional>
#include <stdexcept>

#include "models/junction_headway.hpp"
#include "models/scenario_checks.hpp"
#include "models/scenario_error.hpp"
#include "models/service_paths.hpp"

namespace knockon {
namespace {

std::vector<SectionStairway> stairways_in(const LineSection& ls, const std::vector<TrainPlan>& trains) {
    std::vector<SectionStairway> out;
    for (std::size_t i = 0; i < trains.size(); ++i)
        if (auto s = stairway_in(ls, i, trains[i].run, trains[i].stairway)) out.push_back(std::move(*s));
    std::stable_sort(out.begin(), out.end(),
                     [](const SectionStairway& a, const SectionStairway& b) { return a.reference < b.reference; });
    return out;
}

void add_headways(const LineSection& ls, const std::vector<SectionStairway>& ordered,
                  std::vector<HeadwayPair>& out) {
    for (std::size_t k = 1; k < ordered.size(); ++k) {
        const SectionStairway &a = ordered[k - 1], &b = ordered[k];
        auto h = minimum_headway(a, b);
        if (!h) continue;
        HeadwayPair p;
        p.line_section = ls.name();
        p.direction = ls.direction;
        p.leader = a.train;
        p.follower = b.train;
        p.scheduled_headway = b.reference - a.reference;
        p.minimum_headway = h->headway;
        p.buffer = p.scheduled_headway - p.minimum_headway;
        p.critical_section = h->critical_section;
        p.critical_index = h->critical_index;
        out.push_back(p);
    }
}

void add_matrix(const LineSection& ls, const std::vector<SectionStairway>& ordered, PlanResult& plan) {
    std::map<std::pair<std::string, std::string>, HeadwayMatrixEntry> cells;
    for (const SectionStairway& a : ordered)
        for (const SectionStairway& b : ordered) {
            if (a.train == b.train) continue;
            auto h = minimum_headway(a, b);
            if (!h) continue;
            const std::string& ta = plan.trains[a.train].run.type->id;
            const std::string& tb = plan.trains[b.train].run.type->id;
            auto [it, fresh] = cells.try_emplace({ta, tb}, HeadwayMatrixEntry{ls.name(), ta, tb, h->headway,
                                                                              h->critical_section});
            if (!fresh && h->headway > it->second.minimum_headway) {
                it->second.minimum_headway = h->headway;
                it->second.critical_section = h->critical_section;
            }
        }
    for (auto& [key, cell] : cells) plan.headway_matrix.push_back(cell);
}

void add_capacity(const LineSection& ls, const std::vector<SectionStairway>& ordered, LineType type,
                  PlanResult& plan) {
    const ConsumptionLimit limit = uic406_limit(type);
    auto figure = [&](const char* window, const WindowConsumption& w, double lim) {
        return CapacityFigure{ls.name(), ls.direction, window, w.from, w.to, w.trains, w.occupation, w.consumption,
                              lim};
    };
    const WindowConsumption peak = peak_hour_consumption(ordered);
    if (peak.trains == 0) return;
    plan.capacity.push_back(figure("peak hour", peak, limit.peak));
    plan.capacity.push_back(figure("day", day_consumption(ordered), limit.day));
    for (const WindowConsumption& w : hourly_consumption(ordered))
        plan.hourly_capacity.push_back(figure("hour", w, limit.peak));
}

void add_spacing_warnings(PlanResult& plan) {
    std::map<std::string, SpacingWarning> worst;
    for (std::size_t t = 0; t < plan.trains.size(); ++t) {
        const ServiceRun& run = plan.trains[t].run;
        for (const WarningShortfall& w : warning_shortfalls(run)) {
            const std::string& id = run.path.signals[w.signal].signal.name;
            auto it = worst.find(id);
            if (it == worst.end() || w.needed - w.available > it->second.needed - it->second.available)
                worst[id] = {id, t, w.available, w.needed, w.speed};
        }
    }
    for (auto& [id, w] : worst) plan.spacing_warnings.push_back(w);
}

// Times the timetable leaves out are constructed from the last stop or given time, rounded up
// cumulatively, so one stretch between constructed passes may be short of its own running time
// while the train keeps time.  The check runs from each such anchor to every later call: only a
// given time (or an arrival held to a given departure) can fall short.
void add_tight_stretches(PlanResult& plan) {
    for (std::size_t t = 0; t < plan.trains.size(); ++t) {
        const ServiceRun& run = plan.trains[t].run;
        const std::vector<PlannedCall>& calls = run.calls;
        std::size_t anchor = 0;
        double scheduled = 0.0, technical = 0.0;
        for (std::size_t k = 1; k < calls.size(); ++k) {
            const PlannedCall& c = calls[k];
            scheduled += c.scheduled_running;
            technical += c.technical_running;
            const double timetabled = c.scheduled_arrival - calls[anchor].scheduled_departure;
            if (timetabled - scheduled < -kTightTolerance)
                plan.tight_stretches.push_back({t, anchor, k, timetabled, scheduled, technical});
            const Call& given = run.service->calls[c.call];
            if (c.stops || given.arrival || given.departure) {
                anchor = k;
                scheduled = technical = 0.0;
            }
        }
    }
}

void add_conflicts(PlanResult& plan) {
    struct Use {
        std::size_t train;
        double start, end;
    };
    std::map<std::string, std::vector<Use>> by_section;
    for (std::size_t i = 0; i < plan.trains.size(); ++i)
        for (const SectionBlocking& b : plan.trains[i].stairway.sections)
            by_section[b.section].push_back({i, b.start, b.end});
    for (auto& [section, uses] : by_section) {
        std::sort(uses.begin(), uses.end(), [](const Use& a, const Use& b) {
            return a.start < b.start || (a.start == b.start && a.train < b.train);
        });
        for (std::size_t i = 0; i < uses.size(); ++i)
            for (std::size_t j = i + 1; j < uses.size() && uses[j].start < uses[i].end - 1e-6; ++j) {
                if (uses[i].train == uses[j].train) continue;
                double overlap = std::min(uses[i].end, uses[j].end) - uses[j].start;
                Conflict c;
                c.section = section;
                c.first = uses[i].train;
                c.second = uses[j].train;
                c.overlap = overlap;
                c.from = uses[j].start;
                // The ways they run over the section itself (on a network not the headings they start in).
                const SectionMeeting m =
                    section_meeting(plan.trains[c.first].run.path, plan.trains[c.second].run.path, section);
                c.opposing = m == SectionMeeting::opposing;
                c.apart = m == SectionMeeting::apart;
                if (const SingleTrackStretch* st = plan.single_track.stretch_of_section(section)) c.stretch = st->name;
                plan.conflicts.push_back(c);
            }
    }
    std::sort(plan.conflicts.begin(), plan.conflicts.end(),
              [](const Conflict& a, const Conflict& b) { return a.from < b.from; });
}

// Each link of the timetable, resolved to trains and timing points, goes to the train it holds.
// The reader has checked the links; a scenario built in code gets the same sentences, located at
// the link.
void link_trains(const Scenario& scenario, const ServicePaths& paths, std::vector<TrainPlan>& trains) {
    const auto& links = scenario.timetable.links;
    if (links.empty()) return;
    std::map<std::string, std::size_t> index;
    for (std::size_t t = 0; t < trains.size(); ++t) index[trains[t].run.service->id] = t;
    auto timing_point = [](const ServiceRun& run, std::size_t call) {
        for (std::size_t k = 0; k < run.calls.size(); ++k)
            if (run.calls[k].call == call) return k;
        return run.calls.size();
    };
    std::vector<std::string> problems;
    for (std::size_t l = 0; l < links.size(); ++l) {
        const ServiceLink& link = links[l];
        auto a = index.find(link.from), b = index.find(link.to);
        if (a == index.end() || b == index.end()) {
            problems.push_back(scenario.where_link(l) + ": no service " + (a == index.end() ? link.from : link.to));
            continue;
        }
        const ServiceRun &from = trains[a->second].run, &to = trains[b->second].run;
        if (auto p = link_problem(paths, link, *from.service, *to.service)) {
            problems.push_back(scenario.where_link(l) + ": " + *p);
            continue;
        }
        const LinkCalls calls = *link_calls(link, *from.service, *to.service);
        LinkPlan lp;
        lp.link = l;
        lp.kind = link.kind;
        lp.from = a->second;
        lp.to = b->second;
        lp.from_call = timing_point(from, calls.from_call);
        lp.to_call = timing_point(to, calls.to_call);
        lp.min_time = link.min_time;
        lp.max_wait = link.max_wait;
        lp.arrival = from.calls[lp.from_call].planned_arrival;
        lp.departure = to.calls[lp.to_call].planned_departure;
        trains[lp.to].incoming.push_back(lp);
    }
    if (!problems.empty()) throw ScenarioError(problems);
}

// A set that turns back keeps its platform (models/blocking_time, hand_over_platform).
void keep_turnback_platforms(std::vector<TrainPlan>& trains) {
    for (TrainPlan& later : trains)
        for (const LinkPlan& l : later.incoming)
            if (turns_back(l, later.run))
                hand_over_platform(trains[l.from].run, trains[l.from].stairway, later.run, later.stairway);
}

void add_links(PlanResult& plan) {
    for (const TrainPlan& tp : plan.trains)
        for (const LinkPlan& l : tp.incoming) plan.links.push_back(l);
    std::sort(plan.links.begin(), plan.links.end(), [](const LinkPlan& a, const LinkPlan& b) { return a.link < b.link; });
    // A link the timetable cannot keep is a conflict, named by its kind and place.
    for (std::size_t i = 0; i < plan.links.size(); ++i) {
        const LinkPlan& l = plan.links[i];
        if (l.buffer() >= -kLinkTolerance) continue;
        Conflict c;
        c.section = plan.trains[l.to].run.calls[l.to_call].station;
        c.first = l.from;
        c.second = l.to;
        c.overlap = -l.buffer();
        c.from = l.departure;
        c.link = static_cast<long>(i);
        c.link_kind = l.kind;
        plan.conflicts.push_back(c);
        std::stable_sort(plan.conflicts.begin(), plan.conflicts.end(),
                         [](const Conflict& a, const Conflict& b) { return a.from < b.from; });
    }
}

}  // namespace

std::string conflict_kind(const Conflict& c) {
    if (c.link >= 0) {
        const LinkKind k = c.link_kind;
        return std::string(k == LinkKind::crew ? "crew link" : to_string(k)) + " shorter than its minimum " +
               minimum_name(k) + " time";
    }
    if (c.apart) return "converging or crossing routes";
    if (!c.opposing) return "same direction";
    return c.stretch.empty() ? "opposing trains" : "opposing trains on single-track stretch " + c.stretch;
}

namespace {

// The plan's size; a network's paths are laid by `paths` to be measured (cheap beside integrating
// them), where it is given (nullptr: the layout is refused with its reason when the plan is made).
PlanSize plan_size(const Scenario& scenario, const ServicePaths* paths, const RunOptions& options) {
    PlanSize size;
    auto add = [&](double km) {
        size.train_km += km;
        size.grid_points += km * 1000.0 / options.step + 1.0;
        ++size.runs;
    };
    if (scenario.network) {
        if (!paths) return size;
        for (const Service& svc : scenario.timetable.services) {
            try {
                add(paths->lay(svc).length / 1000.0);
            } catch (const PathError&) {
            }
        }
        return size;
    }
    const Infrastructure& in = scenario.infrastructure;
    for (const Service& svc : scenario.timetable.services) {
        if (svc.calls.empty()) continue;
        const Station* first = in.find_station(svc.calls.front().station);
        const Station* last = in.find_station(svc.calls.back().station);
        if (!first || !last) continue;
        const bool up = svc.direction == Direction::up;
        const double from = svc.enters_at_edge ? (up ? 0.0 : in.length) : first->at;
        const double to = svc.leaves_at_edge ? (up ? in.length : 0.0) : last->at;
        add(std::abs(to - from) / 1000.0);
    }
    return size;
}

}  // namespace

// The scenario's paths, or the reason the layout cannot take them as an input problem.  A line
// scenario is checked as a model first (models/scenario_checks): the path builder trusts the
// infrastructure it is given, and a scenario built in code has met no reader.
std::unique_ptr<ServicePaths> scenario_paths(const Scenario& scenario) {
    check_scenario(scenario);
    try {
        return service_paths(scenario);
    } catch (const PathError& e) {
        throw ScenarioError({(scenario.source_file.empty() ? std::string("scenario") : scenario.source_file) +
                             ": infrastructure: " + e.what()});
    }
}

std::vector<TrainPlan> plan_trains(const Scenario& scenario, const ServicePaths& paths, const RunOptions& options) {
    // Refused before any work: a plan's memory is its grid points (README, "Memory").
    const PlanSize size = plan_size(scenario, &paths, options);
    if (size.grid_points > kMaxPlanGridPoints) {
        char buf[400];
        std::snprintf(buf, sizeof buf,
                      "%s: the plan would integrate %.3g grid points (%zu train runs, %.0f train-km at a step of "
                      "%g m; about %.1f GB), more than the %.0e allowed (about %.1f GB): use a larger --step, "
                      "fewer trains or a shorter line",
                      scenario.source_file.empty() ? "scenario" : scenario.source_file.c_str(), size.grid_points,
                      size.runs, size.train_km, options.step, size.grid_points * kPlanBytesPerGridPoint / 1e9,
                      kMaxPlanGridPoints, kMaxPlanGridPoints * kPlanBytesPerGridPoint / 1e9);
        throw ScenarioError({buf});
    }
    std::vector<TrainPlan> trains;
    trains.reserve(scenario.timetable.services.size());
    // A train that cannot run is an input problem: located at its timetable entry, once per entry
    // (the runs of a repeat pattern share their type and path).
    std::vector<std::string> problems;
    std::map<std::size_t, std::pair<std::size_t, std::size_t>> failed;   // entry -> (problem, further runs)
    for (const Service& svc : scenario.timetable.services) {
        std::string problem;
        try {
            const TrainType* type = scenario.find_train_type(svc.train_type);
            if (!type) throw std::runtime_error("unknown train type");
            TrainPlan tp{plan_service(paths, svc, *type, scenario.timetable.rounding, options), {}, {}};
            tp.stairway = blocking_stairway(tp.run, paths.interlocking());
            trains.push_back(std::move(tp));
            continue;
        } catch (const std::runtime_error& e) {
            problem = e.what();
        } catch (const std::logic_error& e) {
            problem = e.what();
        }
        if (auto it = failed.find(svc.entry); it != failed.end()) {
            ++it->second.second;
            continue;
        }
        failed[svc.entry] = {problems.size(), 0};
        problems.push_back(scenario.where(svc) + ": service " + svc.id + " (train type " + svc.train_type +
                           "): " + problem);
    }
    for (const auto& [entry, at] : failed)
        if (at.second > 0)
            problems[at.first] += " (and " + std::to_string(at.second) + " more run" + (at.second == 1 ? "" : "s") +
                                  " of its pattern)";
    if (!problems.empty()) throw ScenarioError(problems);
    link_trains(scenario, paths, trains);
    keep_turnback_platforms(trains);
    return trains;
}

PlanSize plan_size(const Scenario& scenario, const RunOptions& options) {
    std::unique_ptr<ServicePaths> paths;
    if (scenario.network) {
        try {
            paths = service_paths(scenario);
        } catch (const PathError&) {
        }
    }
    return plan_size(scenario, paths.get(), options);
}

std::vector<TrainPlan> plan_trains(const Scenario& scenario, const RunOptions& options) {
    return plan_trains(scenario, *scenario_paths(scenario), options);
}

std::vector<HeadwayPair> consecutive_headways(const std::vector<LineSection>& sections,
                                              const std::vector<TrainPlan>& trains) {
    std::vector<HeadwayPair> out;
    for (const LineSection& ls : sections) add_headways(ls, stairways_in(ls, trains), out);
    return out;
}

PlanResult make_plan(const Scenario& scenario, const RunOptions& options) {
    PlanResult plan;
    const std::unique_ptr<ServicePaths> paths = scenario_paths(scenario);
    plan.trains = plan_trains(scenario, *paths, options);
    plan.line_sections = paths->line_sections();
    for (const LineSection& ls : plan.line_sections) {
        std::vector<SectionStairway> ordered = stairways_in(ls, plan.trains);
        add_headways(ls, ordered, plan.headways);
        add_matrix(ls, ordered, plan);
        add_capacity(ls, ordered, scenario.line_type, plan);
    }
    plan.junction_headways = junction_headways(plan.line_sections, paths->node_sections(), plan.trains, plan.headways);
    plan.single_track = paths->single_track();
    plan.crossings = find_crossings(plan.single_track, plan.trains);
    plan.stretch_capacity = stretch_capacity(plan.single_track, plan.trains, scenario.line_type);
    plan.crossings_too_short = crossings_too_short(plan.single_track, plan.trains, plan.crossings);
    add_conflicts(plan);
    add_links(plan);
    add_spacing_warnings(plan);
    add_tight_stretches(plan);
    return plan;
}

}  // namespace knockon
