#include "sim/comparison.hpp"

#include <limits>
#include <stdexcept>

namespace knockon {

PairedFigure paired_figure(const std::vector<double>& first, const std::vector<double>& other) {
    if (first.size() != other.size())
        throw std::invalid_argument("paired comparison: " + std::to_string(first.size()) + " and " +
                                    std::to_string(other.size()) + " replications; they must be equal");
    if (first.empty()) {   // no day to pair: no figure rather than a zero that looks like one
        Estimate none;
        none.mean = none.half_width = none.lower = none.upper = std::numeric_limits<double>::quiet_NaN();
        return {none, none, none};
    }
    std::vector<double> diff(first.size());
    for (std::size_t k = 0; k < first.size(); ++k) diff[k] = other[k] - first[k];
    return {estimate_mean(first), estimate_mean(other), estimate_mean(diff)};
}

StudyComparison compare_studies(const StudyResult& first, const StudyResult& other,
                                const std::vector<double>& thresholds) {
    const auto& a = first.replications;
    const auto& b = other.replications;
    if (a.size() != b.size())
        throw std::invalid_argument("paired comparison: the studies hold " + std::to_string(a.size()) + " and " +
                                    std::to_string(b.size()) + " replications; they must be equal");
    for (std::size_t k = 0; k < a.size(); ++k) {
        if (a[k].replication != b[k].replication)
            throw std::invalid_argument("paired comparison: replication " + std::to_string(a[k].replication) +
                                        " is paired with replication " + std::to_string(b[k].replication));
        if (a[k].punctuality.size() != thresholds.size() || b[k].punctuality.size() != thresholds.size())
            throw std::invalid_argument("paired comparison: punctuality shares do not match the thresholds");
    }
    // Only the days that ran to the end in both studies are paired: a day deadlocked in either
    // is a result, never a figure.
    std::vector<std::size_t> both;
    for (std::size_t k = 0; k < a.size(); ++k)
        if (!a[k].deadlocked && !b[k].deadlocked) both.push_back(k);
    auto collect = [&](const std::vector<ReplicationStats>& reps, auto field) {
        std::vector<double> v;
        v.reserve(both.size());
        for (std::size_t k : both) v.push_back(field(reps[k]));
        return v;
    };
    auto pair = [&](auto field) { return paired_figure(collect(a, field), collect(b, field)); };

    StudyComparison c;
    c.replications = a.size();
    c.paired = both.size();
    c.thresholds = thresholds;
    c.total_knock_on = pair([](const ReplicationStats& r) { return r.total_knock_on; });
    c.mean_arrival_delay = pair([](const ReplicationStats& r) { return r.mean_arrival_delay; });
    c.total_primary = pair([](const ReplicationStats& r) { return r.total_primary; });
    for (std::size_t i = 0; i < thresholds.size(); ++i)
        c.punctuality.push_back(pair([i](const ReplicationStats& r) { return r.punctuality[i]; }));
    return c;
}

PlanFigures plan_figures(const PlanResult& plan) {
    PlanFigures f;
    double sum = 0.0;
    for (const HeadwayPair& h : plan.headways) sum += h.minimum_headway;
    f.headway_pairs = plan.headways.size();
    f.mean_minimum_headway = f.headway_pairs ? sum / static_cast<double>(f.headway_pairs) : 0.0;
    for (const CapacityFigure& c : plan.capacity) {
        const std::string where = c.line_section + (c.direction == Direction::up ? " up" : " down");
        if (c.window == "day") {
            if (f.day_section.empty() || c.consumption > f.day_consumption) {
                f.day_consumption = c.consumption;
                f.day_section = where;
            }
        } else if (f.peak_section.empty() || c.consumption > f.peak_consumption) {
            f.peak_consumption = c.consumption;
            f.peak_section = where;
        }
    }
    return f;
}

}  // namespace knockon
