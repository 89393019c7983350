#include "sim/study.hpp"

#include <algorithm>
#include <cmath>
#include <map>
#include <mutex>
#include <stdexcept>
#include <thread>

#include <boost/math/distributions/students_t.hpp>

#include "sim/day_summary.hpp"

namespace knockon {

ReplicationStats replication_stats(const SimModel& model, const SimResult& day, const InjectedDelays& delays,
                                   const std::vector<double>& thresholds, std::uint32_t replication) {
    ReplicationStats r;
    r.replication = replication;
    r.deadlocked = day.deadlock.deadlocked;
    r.events = day.events;
    r.block_passages = day.block_passages;
    const DaySummary d = summarize_day(day, thresholds);
    r.mean_arrival_delay = d.mean_arrival_delay;
    r.punctuality = d.punctuality;
    const std::size_t n = day.train_ids.size();
    r.train_primary.assign(n, 0.0f);
    r.train_knock_on.assign(n, 0.0f);
    r.train_final_delay.assign(n, 0.0f);
    for (const TrainDelay& td : d.trains_by_delay) r.train_final_delay[td.train] = static_cast<float>(td.final_delay);
    for (std::size_t t = 0; t < n; ++t) {
        double p = t < delays.entry.size() ? delays.entry[t] : 0.0;
        for (const auto* v : {&delays.dwell, &delays.running})
            if (t < v->size())
                for (double x : (*v)[t]) p += x;
        r.train_primary[t] = static_cast<float>(p);
        r.total_primary += p;
    }
    r.arrival_delay.reserve(day.timing.size());
    r.knock_on.reserve(day.timing.size());
    for (const TimingRecord& tr : day.timing) {
        r.arrival_delay.push_back(static_cast<float>(tr.arrival_delay));
        r.knock_on.push_back(static_cast<float>(tr.knock_on));
        r.train_knock_on[tr.train] += static_cast<float>(tr.knock_on);
        r.total_knock_on += tr.knock_on;
    }
    for (const HoldRecord& h : day.holds) r.held[h.signal] += h.to - h.from;
    r.section_blocked.assign(day.section_names.size(), 0.0f);
    for (const SectionRecord& s : day.sections)
        if (!std::isnan(s.released) && !std::isnan(s.locked))
            r.section_blocked[s.section] += static_cast<float>(s.released - s.locked);
    // As-run buffers on the planned critical sections.
    std::map<std::pair<std::uint32_t, std::uint32_t>, const SectionRecord*> use;   // (train, section)
    for (const SectionRecord& s : day.sections) use.emplace(std::make_pair(s.train, s.section), &s);
    for (const SimModel::BufferPair& bp : model.buffer_pairs()) {
        auto l = use.find({bp.leader, bp.section}), f = use.find({bp.follower, bp.section});
        double b = std::nanf("");
        if (l != use.end() && f != use.end()) b = f->second->locked - l->second->released;
        r.buffer.push_back(static_cast<float>(b));
    }
    return r;
}

StudyResult run_study(const SimModel& model, const StudyOptions& options) {
    if (!options.draw) throw std::invalid_argument("run_study: no primary-delay draw given");
    if (options.replications == 0) throw std::invalid_argument("run_study: at least one replication is needed");
    StudyResult out;
    const unsigned threads = std::max(1u, options.threads);
    const std::uint32_t cap = options.replications;
    const std::uint32_t batch = std::max<std::uint32_t>(1, options.batch);

    std::vector<ReplicationStats> done;
    std::map<std::uint32_t, SimResult> traces;   // finished but not yet handed over, by replication
    std::uint32_t next_trace = 0;
    std::mutex trace_mutex;

    auto run_one = [&](std::uint32_t k, ReplicationStats& slot) {
        InjectedDelays delays = options.draw(k);
        SimResult day = simulate_day(model, delays, options.sim);
        slot = replication_stats(model, day, delays, options.thresholds, k);
        if (k == 0) {
            std::lock_guard<std::mutex> lock(trace_mutex);
            out.train_ids = day.train_ids;
            out.section_names = day.section_names;
            out.timing_template = day.timing;
        }
        if (options.on_trace && options.trace && options.trace(k)) {
            std::lock_guard<std::mutex> lock(trace_mutex);
            traces.emplace(k, std::move(day));
        }
    };

    std::uint32_t started = 0;
    while (started < cap) {
        // One batch: a fixed number of replications whatever the thread count, so that stopping
        // decisions (until_ci, Ctrl-C) fall on the same replication for any --threads.
        const std::uint32_t end = std::min(cap, started + batch);
        std::vector<ReplicationStats> slots(end - started);
        std::atomic<std::uint32_t> next{started};
        std::exception_ptr failure;
        std::mutex failure_mutex;
        auto worker = [&] {
            for (std::uint32_t k; (k = next.fetch_add(1)) < end;) {
                try {
                    run_one(k, slots[k - started]);
                } catch (...) {
                    std::lock_guard<std::mutex> lock(failure_mutex);
                    if (!failure) failure = std::current_exception();
                }
            }
        };
        std::vector<std::thread> pool;
        for (unsigned i = 1; i < threads; ++i) pool.emplace_back(worker);
        worker();
        for (std::thread& th : pool) th.join();
        if (failure) std::rethrow_exception(failure);
        for (ReplicationStats& r : slots) done.push_back(std::move(r));
        started = end;

        // Hand over traces in replication order.
        while (true) {
            auto it = traces.find(next_trace);
            if (it != traces.end()) {
                options.on_trace(it->first, it->second);
                traces.erase(it);
                ++next_trace;
            } else if (next_trace < started && !(options.trace && options.trace(next_trace))) {
                ++next_trace;
            } else {
                break;
            }
        }
        if (options.progress) options.progress(started, cap);
        if (options.stop && options.stop->load()) {
            out.partial = started < cap;
            break;
        }
        if (options.until_ci > 0.0 && done.size() >= 10) {
            std::vector<double> k;
            for (const ReplicationStats& r : done) k.push_back(r.total_knock_on);
            if (estimate_mean(k).half_width < options.until_ci) break;
        }
    }
    out.replications = std::move(done);
    return out;
}

Estimate estimate_mean(const std::vector<double>& values) {
    Estimate e;
    e.n = values.size();
    if (values.empty()) return e;
    double sum = 0.0;
    for (double v : values) sum += v;
    e.mean = sum / static_cast<double>(e.n);
    e.lower = e.upper = e.mean;
    if (e.n < 2) return e;
    double ss = 0.0;
    for (double v : values) ss += (v - e.mean) * (v - e.mean);
    const double sd = std::sqrt(ss / static_cast<double>(e.n - 1));
    boost::math::students_t t(static_cast<double>(e.n - 1));
    e.half_width = boost::math::quantile(t, 0.975) * sd / std::sqrt(static_cast<double>(e.n));
    e.lower = e.mean - e.half_width;
    e.upper = e.mean + e.half_width;
    return e;
}

Estimate estimate_share(std::size_t successes, std::size_t n) {
    Estimate e;
    e.n = n;
    if (n == 0) return e;
    // Wilson score interval (z = 1.96): stays inside [0, 1] and is sound near 0 and 1.
    const double z = 1.959963984540054, nn = static_cast<double>(n);
    const double p = static_cast<double>(successes) / nn;
    const double denom = 1.0 + z * z / nn;
    const double centre = (p + z * z / (2.0 * nn)) / denom;
    const double half = z * std::sqrt(p * (1.0 - p) / nn + z * z / (4.0 * nn * nn)) / denom;
    e.mean = p;
    e.half_width = half;
    e.lower = centre - half;
    e.upper = centre + half;
    return e;
}

Quantiles quantiles(std::vector<double> v) {
    Quantiles q;
    if (v.empty()) return q;
    std::sort(v.begin(), v.end());
    auto at = [&](double p) {
        const double pos = p * static_cast<double>(v.size() - 1);
        const std::size_t lo = static_cast<std::size_t>(std::floor(pos));
        const std::size_t hi = std::min(lo + 1, v.size() - 1);
        return v[lo] + (pos - static_cast<double>(lo)) * (v[hi] - v[lo]);
    };
    q.p50 = at(0.5);
    q.p90 = at(0.9);
    q.p95 = at(0.95);
    q.max = v.back();
    return q;
}

StudySummary summarize_study(const SimModel& model, const StudyResult& study, const std::vector<double>& thresholds) {
    StudySummary s;
    const auto& reps = study.replications;
    s.replications = reps.size();
    s.thresholds = thresholds;
    if (reps.empty()) return s;
    auto collect = [&](auto field) {
        std::vector<double> v;
        v.reserve(reps.size());
        for (const ReplicationStats& r : reps) v.push_back(field(r));
        return v;
    };
    for (const ReplicationStats& r : reps) s.deadlocked += r.deadlocked ? 1 : 0;
    s.total_primary = estimate_mean(collect([](const ReplicationStats& r) { return r.total_primary; }));
    s.total_knock_on = estimate_mean(collect([](const ReplicationStats& r) { return r.total_knock_on; }));
    s.mean_arrival_delay = estimate_mean(collect([](const ReplicationStats& r) { return r.mean_arrival_delay; }));
    s.knock_on_ratio = s.total_primary.mean > 0.0 ? s.total_knock_on.mean / s.total_primary.mean : 0.0;
    for (std::size_t i = 0; i < thresholds.size(); ++i)
        s.punctuality.push_back(estimate_mean(collect([&](const ReplicationStats& r) { return r.punctuality[i]; })));

    // Per timing point.
    const auto& tmpl = study.timing_template;
    for (std::size_t k = 0; k < tmpl.size(); ++k) {
        TimingPointStats tp;
        tp.train = tmpl[k].train;
        tp.station = tmpl[k].station;
        tp.stops = tmpl[k].stops;
        std::vector<double> delays, knock;
        std::vector<std::size_t> within_count(thresholds.size(), 0);
        for (const ReplicationStats& r : reps) {
            knock.push_back(r.knock_on[k]);
            const double d = r.arrival_delay[k];
            if (std::isnan(d)) continue;
            delays.push_back(std::max(0.0, d));
            for (std::size_t i = 0; i < thresholds.size(); ++i)
                if (within(d, thresholds[i])) ++within_count[i];
        }
        tp.reached = delays.size();
        tp.knock_on = estimate_mean(knock);
        if (!delays.empty()) {
            tp.delay = estimate_mean(delays);
            tp.delay_quantiles = quantiles(delays);
            for (std::size_t i = 0; i < thresholds.size(); ++i)
                tp.punctuality.push_back(estimate_share(within_count[i], delays.size()));
        }
        s.timing_points.push_back(std::move(tp));
    }
    // Per train.
    for (std::uint32_t t = 0; t < study.train_ids.size(); ++t) {
        TrainStats ts;
        ts.train = t;
        ts.primary = estimate_mean(collect([&](const ReplicationStats& r) { return r.train_primary[t]; }));
        ts.knock_on = estimate_mean(collect([&](const ReplicationStats& r) { return r.train_knock_on[t]; }));
        ts.final_delay = estimate_mean(collect([&](const ReplicationStats& r) { return r.train_final_delay[t]; }));
        s.trains.push_back(ts);
    }
    // Signals where trains stood, largest first.
    std::map<std::string, std::vector<double>> held;
    for (const ReplicationStats& r : reps)
        for (const auto& [sig, secs] : r.held) held[sig];
    for (auto& [sig, v] : held)
        for (const ReplicationStats& r : reps) {
            auto it = r.held.find(sig);
            v.push_back(it == r.held.end() ? 0.0 : it->second);
        }
    for (auto& [sig, v] : held) s.signals.push_back({sig, estimate_mean(v)});
    std::stable_sort(s.signals.begin(), s.signals.end(),
                     [](const SignalStats& a, const SignalStats& b) { return a.held.mean > b.held.mean; });
    // As-run blocked share of the day per section.
    for (std::size_t k = 0; k < study.section_names.size(); ++k)
        s.section_blocked_share.push_back(
            estimate_mean(collect([&](const ReplicationStats& r) { return r.section_blocked[k] / 86400.0; })));
    for (std::size_t k = 0; k < model.buffer_pairs().size(); ++k) {
        std::vector<double> v;
        for (const ReplicationStats& r : reps)
            if (k < r.buffer.size() && !std::isnan(r.buffer[k])) v.push_back(r.buffer[k]);
        if (v.empty()) continue;
        BufferStats b;
        b.pair = k;
        b.planned = model.buffer_pairs()[k].planned_buffer;
        b.as_run = estimate_mean(v);
        std::sort(v.begin(), v.end());
        b.p10 = v[static_cast<std::size_t>(0.1 * static_cast<double>(v.size() - 1))];
        s.buffers.push_back(b);
    }
    std::stable_sort(s.buffers.begin(), s.buffers.end(), [](const BufferStats& a, const BufferStats& b) {
        return a.as_run.mean < b.as_run.mean;
    });
    return s;
}

}  // namespace knockon
