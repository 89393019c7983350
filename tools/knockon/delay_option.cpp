#include "tools/knockon/delay_option.hpp"

#include "models/input_ranges.hpp"
#include "models/units.hpp"
#include "tools/knockon/commands.hpp"

namespace knockon::cli {

InjectedDelays parse_delays(const std::vector<std::string>& specs, const std::vector<TrainPlan>& trains) {
    InjectedDelays d;
    d.entry.assign(trains.size(), 0.0);
    d.dwell.resize(trains.size());
    d.running.resize(trains.size());
    for (std::size_t t = 0; t < trains.size(); ++t) {
        d.dwell[t].assign(trains[t].run.service->calls.size(), 0.0);
        d.running[t].assign(trains[t].run.service->calls.size(), 0.0);
    }
    for (const std::string& spec : specs) {
        auto fail = [&](const std::string& why) {
            throw UsageError("--delay " + spec + ": " + why + " (form: TRAIN:entry:MINUTES, TRAIN:dwell@STATION:MINUTES "
                             "or TRAIN:run@STATION:MINUTES)");
        };
        const auto first = spec.find(':'), last = spec.rfind(':');
        if (first == std::string::npos || first == last) fail("expected three parts separated by ':'");
        const std::string train = spec.substr(0, first), where = spec.substr(first + 1, last - first - 1);
        double minutes = 0.0;
        try {
            minutes = parse_number(spec.substr(last + 1));
        } catch (const std::exception& e) {
            fail(std::string("minutes: ") + e.what());
        }
        if (!(minutes >= 0.0)) fail("minutes must not be negative");
        // As the scenario's delays (README, "Input ranges"): one delay stays within a day.
        if (60.0 * minutes > kLongestDelay) fail("minutes must be at most " + std::to_string(static_cast<int>(kLongestDelay / 60.0)) + " (a delay within a day)");
        std::size_t t = trains.size();
        for (std::size_t i = 0; i < trains.size(); ++i)
            if (trains[i].run.service->id == train) t = i;
        if (t == trains.size()) fail("no train '" + train + "' in the timetable");
        const Service& svc = *trains[t].run.service;
        if (where == "entry") {
            d.entry[t] += 60.0 * minutes;
            continue;
        }
        const auto at = where.find('@');
        const std::string kind = where.substr(0, at), station = at == std::string::npos ? "" : where.substr(at + 1);
        if ((kind != "dwell" && kind != "run") || station.empty()) fail("WHERE must be entry, dwell@STATION or run@STATION");
        std::size_t call = svc.calls.size();
        for (std::size_t c = 0; c < svc.calls.size(); ++c)
            if (svc.calls[c].station == station) call = c;
        if (call == svc.calls.size()) fail("train " + train + " has no call at '" + station + "'");
        if (kind == "dwell") {
            if (!svc.calls[call].stops) fail("train " + train + " does not stop at " + station);
            d.dwell[t][call] += 60.0 * minutes;
        } else {
            if (call + 1 == svc.calls.size() && !svc.leaves_at_edge) fail("train " + train + " ends at " + station);
            d.running[t][call] += 60.0 * minutes;
        }
    }
    return d;
}

}  // namespace knockon::cli
