#include "sim/study.hpp"

#include <algorithm>
#include <atomic>
#include <condition_variable>
#include <functional>
#include <limits>
#include <map>
#include <mutex>
#include <stdexcept>
#include <string>
#include <thread>

namespace knockon {

namespace {

// Threads that run the same piece of work once per batch, together with the calling thread,
// and wait in between.  Joined when it goes out of scope, also when a batch throws.
class WorkerPool {
public:
    WorkerPool(unsigned workers, std::function<void()> work) : work_(std::move(work)) {
        for (unsigned i = 0; i < workers; ++i) threads_.emplace_back([this] { loop(); });
    }
    WorkerPool(const WorkerPool&) = delete;
    WorkerPool& operator=(const WorkerPool&) = delete;
    ~WorkerPool() {
        {
            std::lock_guard<std::mutex> lock(mutex_);
            quit_ = true;
        }
        start_.notify_all();
        for (std::thread& t : threads_) t.join();
    }

    // Runs the work on every worker and on this thread; returns when all are done.
    void run_batch() {
        {
            std::lock_guard<std::mutex> lock(mutex_);
            busy_ = threads_.size();
            ++batch_;
        }
        start_.notify_all();
        work_();
        std::unique_lock<std::mutex> lock(mutex_);
        done_.wait(lock, [this] { return busy_ == 0; });
    }

private:
    void loop() {
        std::uint64_t seen = 0;
        while (true) {
            {
                std::unique_lock<std::mutex> lock(mutex_);
                start_.wait(lock, [&] { return quit_ || batch_ != seen; });
                if (quit_) return;
                seen = batch_;
            }
            work_();   // (the work catches what the replications throw)
            std::lock_guard<std::mutex> lock(mutex_);
            if (--busy_ == 0) done_.notify_one();
        }
    }

    std::function<void()> work_;
    std::vector<std::thread> threads_;
    std::mutex mutex_;
    std::condition_variable start_, done_;
    std::uint64_t batch_ = 0;
    std::size_t busy_ = 0;
    bool quit_ = false;
};

}  // namespace

StudyResult run_study(const SimModel& model, const StudyOptions& options) {
    if (!options.draw) throw std::invalid_argument("run_study: no primary-delay draw given");
    if (options.replications == 0) throw std::invalid_argument("run_study: at least one replication is needed");
    StudyResult out;
    if (options.planned != 0 && options.planned < options.replications)
        throw std::invalid_argument("run_study: the whole study cannot have fewer days than this run");
    out.figures = StudyFigures(options.thresholds, options.planned != 0 ? options.planned : options.replications);
    const unsigned threads = std::max(1u, options.threads);
    const std::uint32_t first = options.first;
    if (options.replications > std::numeric_limits<std::uint32_t>::max() - first)
        throw std::invalid_argument("run_study: the replication numbers would not fit in 32 bits");
    const std::uint32_t cap = first + options.replications;
    const std::uint32_t batch = std::max<std::uint32_t>(1, options.batch);

    std::map<std::uint32_t, SimResult> traces;   // finished but not yet handed over, by replication
    std::uint32_t next_trace = first;
    std::mutex trace_mutex;

    auto run_one = [&](std::uint32_t k, ReplicationFigures& slot) {
        InjectedDelays delays = options.draw(k);
        SimResult day = simulate_day(model, delays, options.sim);
        slot = replication_figures(model, day, delays, options.thresholds, k);
        if (k == first) {
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

    // The batch being run: replications [started, end) into slots, handed out one at a time.
    std::uint32_t started = first, end = first;
    std::vector<ReplicationFigures> slots;
    std::atomic<std::uint32_t> next{0};
    std::exception_ptr failure;
    std::mutex failure_mutex;
    auto work = [&] {
        for (std::uint32_t k; (k = next.fetch_add(1)) < end;) {
            try {
                run_one(k, slots[k - started]);
            } catch (...) {
                std::lock_guard<std::mutex> lock(failure_mutex);
                if (!failure) failure = std::current_exception();
            }
        }
    };
    // The other threads live for the whole study, not a batch: what each keeps per thread (its
    // full-power curves, its buffers) is built once, not once per batch.
    WorkerPool pool(threads - 1, work);
    while (started < cap) {
        // One batch: a fixed number of replications whatever the thread count, so that stopping
        // decisions (until_ci, Ctrl-C) fall on the same replication for any --threads.
        end = std::min(cap, started + batch);
        slots.assign(end - started, ReplicationFigures{});
        next = started;
        pool.run_batch();   // the pool and this thread work through the batch together
        if (failure) std::rethrow_exception(failure);
        // Fold the batch in on this thread, in replication order: the running sums then add up in
        // the same order whatever the thread count.  The day's detail goes with its slot.
        // A deadlocked day keeps its per-day record only: it is a result, never a figure.
        for (ReplicationFigures& r : slots) {
            if (options.on_day) options.on_day(r);
            fold_day(out, std::move(r));
        }
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
        if (options.progress) options.progress(started - first, options.replications);
        if (options.stop && options.stop->load()) {
            out.partial = started < cap;
            break;
        }
        if (options.until_ci > 0.0) {
            std::vector<double> k;
            k.reserve(out.replications.size());
            for (const ReplicationStats& r : out.replications)
                if (!r.deadlocked) k.push_back(r.total_knock_on);
            if (k.size() >= 10 && estimate_mean(k).half_width < options.until_ci) break;
        }
    }
    return out;
}

void fold_day(StudyResult& study, ReplicationFigures&& day) {
    if (!day.stats.deadlocked)
        study.figures.add(day);
    else if (!study.first_deadlock)
        study.first_deadlock = DeadlockedDay{day.stats.replication, std::move(day.deadlock)};
    study.replications.push_back(std::move(day.stats));
}

StudySummary summarize_study(const SimModel& model, const StudyResult& study, const std::vector<double>& thresholds) {
    StudySummary s;
    const auto& reps = study.replications;
    s.replications = reps.size();
    s.thresholds = thresholds;
    for (const ReplicationStats& r : reps) s.deadlocked += r.deadlocked ? 1 : 0;
    s.complete = s.replications - s.deadlocked;
    s.first_deadlock = study.first_deadlock;
    if (s.complete == 0) {
        // No day ran to the end: no figure at all, rather than zeros that look like one.
        Estimate none;
        none.mean = none.half_width = none.lower = none.upper = std::numeric_limits<double>::quiet_NaN();
        s.total_primary = s.total_knock_on = s.mean_arrival_delay = s.moved_crossings = s.changed_orders = none;
        s.missed_connections = none;
        s.knock_on_ratio = none.mean;
        s.punctuality.assign(thresholds.size(), none);
        return s;
    }
    const StudyFigures& fig = study.figures;
    if (fig.days() != s.complete)
        throw std::invalid_argument("summarize_study: the study's figures hold " + std::to_string(fig.days()) +
                                    " days but it has " + std::to_string(s.complete) + " complete days");
    if (fig.thresholds() != thresholds)
        throw std::invalid_argument("summarize_study: the punctuality thresholds differ from those the study ran with");

    // Per-day scalars: two passes over the complete days.
    auto collect = [&](auto field) {
        std::vector<double> v;
        v.reserve(s.complete);
        for (const ReplicationStats& r : reps)
            if (!r.deadlocked) v.push_back(field(r));
        return v;
    };
    s.total_primary = estimate_mean(collect([](const ReplicationStats& r) { return r.total_primary; }));
    s.total_knock_on = estimate_mean(collect([](const ReplicationStats& r) { return r.total_knock_on; }));
    s.mean_arrival_delay = estimate_mean(collect([](const ReplicationStats& r) { return r.mean_arrival_delay; }));
    s.moved_crossings = estimate_mean(collect([](const ReplicationStats& r) { return double(r.moved_crossings); }));
    s.changed_orders = estimate_mean(collect([](const ReplicationStats& r) { return double(r.changed_orders); }));
    s.knock_on_ratio = s.total_primary.mean > 0.0 ? s.total_knock_on.mean / s.total_primary.mean : 0.0;
    for (const LinkPlan& l : model.links()) s.connections += l.kind == LinkKind::connection ? 1 : 0;
    s.missed_connections = estimate_mean(collect([](const ReplicationStats& r) { return double(r.missed_connections); }));
    for (std::size_t i = 0; i < thresholds.size(); ++i)
        s.punctuality.push_back(estimate_mean(collect([&](const ReplicationStats& r) { return r.punctuality[i]; })));

    // Per timing point.
    const auto& tmpl = study.timing_template;
    if (tmpl.size() != fig.timing().size())
        throw std::invalid_argument("summarize_study: the timing template does not match the study's timing records");
    for (std::size_t k = 0; k < tmpl.size(); ++k) {
        const TimingRecordFigures& f = fig.timing()[k];
        TimingPointStats tp;
        tp.train = tmpl[k].train;
        tp.station = tmpl[k].station;
        tp.stops = tmpl[k].stops;
        tp.reached = f.reached();
        tp.knock_on = f.knock_on.estimate();
        if (tp.reached > 0) {
            tp.delay = f.delay.estimate();
            tp.delay_quantiles = quantiles(f.delays());
            for (std::size_t i = 0; i < thresholds.size(); ++i)
                tp.punctuality.push_back(estimate_share(f.within[i], tp.reached));
        }
        s.timing_points.push_back(std::move(tp));
    }
    // Per train.
    for (std::uint32_t t = 0; t < fig.trains().size(); ++t) {
        const TrainFigures& f = fig.trains()[t];
        s.trains.push_back({t, f.primary.estimate(), f.knock_on.estimate(), f.final_delay.estimate()});
    }
    // Signals where trains stood, largest first.
    for (const auto& [signal, held] : fig.held()) s.signals.push_back({signal, held.estimate()});
    std::stable_sort(s.signals.begin(), s.signals.end(),
                     [](const SignalStats& a, const SignalStats& b) { return a.held.mean > b.held.mean; });
    // As-run blocked share of the day per section.
    for (const RunningMean& m : fig.section_blocked_share()) s.section_blocked_share.push_back(m.estimate());
    // As-run buffers, thinnest first.
    for (std::size_t k = 0; k < fig.buffers().size() && k < model.buffer_pairs().size(); ++k) {
        const BufferFigures& f = fig.buffers()[k];
        const std::size_t n = f.as_run.count();
        if (n == 0) continue;
        const std::vector<double> lowest = f.lowest.sorted();
        const std::size_t at = buffer_p10_index(n);
        if (at >= lowest.size()) throw std::logic_error("summarize_study: too few buffer values kept for the 10th percentile");
        BufferStats b;
        b.pair = k;
        b.planned = model.buffer_pairs()[k].planned_buffer;
        b.as_run = f.as_run.estimate();
        b.p10 = lowest[at];
        s.buffers.push_back(b);
    }
    std::stable_sort(s.buffers.begin(), s.buffers.end(), [](const BufferStats& a, const BufferStats& b) {
        return a.as_run.mean < b.as_run.mean;
    });
    s.attribution = summarize_attribution(fig.attribution_layout(), fig.attribution(), tmpl);
    return s;
}

}  // namespace knockon
