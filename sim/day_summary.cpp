#include "sim/day_summary.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

namespace knockon {

bool within(double delay_seconds, double threshold_seconds) { return delay_seconds < threshold_seconds; }

DaySummary summarize_day(const SimResult& r, const std::vector<double>& thresholds) {
    DaySummary s;
    s.trains = r.train_ids.size();
    s.thresholds = thresholds;
    s.punctuality.assign(thresholds.size(), 0.0);
    std::vector<TrainDelay> per(s.trains);
    for (std::uint32_t t = 0; t < s.trains; ++t) per[t].train = t;
    double sum = 0.0;
    for (std::size_t i = 0; i < r.timing.size(); ++i) {
        const TimingRecord& tr = r.timing[i];
        if (!std::isnan(tr.arrival) || !std::isnan(tr.departure)) per[tr.train].last_reached = static_cast<long>(i);
        if (std::isnan(tr.arrival_delay)) continue;
        ++s.arrivals;
        const double d = std::max(0.0, tr.arrival_delay);
        sum += d;
        for (std::size_t i = 0; i < thresholds.size(); ++i)
            if (within(tr.arrival_delay, thresholds[i])) s.punctuality[i] += 1.0;
        per[tr.train].max_delay = std::max(per[tr.train].max_delay, d);
        per[tr.train].final_delay = d;  // records are in running order: the last one wins
    }
    for (const HoldRecord& h : r.holds) {
        per[h.train].held += h.to - h.from;
        s.total_held += h.to - h.from;
    }
    for (std::size_t l = 0; l < r.links.size(); ++l) {
        const LinkRecord& k = r.links[l];
        s.total_link_wait += k.waited;
        if (k.connection) {
            ++s.connections;
            if (k.missed) ++s.missed_connections;
        }
    }
    if (s.arrivals) {
        s.mean_arrival_delay = sum / static_cast<double>(s.arrivals);
        for (double& p : s.punctuality) p /= static_cast<double>(s.arrivals);
    }
    for (const TrainDelay& d : per) s.total_final_delay += d.final_delay;
    // A train has finished when its last timing point was reached (records are per train, in order).
    for (std::size_t i = 0; i < r.timing.size(); ++i) {
        bool last = i + 1 == r.timing.size() || r.timing[i + 1].train != r.timing[i].train;
        if (last && !std::isnan(r.timing[i].arrival)) {
            ++s.finished;
            per[r.timing[i].train].finished = true;
        }
    }
    if (r.deadlock.deadlocked) {
        s.complete = false;
        const double none = std::numeric_limits<double>::quiet_NaN();
        s.punctuality.assign(thresholds.size(), none);
        s.mean_arrival_delay = s.total_final_delay = none;
    }
    s.trains_by_delay = per;
    std::stable_sort(s.trains_by_delay.begin(), s.trains_by_delay.end(),
                     [](const TrainDelay& a, const TrainDelay& b) { return a.final_delay > b.final_delay; });
    return s;
}

}  // namespace knockon
