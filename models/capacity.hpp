#pragma once
// Capacity consumption by the compression method of UIC Code 406: within a line section and a
// time window, the trains are pushed together in timetable order as closely as their minimum
// headways allow; the occupation time runs from the first train to the first train of a repeat
// of the same pattern (the window treated as one cycle of a repeating timetable), so n identical
// trains at minimum headway h occupy n*h.
#include <vector>

#include "models/headway.hpp"
#include "models/scenario.hpp"

namespace knockon {

// Occupation time [s] of the trains (in timetable order) when compressed.  0 for no trains.
double compressed_occupation(const std::vector<SectionStairway>& trains_in_order);

// The trains whose reference time lies in [from, to), compressed, as a share of the window.
struct WindowConsumption {
    double from = 0.0, to = 0.0;   // [s]
    std::size_t trains = 0;
    double occupation = 0.0;       // [s]
    double consumption = 0.0;      // share of the window
};
WindowConsumption window_consumption(const std::vector<SectionStairway>& trains_in_order, double from, double to);
// The peak hour: the whole clock hour of the day with the highest consumption (earliest on ties).
WindowConsumption peak_hour_consumption(const std::vector<SectionStairway>& trains_in_order);
// Every whole clock hour from the one holding the first train's reference time to the one holding
// the last's, each compressed on its own (an hour without trains gives 0): the hour-by-hour profile
// of a day.  Empty for no trains.
std::vector<WindowConsumption> hourly_consumption(const std::vector<SectionStairway>& trains_in_order);
// The whole day, 00:00 to 24:00.
WindowConsumption day_consumption(const std::vector<SectionStairway>& trains_in_order);

struct ConsumptionLimit {
    double peak = 0.0, day = 0.0;   // shares, e.g. 0.75
};
// Recommended limits of UIC Code 406 (2004) by line type, as recalled (not checked against the leaflet).
ConsumptionLimit uic406_limit(LineType type);

}  // namespace knockon
