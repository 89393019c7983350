#include "models/capacity.hpp"

#include <algorithm>
#include <cmath>

namespace knockon {

double compressed_occupation(const std::vector<SectionStairway>& trains) {
    if (trains.empty()) return 0.0;
    // Position of each train in the compressed timetable, relative to the first.
    std::vector<double> pos(trains.size(), 0.0);
    for (std::size_t j = 1; j < trains.size(); ++j) {
        pos[j] = pos[j - 1];  // keep the timetable order
        for (std::size_t i = 0; i < j; ++i)
            if (auto h = minimum_headway(trains[i], trains[j])) pos[j] = std::max(pos[j], pos[i] + h->headway);
    }
    // Close the cycle: the first train again, as early as every train allows.
    double close = pos.back();
    for (std::size_t i = 0; i < trains.size(); ++i)
        if (auto h = minimum_headway(trains[i], trains.front())) close = std::max(close, pos[i] + h->headway);
    return close;
}

WindowConsumption window_consumption(const std::vector<SectionStairway>& ordered, double from, double to) {
    std::vector<SectionStairway> in;
    for (const SectionStairway& s : ordered)
        if (s.reference >= from && s.reference < to) in.push_back(s);
    WindowConsumption w{from, to, in.size(), compressed_occupation(in), 0.0};
    w.consumption = w.occupation / (to - from);
    return w;
}

WindowConsumption peak_hour_consumption(const std::vector<SectionStairway>& ordered) {
    constexpr double kHour = 3600.0;
    WindowConsumption peak = window_consumption(ordered, 0.0, kHour);
    for (int h = 1; h < 24; ++h) {
        WindowConsumption w = window_consumption(ordered, h * kHour, (h + 1) * kHour);
        if (w.consumption > peak.consumption + 1e-12) peak = w;
    }
    return peak;
}

std::vector<WindowConsumption> hourly_consumption(const std::vector<SectionStairway>& ordered) {
    constexpr double kHour = 3600.0;
    std::vector<WindowConsumption> out;
    if (ordered.empty()) return out;
    double lo = ordered.front().reference, hi = lo;
    for (const SectionStairway& s : ordered) {
        lo = std::min(lo, s.reference);
        hi = std::max(hi, s.reference);
    }
    for (double h = std::floor(lo / kHour); h <= std::floor(hi / kHour); h += 1.0)
        out.push_back(window_consumption(ordered, h * kHour, (h + 1.0) * kHour));
    return out;
}

WindowConsumption day_consumption(const std::vector<SectionStairway>& ordered) {
    return window_consumption(ordered, 0.0, 86400.0);
}

ConsumptionLimit uic406_limit(LineType type) {
    switch (type) {
        case LineType::suburban: return {0.85, 0.70};
        case LineType::high_speed: return {0.75, 0.60};
        case LineType::mixed: return {0.75, 0.60};
    }
    return {0.75, 0.60};
}

}  // namespace knockon
