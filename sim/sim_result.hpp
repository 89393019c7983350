#pragma once
// What one simulated day records: train times at every timing point, the as-run occupancy and
// blocking of every section, route setting, time held at signals, optional trajectories.
// Plain records, in SI (seconds after midnight, metres, m/s); writers at the edge lay them out.
#include <cstdint>
#include <string>
#include <vector>

namespace knockon {

struct TimingRecord {
    std::uint32_t train = 0;
    std::uint32_t call = 0;
    std::string station;
    bool stops = true;
    double scheduled_arrival = 0.0, scheduled_departure = 0.0;   // NaN where not applicable
    double arrival = 0.0, departure = 0.0;                       // as run (passes: both the pass time)
    double arrival_delay = 0.0, departure_delay = 0.0;           // as run minus scheduled [s]
    // Knock-on (secondary) delay gathered here: time lost to other trains on the run from the
    // previous timing point (beyond the unhindered running time plus the train's own slow
    // running) and, at a stop, waiting beyond the moment the train was ready to leave [s].
    double knock_on = 0.0;
};

// One train's use of one detection section: the as-run blocking time is [locked, released].
struct SectionRecord {
    std::uint32_t train = 0;
    std::uint32_t section = 0;        // index into SimResult::section_names
    double locked = 0.0;              // reserved for the train (route set-up starts, or occupied at entry)
    double head_enters = 0.0;
    double head_leaves = 0.0;
    double tail_clears = 0.0;
    double released = 0.0;
};

struct RouteRecord {
    std::uint32_t train = 0;
    std::string entry_signal, exit_signal;
    double requested = 0.0;   // the train asked for it
    double granted = 0.0;     // sections locked, set-up begins
    double cleared = 0.0;     // set-up done: the entry signal shows proceed for the train
};

// A train standing at a signal that shows stop (not at a scheduled stop).
struct HoldRecord {
    std::uint32_t train = 0;
    std::string signal;
    double from = 0.0, to = 0.0;
};

struct TrajectorySample {
    std::uint32_t train = 0;
    double time = 0.0, position = 0.0, chainage = 0.0, speed = 0.0;
};

struct DeadlockReport {
    bool deadlocked = false;
    double time = 0.0;        // when the last event happened
    std::string description;  // which trains wait for which sections, held by whom
};

struct SimResult {
    std::vector<std::string> train_ids;
    std::vector<std::string> section_names;
    std::vector<TimingRecord> timing;
    std::vector<SectionRecord> sections;
    std::vector<RouteRecord> routes;
    std::vector<HoldRecord> holds;
    std::vector<TrajectorySample> samples;
    DeadlockReport deadlock;
    std::uint64_t events = 0;          // events delivered
    std::uint64_t block_passages = 0;  // routes run through
};

}  // namespace knockon
