#include "models/call_times.hpp"

#include <optional>
#include <utility>

#include "models/units.hpp"

namespace knockon {

std::vector<CallTimeProblem> call_time_problems(const std::vector<Call>& calls) {
    std::vector<CallTimeProblem> out;
    std::optional<double> last;
    std::string last_what;
    for (std::size_t j = 0; j < calls.size(); ++j) {
        const Call& call = calls[j];
        const std::pair<const char*, std::optional<double>> times[] = {{"arr", call.arrival},
                                                                       {call.stops ? "dep" : "pass", call.departure}};
        for (const auto& [key, t] : times) {
            if (!t) continue;
            if (last && *t < *last)
                out.push_back({j, key, std::string(key) + " " + format_time_of_day(*t) + " is earlier than " + last_what});
            last = t;
            last_what = std::string(key) + " " + format_time_of_day(*t) + " at " + call.station;
        }
    }
    return out;
}

}  // namespace knockon
