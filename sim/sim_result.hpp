#pragma once
// What one simulated day records: train times at every timing point, the as-run occupancy and
// blocking of every section, route setting, time held at signals, optional trajectories.
// Plain records, in SI (seconds after midnight, metres, m/s); writers at the edge lay them out.
#include <cstdint>
#include <limits>
#include <string>
#include <vector>

#include "models/timetable.hpp"
#include "sim/crossing_changes.hpp"

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

// What kept a train waiting: the train whose occupation or route held a section it needed (and
// which section), a section out of use, the dispatcher, or a link it waited for.  Kept plain so
// that the knock-on a hold passes on can be traced back through the holding train's own delay.
struct HoldCause {
    enum class Kind : std::uint8_t {
        none,         // nothing held it beyond route setting and reaction (or it was never asked)
        train,        // `train` held `section` or had it promised (timetable order)
        disruption,   // `section` was out of use
        dispatch,     // the dispatcher kept the route back so that every train keeps a way on
        link,         // it waited for `link`, whose earlier train is `train`
    };
    static constexpr std::uint32_t kNone = UINT32_MAX;
    Kind kind = Kind::none;
    std::uint32_t train = kNone;     // index into SimResult::train_ids
    std::uint32_t section = kNone;   // index into SimResult::section_names
    std::uint32_t link = kNone;      // index into SimResult::links
    std::string signal;              // entry signal of the route it waited for (train, disruption, dispatch)
};
const char* to_string(HoldCause::Kind k);   // "none", "train", "disruption", "dispatch", "link"

struct RouteRecord {
    std::uint32_t train = 0;
    std::string entry_signal, exit_signal;
    double requested = 0.0;   // the train asked for it
    double granted = 0.0;     // sections locked, set-up begins
    double cleared = 0.0;     // set-up done: the entry signal shows proceed for the train
    HoldCause held_by;        // what kept it from being granted when asked for, last (kind none: nothing)
};

// A train standing at a signal that shows stop (SimResult::holds: `signal`, no station), or ready
// at a stop or its origin but kept there (SimResult::waits: `station`, and the signal of the route
// out when that held it), with the cause that held it last.
struct HoldRecord {
    std::uint32_t train = 0;
    std::string signal;
    double from = 0.0, to = 0.0;
    std::string station;
    HoldCause cause;
};

// One link of the timetable (models/links) on the day, in timetable order.
struct LinkRecord {
    std::uint32_t from = 0, to = 0;   // the earlier and the later train (SimResult::train_ids)
    bool connection = false;          // a connection (else a turnaround or a crew link)
    double arrival = std::numeric_limits<double>::quiet_NaN();     // the earlier train's, where the link starts
    double departure = std::numeric_limits<double>::quiet_NaN();   // the later train's, where it ends
    double waited = 0.0;              // how long the link kept the later train beyond its own readiness [s]
    bool missed = false;              // a connection the later train left without
};

// One piece of the knock-on added to a timing record (TimingRecord::knock_on), as the engine
// measured it, for sim/attribution: time lost on the run to the timing point over [from, to]
// (`run`: its causes are the routes held for the train meanwhile, RouteRecord::held_by), or time
// kept ready to leave over [from, to], with the cause that held it last.  A record's parts add
// up to its knock_on.
struct KnockOnPart {
    std::uint32_t record = 0;   // index into SimResult::timing
    double seconds = 0.0;
    double from = 0.0, to = 0.0;
    bool run = false;
    HoldCause cause;            // a wait's (kind none for a run, or a wait whose cause is not known)
};

struct TrajectorySample {
    std::uint32_t train = 0;
    double time = 0.0, position = 0.0, chainage = 0.0, speed = 0.0;
};

// Why a train that a deadlocked day left waiting could not go on: one section it needed, and
// who kept it from the train.
struct DeadlockBlock {
    enum class By : std::uint8_t {
        held,         // another train holds it
        promised,     // it is free, but promised to `train`, planned to use it first (timetable order)
        disruption,   // out of use (a disruption); `train` is not used
    };
    std::uint32_t section = 0;   // index into SimResult::section_names
    By by = By::held;
    std::uint32_t train = 0;     // index into SimResult::train_ids: the holder, or whom it is promised to
};

// A train that had not finished when the day stopped: where it was and what it waited for.
// Times in s after midnight, places in m along the line; NaN where a field does not apply.
struct DeadlockWait {
    enum class For : std::uint8_t {
        appear,       // to appear at its origin: the sections it would stand on are not free
        enter,        // to enter over the line end: the route from `signal` is not granted
        entry_view,   // to enter: the route from `signal` is set, but the signal is not in view
                      // from outside the line
        route,        // on the line: the route from `signal` is not granted
        view,         // on the line: the route from `signal` is set, but the signal is not in view
                      // from where the train stands
        request,      // the route from `signal` was never asked for
        link,         // ready, but a link keeps it (a turnaround's set, a feeder, a crew): the
                      // earlier train `link_from` has not arrived (a formed service: not even
                      // appeared, so `chainage` is NaN)
        other,        // none of these (the engine should not leave a train so: a fault to report)
    };
    static constexpr double kNone = std::numeric_limits<double>::quiet_NaN();

    std::uint32_t train = 0;   // index into SimResult::train_ids
    For waits_for = For::other;
    double chainage = kNone;   // where its head stands; NaN when it is not on the line
    std::string station;       // the timing point where it stands at a scheduled stop (waiting to
                               // appear: its origin), else empty
    double since = kNone;      // when it began to wait: stood still, was ready to leave, or was due
    std::string signal;        // entry signal of the route it waits for (empty: waits to appear)
    double route_set = kNone;  // entry_view and view: when that route was set
    double read_from = kNone;  // entry_view and view: where the signal comes into view
    LinkKind link_kind = LinkKind::turnaround;   // link: the kind of link that keeps it
    std::uint32_t link_from = 0;                 // link: the earlier train (index into SimResult::train_ids)
    std::vector<DeadlockBlock> blocks;   // the sections it needs that others keep from it
};

struct DeadlockReport {
    bool deadlocked = false;
    double time = 0.0;        // when the last event happened
    std::vector<DeadlockWait> waiting;   // every train not finished, in train order
    // In words (sim/deadlock_text): the cause in one line (the trains that wait for each other,
    // or the chain of waits down to what holds them all), and a line per waiting train.
    std::string cause;
    std::string description;
};

struct SimResult {
    std::vector<std::string> train_ids;
    std::vector<std::string> section_names;
    std::vector<TimingRecord> timing;
    std::vector<SectionRecord> sections;
    std::vector<RouteRecord> routes;
    std::vector<HoldRecord> holds;     // at signals
    std::vector<HoldRecord> waits;     // ready at a stop or origin, kept there beyond a noise floor
    std::vector<LinkRecord> links;     // per link of the timetable
    std::vector<KnockOnPart> knock_on_parts;   // every piece of knock-on, in the order gathered
    std::vector<TrajectorySample> samples;
    DeadlockReport deadlock;
    // Single-track crossings and orders that differed from the plan (sim/crossing_changes.hpp).
    std::vector<CrossingChange> crossing_changes;
    std::uint64_t events = 0;          // events delivered
    std::uint64_t block_passages = 0;  // routes run through
};

}  // namespace knockon
