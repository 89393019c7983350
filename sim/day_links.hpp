#pragma once
// The links between trains (models/links: turnarounds, connections, crew links) as a simulated
// day runs: until when a link keeps its later train at a stop, the earlier train's arrival that
// lets it go, which link kept it longest, and the link records written when it leaves.
//
// Why a class of its own: a link's hold is one rule read by the departure (sim/simulation), by
// the time a route out is asked for (sim/route_requests) and by the deadlock report; kept here
// with the records of links it reads, no copy of it lives elsewhere.
#include <cmath>
#include <cstdint>
#include <vector>

#include "sim/day_records.hpp"
#include "sim/day_state.hpp"

namespace knockon::day {

class DayLinks {
public:
    DayLinks(const SimModel& model, std::vector<TrainState>& states, DayEvents& events, DayRecords& records)
        : model_(model), st_(states.data()), events_(events), records_(records) {}

    // Until when the links into timing point k keep train t there (minus infinity: none;
    // infinity: an earlier train it must wait for has not arrived).  A connection is waited for
    // up to its planned departure plus the maximum wait.
    double hold(std::uint32_t t, long k) const;
    // When train t, ready to leave timing point k at `ready`, is let go by its links there: the
    // time a route request for that departure is timed from (the one rule for it: a train kept by
    // a link must not hold its route out, and with it other trains, while it waits).  A link
    // whose earlier train has arrived holds it until `hold`; one whose earlier train has not,
    // at least until the earliest that train can arrive, its planned arrival (no train runs
    // ahead of its plan), plus the minimum time.  Once that has passed with the train still to
    // come the time is not known (NaN): `arrive` asks again.  A connection lets go by its
    // latest departure in any case.
    double released(std::uint32_t t, long k, double ready) const;
    // Wakes train t, held by its links at its stop, when they would let it go.
    void schedule_check(std::uint32_t t) {
        const double until = hold(t, st_[t].stop_call);
        if (std::isfinite(until) && until > events_.now()) events_.push(until, kLinkCheck, t);
    }
    // The earlier train t of links arrives at timing point k: the later trains may go after the
    // minimum time (a link check for each); `later(train)` is told of each later train.
    template <class Later>
    void arrive(std::uint32_t t, std::size_t k, Later&& later) {
        const double now = events_.now();
        for (std::uint32_t l : model_.trains()[t].links_out) {
            const LinkPlan& link = model_.links()[l];
            if (link.from_call != k) continue;
            records_.link(l).arrival = now;
            double go = now + link.min_time;
            if (link.kind == LinkKind::connection) go = std::min(go, link.wait_until());
            events_.push(std::max(go, now), kLinkCheck, static_cast<std::uint32_t>(link.to));
            later(static_cast<std::uint32_t>(link.to));
        }
    }
    // Train t leaves timing point k: its links' records, and the link that held it longest (or -1).
    long finish(std::uint32_t t, std::size_t k);
    // The link into k that lets t go last, or -1.
    long binding(std::uint32_t t, std::size_t k) const;
    // The link that keeps t for good when the day stops: one whose earlier train has not arrived,
    // holding t ready at a stop or keeping a formed service from appearing; else -1.
    long stuck(std::uint32_t t) const;
    // The formed services' sets (turnaround links into t) have all arrived and left the model.
    bool set_arrived(std::uint32_t t) const {
        for (std::uint32_t l : model_.trains()[t].links_in) {
            const LinkPlan& link = model_.links()[l];
            if (link.kind == LinkKind::turnaround && st_[link.from].phase != Phase::finished) return false;
        }
        return true;
    }
    // Train t's set has left the platform: the services it forms, waiting for it, may appear.
    void set_left(std::uint32_t t);
    // What a link kept a train for (kind none for no link).
    HoldCause cause(long l) const {
        HoldCause c;
        if (l < 0) return c;
        c.kind = HoldCause::Kind::link;
        c.link = static_cast<std::uint32_t>(l);
        c.train = static_cast<std::uint32_t>(model_.links()[static_cast<std::size_t>(l)].from);
        return c;
    }

private:
    const SimModel& model_;
    TrainState* const st_;   // the engine's train states, one per train for the whole day
    DayEvents& events_;
    DayRecords& records_;
};

}  // namespace knockon::day
