#include "sim/day_records.hpp"

#include <cmath>

#include "sim/deadlock_text.hpp"

namespace knockon::day {

DayRecords::DayRecords(const SimModel& model, const InjectedDelays& delays) : model_(model), delays_(delays) {
    const auto& trains = model.trains();
    out_.section_names = model.section_names();
    std::size_t calls = 0, sections = 0, routes = 0;
    for (const SimModel::Train& tr : trains) {
        calls += tr.plan->run.calls.size();
        sections += tr.plan->stairway.sections.size();
        routes += tr.routes.size();
    }
    out_.timing.reserve(calls);
    for (const LinkPlan& l : model.links()) {
        LinkRecord r;
        r.from = static_cast<std::uint32_t>(l.from);
        r.to = static_cast<std::uint32_t>(l.to);
        r.connection = l.kind == LinkKind::connection;
        out_.links.push_back(r);
    }
    out_.sections.reserve(sections + sections / 8);
    out_.routes.reserve(routes);
    timing_first_.resize(trains.size());
    for (std::uint32_t t = 0; t < trains.size(); ++t) {
        const ServiceRun& run = trains[t].plan->run;
        out_.train_ids.push_back(run.service->id);
        timing_first_[t] = static_cast<long>(out_.timing.size());
        for (const PlannedCall& c : run.calls) {
            TimingRecord r;
            r.train = t;
            r.call = static_cast<std::uint32_t>(c.call);
            r.station = c.station;
            r.stops = c.stops;
            r.scheduled_arrival = c.scheduled_arrival;
            r.scheduled_departure = c.scheduled_departure;
            r.arrival = r.departure = kNoTime;
            r.arrival_delay = r.departure_delay = kNoTime;
            out_.timing.push_back(r);
        }
    }
}

void DayRecords::record_call(TrainState& s, std::uint32_t t, std::size_t tp, double arrival, double departure,
                             const HoldCause& cause) {
    TimingRecord& r = timing(t, tp);
    const ServiceRun& run = model_.trains()[t].plan->run;
    if (!std::isnan(arrival)) {
        r.arrival = arrival;
        r.arrival_delay = arrival - r.scheduled_arrival;
        // Running time lost to other trains: as run minus unhindered (plus own slow running).
        double expected;
        if (tp == 0) {
            expected = run.calls[0].planned_arrival - run.appear_time;
        } else {
            expected = run.calls[tp].technical_running +
                       delay_of(delays_.running, t, run.calls[tp - 1].call);
        }
        // Below half a second it is integration noise (motion recomputed from other grid points).
        const double lost = std::isnan(s.last_departure) ? 0.0 : arrival - s.last_departure - expected;
        if (lost > kNoiseFloor) add_knock_on(timing_first_[t] + static_cast<long>(tp), lost, s.last_departure, arrival, true);
    }
    if (!std::isnan(departure)) {
        r.departure = departure;
        r.departure_delay = departure - r.scheduled_departure;
        if (!std::isnan(s.ready_time) && departure - s.ready_time > kNoiseFloor)
            add_knock_on(timing_first_[t] + static_cast<long>(tp), departure - s.ready_time, s.ready_time, departure,
                         false, cause);
        s.last_departure = departure;
    }
}

void DayRecords::record_pass(TrainState& s, std::uint32_t t, std::size_t tp, double now) {
    record_call(s, t, tp, now, kNoTime);
    TimingRecord& r = timing(t, tp);
    r.departure = now;
    r.departure_delay = now - r.scheduled_departure;
    s.last_departure = now;
}

void DayRecords::put_deadlock_into_words() {
    knockon::put_deadlock_into_words(out_.deadlock, out_.train_ids, out_.section_names);
}

}  // namespace knockon::day
