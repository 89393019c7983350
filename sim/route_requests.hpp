#pragma once
// When each train asks for each route of its path.  With no disturbance a route is set exactly
// when blocking time theory says it must be: the driver knows it at the warning point (or, for
// a train standing at a stop, at its departure), so it is asked for the sight-and-reaction and
// set-up times before.  A delayed or hindered train asks when its forecast says so; a train kept
// by a link (a turnaround, a connection, a crew) asks for the departure the link lets it make.
//
// Why a class of its own: the request time is a forecast of the train's motion and of its
// links, made before the authority (sim/movement_authority) is asked; it is one rule, read here
// by the event loop (sim/simulation) and nowhere else; the links' part is sim/day_links.
#include <cstdint>

#include "sim/day_links.hpp"
#include "sim/day_state.hpp"
#include "sim/train_motion.hpp"

namespace knockon::day {

class RouteRequests {
public:
    RouteRequests(const SimModel& model, const InjectedDelays& delays, std::vector<TrainState>& states,
                  DayEvents& events, const TrainMotion& motion, const DayLinks& links)
        : model_(model),
          delays_(delays),
          times_(model.interlocking()),
          st_(states.data()),
          events_(events),
          motion_(motion),
          links_(links) {}

    // Puts train t's next route request in the queue, timed by desired_request_time (none while
    // one is pending, none left, or its time not known yet).
    void schedule_next(std::uint32_t t) {
        const TrainState& s = st_[t];
        if (s.next_request >= model_.trains()[t].routes.size() || s.request_pending) return;
        const double when = desired_request_time(t, s.next_request);
        if (!std::isnan(when)) events_.push(when, kRequest, t, static_cast<std::uint32_t>(s.next_request));
    }
    // A request event of train t for route i, pushed for `time`: whether it goes out now (a
    // request timed by links is timed again; it may be due later, or not yet known).
    bool due(std::uint32_t t, std::size_t i, SimTime time);
    // When train t should ask for route i (NaN: not known yet; a time passed: at once).
    double desired_request_time(std::uint32_t t, std::size_t route) const;
    // The stop whose departure times route i's request through DayLinks::released (the stop the
    // route leaves, or one before its warning point), if links are timed into it; else -1.
    long link_timed_stop(std::uint32_t t, std::size_t i) const;

private:
    const SimModel::Train& train(std::uint32_t t) const { return model_.trains()[t]; }
    const ServiceRun& run_of(std::uint32_t t) const { return train(t).plan->run; }
    double now() const { return events_.now(); }

    const SimModel& model_;
    const InjectedDelays& delays_;
    const InterlockingTimes& times_;
    TrainState* const st_;   // the engine's train states, one per train for the whole day
    DayEvents& events_;
    const TrainMotion& motion_;
    const DayLinks& links_;
};

}  // namespace knockon::day
