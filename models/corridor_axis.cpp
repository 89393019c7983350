#include "models/corridor_axis.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

namespace knockon {

namespace {

constexpr double kUnknownGap = 1000.0;   // [m] between stations no train runs between

// The corridor index of each station the path passes, in running order (-1: not on the corridor).
std::vector<long> corridor_indices(const net::Corridor& corridor, const TrainPath& path) {
    std::vector<long> out;
    for (const StationPass& p : path.stations) {
        const auto it = std::find(corridor.stations.begin(), corridor.stations.end(), p.station);
        out.push_back(it == corridor.stations.end() ? -1 : static_cast<long>(it - corridor.stations.begin()));
    }
    return out;
}

// The longest run [first, last] of path stations whose corridor indices step by +1 or by -1
// throughout (the first on a tie); last == first when no two consecutive stations qualify.
std::pair<std::size_t, std::size_t> longest_run(const std::vector<long>& idx) {
    std::pair<std::size_t, std::size_t> best{0, 0};
    for (std::size_t i = 0; i + 1 < idx.size(); ++i) {
        if (idx[i] < 0) continue;
        const long step = idx[i + 1] - idx[i];
        if (idx[i + 1] < 0 || (step != 1 && step != -1)) continue;
        std::size_t j = i + 1;
        while (j + 1 < idx.size() && idx[j + 1] >= 0 && idx[j + 1] - idx[j] == step) ++j;
        if (j - i > best.second - best.first) best = {i, j};
    }
    return best;
}

}  // namespace

double CorridorRun::position(double p) const {
    if (s.empty() || !(p >= s.front() && p <= s.back())) return std::numeric_limits<double>::quiet_NaN();
    const std::size_t k = static_cast<std::size_t>(std::upper_bound(s.begin(), s.end(), p) - s.begin());
    if (k >= s.size()) return at.back();
    const std::size_t i = k - 1;
    const double span = s[k] - s[i];
    return span > 0.0 ? at[i] + (at[k] - at[i]) * (p - s[i]) / span : at[i];
}

const CorridorRun* CorridorAxis::run_of(std::size_t train) const {
    for (const CorridorRun& r : runs)
        if (r.train == train) return &r;
    return nullptr;
}

CorridorAxis corridor_axis(const net::Corridor& corridor, const std::vector<TrainPlan>& trains) {
    CorridorAxis axis;
    axis.name = corridor.name;
    const std::size_t n = corridor.stations.size();
    // gap[k]: the shortest distance any train runs from station k to station k + 1 (either way).
    std::vector<double> gap(n > 0 ? n - 1 : 0, INFINITY);
    struct Part {
        std::size_t train;
        std::size_t first, last;   // into the path's stations
        std::vector<long> idx;
    };
    std::vector<Part> parts;
    for (std::size_t t = 0; t < trains.size(); ++t) {
        const TrainPath& path = trains[t].run.path;
        std::vector<long> idx = corridor_indices(corridor, path);
        const auto [first, last] = longest_run(idx);
        if (last == first) continue;
        for (std::size_t i = first; i < last; ++i) {
            const std::size_t k = static_cast<std::size_t>(std::min(idx[i], idx[i + 1]));
            gap[k] = std::min(gap[k], std::abs(path.stations[i + 1].s - path.stations[i].s));
        }
        parts.push_back({t, first, last, std::move(idx)});
    }
    double at = 0.0;
    for (std::size_t k = 0; k < n; ++k) {
        axis.stations.push_back({corridor.stations[k], at});
        if (k + 1 < n) at += std::isfinite(gap[k]) ? gap[k] : kUnknownGap;
    }
    for (const Part& p : parts) {
        const TrainPath& path = trains[p.train].run.path;
        CorridorRun run;
        run.train = p.train;
        run.along = p.idx[p.first + 1] > p.idx[p.first];
        for (std::size_t i = p.first; i <= p.last; ++i) {
            run.s.push_back(path.stations[i].s);
            run.at.push_back(axis.stations[static_cast<std::size_t>(p.idx[i])].at);
        }
        axis.runs.push_back(std::move(run));
    }
    return axis;
}

}  // namespace knockon
