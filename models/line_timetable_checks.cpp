#include "models/line_timetable_checks.hpp"

#include <string>
#include <utility>

#include "models/call_times.hpp"
#include "models/single_track.hpp"
#include "models/units.hpp"

namespace knockon {

namespace {

constexpr double kEps = kChainageTolerance;

const TrainType* find_type(const std::vector<TrainType>& types, const std::string& id) {
    for (const TrainType& t : types)
        if (t.id == id) return &t;
    return nullptr;
}

}  // namespace

ServiceCheck check_line_service(const Infrastructure& infrastructure, const InfrastructureCheck& infra,
                                const std::vector<TrainType>& types, const Service& svc, std::size_t index,
                                bool calls_complete, const UnreadFields& unread) {
    ServiceCheck out;
    auto add = [&](std::size_t call, std::string field, std::string message) {
        LineProblem p;
        p.kind = LineObject::service;
        p.index = index;
        p.call = call;
        p.field = std::move(field);
        p.message = std::move(message);
        out.problems.push_back(std::move(p));
        out.clean = false;
    };
    if (svc.calls.empty()) {
        add(LineProblem::kNone, "calls", "at least one call is needed");
        return out;
    }
    const bool up = svc.direction == Direction::up;
    const char* dir = to_string(svc.direction);
    const Station* prev = nullptr;
    for (std::size_t j = 0; j < svc.calls.size(); ++j) {
        const Call& call = svc.calls[j];
        if (unread.has(LineObject::service, index, "station", j)) {
            out.clean = false;
            continue;
        }
        const auto si = infra.station_index(call.station);
        if (!si) {
            add(j, "station", unknown_name("station", call.station, infra.station_ids));
            continue;
        }
        if (!infra.station_usable[*si]) {
            out.clean = false;
            continue;
        }
        const Station& st = infrastructure.stations[*si];
        if (prev && (up ? st.at <= prev->at : st.at >= prev->at))
            add(j, "station",
                std::string("calls must follow the running order of ") + (up ? "an up" : "a down") +
                    " service (chainage " + (up ? "increasing" : "decreasing") + "): " + st.id + " at " +
                    format_km(st.at) + " comes after " + prev->id + " at " + format_km(prev->at));
        prev = &st;
        if (call.track.empty()) continue;
        const auto ti = infra.track_index(call.track);
        if (!ti) {
            add(j, "track", unknown_name("track", call.track, infra.track_ids));
            continue;
        }
        if (!infra.track_usable[*ti]) {
            out.clean = false;
            continue;
        }
        const Track& tr = infrastructure.tracks[*ti];
        if (st.at < tr.from - kEps || st.at > tr.to + kEps) {
            add(j, "track",
                "track " + tr.id + " (" + format_km(tr.from) + " to " + format_km(tr.to) +
                    ") does not reach station " + st.id + " at " + format_km(st.at));
        } else if (!tr.allows(svc.direction)) {
            add(j, "track", "track " + tr.id + " does not carry " + dir + " trains");
        } else if (const TrainType* type = find_type(types, svc.train_type); type && call.stops && tr.is_loop()) {
            // A train standing in a loop must clear both its turnouts: its tail, a train length
            // in rear of the stopping mark, must lie within the loop (the rule planning also
            // applies to a train standing on the main track at a crossing).
            const StandingFit fit = standing_fit(tr.from, tr.to, st.at, svc.direction, type->length);
            if (!fit.fits)
                add(j, "track",
                    "service " + svc.id + " (train type " + type->id + ", " + format_km(type->length) +
                        " long) stops at " + st.id + " in loop " + tr.id + " (" + format_km(tr.from) + " to " +
                        format_km(tr.to) + "), but its tail would stand at " + format_km(fit.tail) +
                        ", outside the loop: the train does not fit");
        }
    }
    if (!calls_complete) {
        out.clean = false;
        return out;
    }
    // Given times must not run backwards along the calls (arr before dep within a call).
    for (const CallTimeProblem& p : call_time_problems(svc.calls)) add(p.call, p.key, p.message);
    const Call& first = svc.calls.front();
    if (!svc.enters_at_edge && (!first.stops || !first.departure))
        add(0, "",
            "the first call of a service that starts on the line must be a stop with dep given (a service "
            "coming from beyond the line end gives enter)");
    if (svc.enters_at_edge && !first.departure)
        add(0, "",
            "a service that enters from beyond the line end must give a time at its first call (dep or pass)");
    if (!svc.leaves_at_edge && !svc.calls.back().stops)
        add(svc.calls.size() - 1, "",
            "the last call of a service that ends on the line must be a stop (give leave: true if it runs on "
            "beyond the line end)");
    if (svc.calls.size() == 1 && !svc.enters_at_edge && !svc.leaves_at_edge)
        add(LineProblem::kNone, "calls", "a service that neither enters nor leaves the line needs at least two calls");
    return out;
}

}  // namespace knockon
