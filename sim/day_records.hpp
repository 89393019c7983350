#pragma once
// What a simulated day leaves behind, as it runs: the times at every timing point and the
// knock-on gathered there, each train's use of each section, route requests and grants, holds at
// signals and waits at stops with their causes, links, trajectory samples, and the material of a
// deadlock report.
//
// Why a class of its own: the rules of what counts as knock-on (a run slower than unhindered, a
// wait beyond readiness, both above the noise floor) and how a record is opened belong in one
// place, away from the event loop (sim/simulation) and the motion and authority that cause them.
#include <cstdint>
#include <string>
#include <vector>

#include "sim/day_state.hpp"

namespace knockon::day {

class DayRecords {
public:
    DayRecords(const SimModel& model, const InjectedDelays& delays);

    // The record of timing point k of train t, and the index of its first.
    TimingRecord& timing(std::uint32_t t, std::size_t k) { return out_.timing[timing_first_[t] + static_cast<long>(k)]; }
    const TimingRecord& timing(std::uint32_t t, std::size_t k) const {
        return out_.timing[timing_first_[t] + static_cast<long>(k)];
    }
    long first_timing(std::uint32_t t) const { return timing_first_[t]; }

    // The record of train t's use of its path section k, opened (locked at `now`) on first use.
    long open_section(TrainState& s, std::uint32_t t, std::uint32_t section, std::size_t k, double now) {
        if (s.section_record[k] < 0) {
            SectionRecord r;
            r.train = t;
            r.section = section;
            r.locked = now;
            r.head_enters = r.head_leaves = r.tail_clears = r.released = kNoTime;
            s.section_record[k] = static_cast<long>(out_.sections.size());
            out_.sections.push_back(r);
        }
        return s.section_record[k];
    }
    SectionRecord& section(long record) { return out_.sections[record]; }

    // Train t asks for `route` at `now`: its record's index.
    long open_route(std::uint32_t t, const SimModel::Route& route, double now) {
        RouteRecord& r = out_.routes.emplace_back();
        r.train = t;
        r.entry_signal = route.entry_signal;
        r.exit_signal = route.exit_signal;
        r.requested = now;
        r.granted = r.cleared = kNoTime;
        return static_cast<long>(out_.routes.size()) - 1;
    }
    RouteRecord& route(long record) { return out_.routes[record]; }
    const RouteRecord& route(long record) const { return out_.routes[record]; }

    LinkRecord& link(std::size_t l) { return out_.links[l]; }
    const LinkRecord& link(std::size_t l) const { return out_.links[l]; }

    // Knock-on gathered at a timing record, with what sim/attribution needs to trace it: the run
    // or wait it was lost on, and the cause of a wait.
    void add_knock_on(long record, double seconds, double from, double to, bool run, const HoldCause& cause = {}) {
        out_.timing[record].knock_on += seconds;
        out_.knock_on_parts.push_back({static_cast<std::uint32_t>(record), seconds, from, to, run, cause});
    }
    // Train t reaches (arrival) or leaves (departure) timing point tp; NaN for neither.  `cause`:
    // what kept it beyond its readiness when it departs (none: not known).
    void record_call(TrainState& s, std::uint32_t t, std::size_t tp, double arrival, double departure,
                     const HoldCause& cause = {});
    // Train t passes timing point tp without stopping.
    void record_pass(TrainState& s, std::uint32_t t, std::size_t tp, double now);

    void add_hold(HoldRecord h) { out_.holds.push_back(std::move(h)); }
    void add_wait(HoldRecord w) { out_.waits.push_back(std::move(w)); }
    void add_sample(const TrajectorySample& sample) { out_.samples.push_back(sample); }
    void count_block_passage() { ++out_.block_passages; }
    // Counts an event delivered; the count so far.
    std::uint64_t count_event() { return ++out_.events; }

    const std::vector<std::string>& train_ids() const { return out_.train_ids; }
    const std::vector<std::string>& section_names() const { return out_.section_names; }

    // The deadlock report's material, and its words once every waiting train is in.
    DeadlockReport& deadlock() { return out_.deadlock; }
    void put_deadlock_into_words();

    SimResult take() { return std::move(out_); }

private:
    const SimModel& model_;
    const InjectedDelays& delays_;
    SimResult out_;
    std::vector<long> timing_first_;   // [train] -> its first record in out_.timing (then one per call)
};

}  // namespace knockon::day
