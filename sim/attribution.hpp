#pragma once
// Where a day's knock-on comes from.  Every piece of knock-on the engine measured
// (SimResult::knock_on_parts) is split among its direct causes (the trains whose occupation or
// route held it, the links it waited for, disruptions, the dispatcher) and traced back, through
// the causing train's own delay at that moment, to the delays that started it: primary delays
// (entry, dwell, running, as InjectedDelays holds them), disruptions, the dispatcher, or the
// timetable itself (a holder on time: a planned conflict).
//
// The rule (README, "Where knock-on comes from"):
// - a wait takes the cause the engine recorded for it; time lost on a run goes to the routes held
//   for the train during that run (RouteRecord::held_by), in proportion to how long each was held
//   within the run; with none, to those held since it left the timing point before the previous
//   one (braking for a late route and re-accelerating outlast the hold, past a timing point); with
//   none either, its cause is not known ("unexplained": on the demo only the part of a train's
//   own slow running that the drawn extra running time does not hold);
// - a piece of y seconds whose holder was D seconds late at its last timing point passes min(y, D)
//   on to the sources of that delay, in proportion to each one's share of it; the rest, y - min(y, D),
//   is the timetable's own (the holder on time would have held it as long);
// - each train's delay is kept as shares of its sources, updated at every timing point it passes:
//   its primary delay there and the knock-on it received are added, and where the delay measured
//   there is smaller than their sum, every share is scaled down alike (supplements and slack
//   recover every source alike); a delay above the sum has no source the day recorded (the
//   published times' rounding, losses below the engine's noise floor) and is not traced, so a
//   holder's delay passed on is at most the sum of its shares.
// The shares of every piece add up to the piece (the last share is the remainder), so a day's
// damage over all sources adds up to its knock-on.
#include <cstddef>
#include <cstdint>
#include <vector>

#include "sim/injected_delays.hpp"
#include "sim/sim_result.hpp"

namespace knockon {

// A delay that knock-on is traced back to.
struct DelaySource {
    enum class Kind : std::uint8_t {
        entry,         // a train's late start or late entry (at its first timing record)
        dwell,         // extra dwell at a timing record
        running,       // extra running time on the run from a timing record to the next
        disruption,    // a section out of use
        dispatch,      // the dispatcher kept a route back
        timetable,     // the holder was on time: a conflict the timetable itself holds
        unexplained,   // the engine recorded no cause
    };
    static constexpr std::uint32_t kNone = UINT32_MAX;
    Kind kind = Kind::unexplained;
    std::uint32_t train = kNone;     // entry, dwell, running: whose primary delay
    std::uint32_t record = kNone;    // entry, dwell, running: timing record (SimResult::timing) where it was drawn
    std::uint32_t section = kNone;   // disruption
};
const char* to_string(DelaySource::Kind k);   // "entry", "dwell", "running", "disruption", ...
bool is_primary(DelaySource::Kind k);          // entry, dwell, running

// How sources are numbered in a day of `records` timing records, `trains` trains and `sections`
// sections: dwell per record, running per record, entry per train, disruption per section, then
// dispatch, timetable, unexplained.  The numbering depends on the model alone, so that every day
// of a study has the same sources in the same places.
struct SourceIndex {
    std::size_t records = 0, trains = 0, sections = 0;
    std::size_t size() const { return 2 * records + trains + sections + 3; }
    std::size_t dwell(std::size_t record) const { return record; }
    std::size_t running(std::size_t record) const { return records + record; }
    std::size_t entry(std::size_t train) const { return 2 * records + train; }
    std::size_t disruption(std::size_t section) const { return 2 * records + trains + section; }
    std::size_t dispatch() const { return 2 * records + trains + sections; }
    std::size_t timetable() const { return dispatch() + 1; }
    std::size_t unexplained() const { return dispatch() + 2; }
};

// One edge of a delay tree: knock-on that `source` started reached the train of `record` (at that
// timing point) through the direct cause `cause` (the holding train or the link's earlier train,
// its section or link; signal left empty).  The tree of a source is the set of its edges.
struct DelayEdge {
    std::uint32_t source = 0;   // SourceIndex number
    HoldCause cause;
    std::uint32_t record = 0;   // index into SimResult::timing (the receiving train and place)
    double seconds = 0.0;
};

struct DayAttribution {
    SourceIndex index;
    std::vector<double> damage;            // per source: the knock-on it caused downstream [s]
    std::vector<double> by_cause;          // per HoldCause::Kind: knock-on by direct cause [s]
    std::vector<double> through_section;   // per section: knock-on whose direct cause held that section [s]
    std::vector<double> through_link;      // per link: knock-on that waited for it [s]
    std::vector<DelayEdge> edges;          // by source, cause, record
};

// Source number i of `index` as a DelaySource; `timing` the day's timing records (or a study's
// timing template: the same records with their scheduled times).
DelaySource delay_source(const SourceIndex& index, std::size_t i, const std::vector<TimingRecord>& timing);

// `delays` must be those the day ran with.
DayAttribution attribute_knock_on(const SimResult& day, const InjectedDelays& delays);

}  // namespace knockon
