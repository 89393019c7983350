#include "models/service_run.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <stdexcept>

#include "models/supplement.hpp"
#include "models/train_type_checks.hpp"

namespace knockon {

double round_up_to_grid(double t, double grid) {
    if (grid <= 0.0) return t;
    return std::ceil(t / grid - 1e-6) * grid;
}

namespace {

// The path is laid this far beyond its end (plus the longest overlap) so that the route to the
// first signal past a terminus, and its overlap, are known.
constexpr double kLookAhead = 3000.0;

// Where on the line a train stalls and what force it lacks there.
std::string stall_text(const TrainPath& path, const StallError& e) {
    char buf[320];
    std::snprintf(buf, sizeof buf,
                  "stalls at km %.3f on a %.3g per mille %s: at standstill its tractive effort (%.4g kN) falls short "
                  "of its resistance (%.4g kN) plus the gradient force (%.4g kN) by %.4g kN",
                  path.chainage_at(e.s) / 1000.0, std::abs(e.gradient) * 1000.0, e.gradient >= 0.0 ? "climb" : "fall",
                  e.tractive / 1000.0, e.resistance / 1000.0, e.gradient_force / 1000.0,
                  (e.resistance + e.gradient_force - e.tractive) / 1000.0);
    return buf;
}

}  // namespace

double min_dwell_of(const Call& call, const TrainType& type) {
    return call.min_dwell ? *call.min_dwell : type.min_dwell;
}

ServiceRun plan_service(const ServicePaths& paths, const Service& service, const TrainType& type,
                        double rounding, const RunOptions& options) {
    ServiceRun run;
    run.service = &service;
    run.type = &type;
    run.path = paths.lay(service, type.length, paths.longest_overlap() + kLookAhead);
    const TrainPath& path = run.path;
    if (const std::string problem = brake_hold_problem(type, path, 0.0, path.length); !problem.empty())
        throw std::runtime_error(problem);
    const auto& tps = path.timing_points;

    // Halts split the run into legs: the origin, every stop, the terminus.
    std::vector<std::size_t> halt_tp;  // timing-point index at which each leg starts (SIZE_MAX: line end)
    const std::size_t kEdge = static_cast<std::size_t>(-1);
    halt_tp.push_back(service.enters_at_edge ? kEdge : 0);
    for (std::size_t i = (service.enters_at_edge ? 0 : 1); i < tps.size(); ++i) {
        bool last = i + 1 == tps.size();
        if (tps[i].stops || (last && !service.leaves_at_edge)) halt_tp.push_back(i);
    }
    if (service.leaves_at_edge) halt_tp.push_back(kEdge);

    double& entry_speed = run.entry_speed;
    if (service.enters_at_edge) {
        entry_speed = service.entry_speed ? *service.entry_speed
                                          : std::min(path.speed_limit_at(0.0), type.max_speed);
    }
    auto s_of = [&](std::size_t k, bool at_end) {
        if (halt_tp[k] == kEdge) return at_end ? path.length : 0.0;
        return tps[halt_tp[k]].s;
    };
    for (std::size_t k = 0; k + 1 < halt_tp.size(); ++k) {
        double s0 = s_of(k, false), s1 = s_of(k + 1, true);
        double v0 = (k == 0 && service.enters_at_edge) ? entry_speed : 0.0;
        bool stop = !(k + 2 == halt_tp.size() && service.leaves_at_edge);
        RunLeg leg;
        leg.grid = make_leg_grid(type, path, s0, s1, options);
        try {
            run_on_grid_into(leg.trajectory, type, leg.grid, s0, v0, s1, stop, options);
        } catch (const StallError& e) {
            throw std::runtime_error(stall_text(path, e));
        }
        run.legs.push_back(std::move(leg));
    }
    // Which leg each timing point lies on (a stop belongs to the leg it ends, except the origin).
    auto leg_of = [&](double s, bool departing) {
        for (std::size_t k = 0; k < run.legs.size(); ++k) {
            const Trajectory& tr = run.legs[k].trajectory;
            if (departing ? (s < tr.s_end - 1e-6) : (s <= tr.s_end + 1e-6)) return k;
        }
        return run.legs.size() - 1;
    };

    // Walk the calls: scheduled times (given or constructed) and planned times.
    // prev_basis: what constructed times count from — the scheduled departure after a stop, but
    // the unrounded constructed time after a pass, so rounding does not pile up along passes.
    double prev_sched = 0.0, prev_basis = 0.0, prev_planned = 0.0, prev_s = 0.0;
    for (std::size_t i = 0; i < tps.size(); ++i) {
        const Call& call = service.calls[tps[i].call];
        PlannedCall pc;
        pc.call = tps[i].call;
        pc.station = call.station;
        pc.s = tps[i].s;
        bool last = i + 1 == tps.size();
        pc.stops = tps[i].stops || (i == 0 && !service.enters_at_edge) || (last && !service.leaves_at_edge);
        const double dwell = min_dwell_of(call, type);

        if (i == 0) {
            // The anchor: the given time at the first call.
            const Trajectory& tr = run.legs.front().trajectory;
            if (!service.enters_at_edge) {
                pc.scheduled_departure = pc.planned_departure = *call.departure;
                run.appear_time = pc.planned_departure - dwell;
            } else {
                double arrive = call.arrival ? *call.arrival
                                : (pc.stops ? *call.departure - dwell : *call.departure);
                pc.scheduled_arrival = pc.planned_arrival = arrive;
                pc.scheduled_departure = pc.stops ? (call.departure ? *call.departure : arrive + dwell) : arrive;
                pc.planned_departure = pc.stops ? std::max(pc.scheduled_departure, arrive + dwell) : arrive;
                run.appear_time = arrive - tr.time_at(pc.s);
            }
        } else {
            const Trajectory& tr = run.legs[leg_of(prev_s, true)].trajectory;
            pc.technical_running = tr.time_at(pc.s) - tr.time_at(prev_s);
            pc.scheduled_running =
                pc.technical_running +
                running_time_supplement(type.supplement, pc.technical_running, pc.s - prev_s, path.length);
            const double exact = prev_basis + pc.scheduled_running;
            const double constructed = round_up_to_grid(exact, rounding);
            pc.planned_arrival = prev_planned + pc.technical_running;
            if (pc.stops) {
                pc.scheduled_arrival = call.arrival ? *call.arrival : constructed;
                if (!call.arrival && call.departure) pc.scheduled_arrival = std::min(constructed, *call.departure);
                pc.scheduled_departure = call.departure ? *call.departure
                                                        : round_up_to_grid(pc.scheduled_arrival + dwell, rounding);
                pc.planned_departure = std::max(pc.scheduled_departure, pc.planned_arrival + dwell);
            } else {
                pc.scheduled_arrival = pc.scheduled_departure = call.departure ? *call.departure : constructed;
                pc.planned_departure = pc.planned_arrival;
            }
            pc.timetabled_running = pc.scheduled_arrival - prev_sched;
        }
        prev_sched = pc.scheduled_departure;
        prev_basis = (i > 0 && !pc.stops && !call.departure) ? prev_basis + pc.scheduled_running : prev_sched;
        prev_planned = pc.planned_departure;
        prev_s = pc.s;
        run.calls.push_back(pc);
    }

    // Leg start times: each leg leaves its halt at the planned departure there.
    for (std::size_t k = 0; k < run.legs.size(); ++k) {
        if (halt_tp[k] == kEdge) {
            run.legs[k].start_time = run.appear_time;
        } else {
            run.legs[k].start_time = run.calls[halt_tp[k]].planned_departure;
        }
    }
    const RunLeg& last = run.legs.back();
    if (service.leaves_at_edge) {
        run.exit_speed = std::max(last.trajectory.v.back(), 0.1);
        run.vanish_time = last.start_time + last.trajectory.duration() + type.length / run.exit_speed;
    } else {
        PlannedCall& term = run.calls.back();
        term.planned_departure = term.planned_arrival + min_dwell_of(service.calls[term.call], type);
        term.scheduled_departure = kNoTime;
        run.vanish_time = term.planned_departure;
    }
    return run;
}

double ServiceRun::head_reach(double s) const {
    if (s <= legs.front().trajectory.s0 + 1e-9) {
        // Before the line end it came in over, extrapolate at its entry speed.
        if (path.starts_at_edge && s < 0.0 && entry_speed > 0.0) return appear_time + s / entry_speed;
        return appear_time;
    }
    for (const RunLeg& leg : legs)
        if (s <= leg.trajectory.s_end + 1e-9) return leg.start_time + leg.trajectory.time_at(s);
    if (path.ends_at_edge) {
        const RunLeg& leg = legs.back();
        return leg.start_time + leg.trajectory.duration() + (s - leg.trajectory.s_end) / exit_speed;
    }
    return vanish_time;
}

double ServiceRun::speed_at(double s) const {
    for (const RunLeg& leg : legs)
        if (s <= leg.trajectory.s_end + 1e-9) return leg.trajectory.speed_at(std::max(s, leg.trajectory.s0));
    return path.ends_at_edge ? exit_speed : 0.0;
}

double ServiceRun::head_leave(double s) const {
    const RunLeg& last = legs.back();
    if (s > last.trajectory.s_end + 1e-9) {
        if (path.ends_at_edge)
            return last.start_time + last.trajectory.duration() + (s - last.trajectory.s_end) / exit_speed;
        return vanish_time;
    }
    if (!path.ends_at_edge && s >= last.trajectory.s_end - 1e-9) return vanish_time;
    for (auto it = legs.rbegin(); it != legs.rend(); ++it)
        if (s >= it->trajectory.s0 - 1e-9) return it->start_time + it->trajectory.time_at(s);
    return legs.front().start_time;  // behind the start: the origin departure
}

}  // namespace knockon
