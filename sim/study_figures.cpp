#include "sim/study_figures.hpp"

#include <algorithm>
#include <cmath>
#include <stdexcept>
#include <string>
#include <utility>

#include "sim/day_summary.hpp"

namespace knockon {

ReplicationFigures replication_figures(const SimModel& model, const SimResult& day, const InjectedDelays& delays,
                                       const std::vector<double>& thresholds, std::uint32_t replication) {
    ReplicationFigures r;
    ReplicationStats& s = r.stats;
    s.replication = replication;
    s.deadlocked = day.deadlock.deadlocked;
    if (s.deadlocked) r.deadlock = day.deadlock;
    s.events = day.events;
    s.block_passages = day.block_passages;
    const DaySummary d = summarize_day(day, thresholds);
    s.mean_arrival_delay = d.mean_arrival_delay;
    s.punctuality = d.punctuality;
    s.missed_connections = static_cast<std::uint32_t>(d.missed_connections);
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
        s.total_primary += p;
    }
    r.arrival_delay.reserve(day.timing.size());
    r.knock_on.reserve(day.timing.size());
    for (const TimingRecord& tr : day.timing) {
        r.arrival_delay.push_back(static_cast<float>(tr.arrival_delay));
        r.knock_on.push_back(static_cast<float>(tr.knock_on));
        r.train_knock_on[tr.train] += static_cast<float>(tr.knock_on);
        s.total_knock_on += tr.knock_on;
    }
    for (const HoldRecord& h : day.holds) r.held[h.signal] += h.to - h.from;
    for (const CrossingChange& c : day.crossing_changes)
        ++(c.kind == CrossingChange::Kind::moved_crossing ? s.moved_crossings : s.changed_orders);
    r.attribution = attribution_row(model, day, attribute_knock_on(day, delays), r.attribution_layout);
    r.section_blocked.assign(day.section_names.size(), 0.0f);
    for (const SectionRecord& sr : day.sections)
        if (!std::isnan(sr.released) && !std::isnan(sr.locked))
            r.section_blocked[sr.section] += static_cast<float>(sr.released - sr.locked);
    // As-run buffers on the planned critical sections.
    // A train's first record of each section, by (train, section) in a flat table.
    const std::size_t sections = day.section_names.size();
    std::vector<const SectionRecord*> use(n * sections, nullptr);
    for (const SectionRecord& sr : day.sections) {
        const SectionRecord*& slot = use[std::size_t{sr.train} * sections + sr.section];
        if (!slot) slot = &sr;
    }
    for (const SimModel::BufferPair& bp : model.buffer_pairs()) {
        const SectionRecord* l = bp.leader < n ? use[std::size_t{bp.leader} * sections + bp.section] : nullptr;
        const SectionRecord* f = bp.follower < n ? use[std::size_t{bp.follower} * sections + bp.section] : nullptr;
        double b = std::nanf("");
        if (l && f) b = f->locked - l->released;
        r.buffer.push_back(static_cast<float>(b));
    }
    return r;
}

std::vector<double> TimingRecordFigures::delays() const {
    std::vector<double> v(on_time, 0.0);
    v.reserve(reached());
    v.insert(v.end(), late.begin(), late.end());
    return v;
}

std::size_t buffer_p10_index(std::size_t n) {
    return n == 0 ? 0 : static_cast<std::size_t>(0.1 * static_cast<double>(n - 1));
}

void SmallestValues::add(float x) {
    if (keep_ == 0) return;
    if (heap_.size() < keep_) {
        heap_.push_back(x);
        std::push_heap(heap_.begin(), heap_.end());
    } else if (x < heap_.front()) {
        std::pop_heap(heap_.begin(), heap_.end());
        heap_.back() = x;
        std::push_heap(heap_.begin(), heap_.end());
    }
}

std::vector<double> SmallestValues::sorted() const {
    std::vector<double> v(heap_.begin(), heap_.end());
    std::sort(v.begin(), v.end());
    return v;
}

StudyFigures::StudyFigures(std::vector<double> thresholds, std::size_t planned_days)
    : planned_days_(planned_days), thresholds_(std::move(thresholds)) {
    // The 10th percentile of n <= planned values lies at most at buffer_p10_index(planned), which
    // grows with n: the smallest buffer_p10_index(planned) + 1 values always hold it.
    if (planned_days > 0) buffer_values_kept_ = buffer_p10_index(planned_days) + 1;
}

void StudyFigures::add(const ReplicationFigures& day) {
    if (planned_days_ > 0 && days_ == planned_days_)
        throw std::logic_error("StudyFigures: replication " + std::to_string(day.stats.replication) +
                               " is beyond the " + std::to_string(planned_days_) + " days planned");
    const std::size_t records = day.arrival_delay.size(), trains = day.train_primary.size(),
                      sections = day.section_blocked.size(), pairs = day.buffer.size();
    if (days_ == 0) {
        timing_.resize(records);
        for (TimingRecordFigures& t : timing_) t.within.assign(thresholds_.size(), 0);
        trains_.resize(trains);
        section_blocked_share_.resize(sections);
        buffers_.assign(pairs, BufferFigures{RunningMean{}, SmallestValues(buffer_values_kept_)});
        attribution_layout_ = day.attribution_layout;
        attribution_.resize(day.attribution.size());
    } else if (records != timing_.size() || trains != trains_.size() || sections != section_blocked_share_.size() ||
               pairs != buffers_.size() || !(day.attribution_layout == attribution_layout_)) {
        throw std::logic_error("StudyFigures: replication " + std::to_string(day.stats.replication) +
                               " has another number of timing records, trains, sections or buffer pairs "
                               "than the days before it");
    }
    if (day.knock_on.size() != records || day.train_knock_on.size() != trains || day.train_final_delay.size() != trains ||
        day.attribution.size() != attribution_.size() || attribution_.size() != attribution_layout_.width())
        throw std::logic_error("StudyFigures: replication " + std::to_string(day.stats.replication) +
                               " has figures of unequal lengths");

    for (std::size_t k = 0; k < records; ++k) {
        TimingRecordFigures& t = timing_[k];
        t.knock_on.add(day.knock_on[k]);
        const double d = day.arrival_delay[k];
        if (std::isnan(d)) continue;
        const double late = std::max(0.0, d);   // +0.0 for any d <= 0
        t.delay.add(late);
        if (late > 0.0) t.late.push_back(static_cast<float>(late));   // exact: d came from a float
        else ++t.on_time;
        for (std::size_t i = 0; i < thresholds_.size(); ++i)
            if (within(d, thresholds_[i])) ++t.within[i];
    }
    for (std::size_t t = 0; t < trains; ++t) {
        trains_[t].primary.add(day.train_primary[t]);
        trains_[t].knock_on.add(day.train_knock_on[t]);
        trains_[t].final_delay.add(day.train_final_delay[t]);
    }
    // A signal first held at today has held 0 s on each earlier day; one not held today, 0 s today.
    for (const auto& [signal, seconds] : day.held) held_.try_emplace(signal, RunningMean::zeros(days_));
    for (auto& [signal, mean] : held_) {
        const auto it = day.held.find(signal);
        mean.add(it == day.held.end() ? 0.0 : it->second);
    }
    for (std::size_t k = 0; k < sections; ++k) section_blocked_share_[k].add(day.section_blocked[k] / 86400.0);
    for (std::size_t k = 0; k < attribution_.size(); ++k) attribution_[k].add(day.attribution[k]);
    for (std::size_t k = 0; k < pairs; ++k) {
        const float b = day.buffer[k];
        if (std::isnan(b)) continue;
        buffers_[k].as_run.add(b);
        buffers_[k].lowest.add(b);
    }
    ++days_;
}

}  // namespace knockon
