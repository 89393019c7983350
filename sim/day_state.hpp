#pragma once
// What the classes that run one simulated day share: the event kinds and their order, each
// train's state as the day runs, and the clock with the queue the events wait in.
//
// Why a header of its own: the day is run by the event loop (sim/simulation) with a train's
// motion (sim/train_motion), its movement authority (sim/movement_authority), its route requests
// (sim/route_requests), the links between trains (sim/day_links) and the day's records
// (sim/day_records); each reads the same train states and pushes events on the same clock, and
// none of them should own what all use.
#include <algorithm>
#include <cstdint>
#include <limits>
#include <vector>

#include "models/running_time.hpp"
#include "models/service_run.hpp"
#include "sim/event_queue.hpp"
#include "sim/injected_delays.hpp"
#include "sim/interlocking.hpp"
#include "sim/sim_model.hpp"
#include "sim/sim_result.hpp"
#include "sim/sim_time.hpp"

namespace knockon::day {

constexpr double kInf = std::numeric_limits<double>::infinity();
constexpr double kEps = kSamePlace;
// Positions recomputed from event times (rounded to the tick) may fall short of the point the
// event was for by speed x 1 ms; comparisons with such points allow this much [m].
constexpr double kPositionTolerance = 0.5;
// Knock-on below this per timing point is not counted: recomputing the motion from another grid
// point moves arrival times by a few hundredths of a second [s].
constexpr double kNoiseFloor = 0.5;

enum Kind : std::uint32_t {
    kAppear,
    kRelease,
    kAuthorityCheck,
    kDepartReady,
    kVanish,
    // Motion events: stale once the train's motion is recomputed.
    kEnter,
    kLeave,
    kClear,
    kSight,
    kPass,
    kCall,
    kRequest,
    kArrive,
    kExit,
    kJoin,         // a train integrated again is back on its planned leg's motion
    kBrakePoint,   // a train following its planned leg must start braking for its authority
    kDisruptionStart,   // not a train's: payload indexes InjectedDelays::blocked
    kDisruptionEnd,
    kLinkCheck,    // a link that held a train's departure may let it go now
};

// Phases order simultaneous events: releases before grants, authority before motion.
inline std::uint8_t phase_of(Kind k) {
    switch (k) {
        case kRelease: return 0;
        case kAuthorityCheck: return 2;
        case kRequest: return 3;
        case kAppear: return 4;
        case kBrakePoint: return 5;
        case kDisruptionEnd: return 0;
        case kDisruptionStart: return 0;
        case kDepartReady: return 5;
        case kLinkCheck: return 5;
        default: return 6;
    }
}

inline bool is_motion(Kind k) { return k >= kEnter && k <= kBrakePoint; }

// An injected delay of train t at call `call` (0 where none was drawn) [s].
inline double delay_of(const std::vector<std::vector<double>>& v, std::uint32_t t, std::size_t call) {
    return t < v.size() && call < v[t].size() ? v[t][call] : 0.0;
}
inline double entry_delay(const InjectedDelays& delays, std::uint32_t t) {
    return t < delays.entry.size() ? delays.entry[t] : 0.0;
}

// Minimum dwell of train t (running `run`) at timing point tp plus any injected extension [s].
inline double dwell_at(const ServiceRun& run, const InjectedDelays& delays, std::uint32_t t, std::size_t tp) {
    return min_dwell_of(run.service->calls[run.calls[tp].call], *run.type) + delay_of(delays.dwell, t, run.calls[tp].call);
}

enum class Phase { waiting, standing, moving, finished };

struct TrainState {
    Phase phase = Phase::waiting;
    double t0 = 0.0;            // when the current motion started (its time 0)
    // The motion: a planned leg followed as planned (no integration needed) while the
    // authority allows, else integrated from the train's state (`own`).
    long leg = -1;              // planned leg followed, or -1
    bool leg_scheduled = false; // the leg's points are in the queue (false: just started it)
    Trajectory own;
    double brake_from = kInf;   // on a planned leg: where braking for the authority would begin
    double brake_time = 0.0;    // and when, from the leg's start
    std::size_t brake_index = 0;   // and its point on the leg's motion
    // `own` brakes to a stop at own_target; when the authority grows, it still stands up to
    // its settled point (own.settled), where the engine integrates again (a brake event).
    double own_target = kNoTime;
    long join_leg = -1;         // `own` ends where it rejoins this planned leg, at grid point join_point
    std::size_t join_point = 0;
    bool free_end = false;      // the motion runs out over the line end
    double s_stand = 0.0;
    double stand_since = 0.0;
    double eoa = 0.0;           // end of the authority the driver knows
    bool ready = false;         // at a stop: dwell and schedule allow departure
    double ready_time = kNoTime;
    // When it would have been ready by itself, links aside (differs from ready_time at its
    // origin, where a turnaround or crew link already known is part of ready_time).
    double own_ready = kNoTime;
    long stop_call = -1;        // timing point where it stands, if a scheduled stop
    double hold_from = kNoTime; // standing at a signal since
    std::size_t next_enter = 0, next_leave = 0, next_clear = 0;
    std::size_t next_sight = 0, next_pass = 0, next_request = 0, next_call = 0;
    std::vector<double> route_set;        // when each route is set for it (NaN: not granted yet)
    std::vector<long> route_record;       // per route: index into result.routes
    bool appear_granted = false;          // its appearance time has come and the sections it
                                          // appears on are its own
    // A formed service (turnaround) whose set has not yet arrived: it appears when it has.
    bool awaiting_set = false, appear_deferred = false;
    HoldCause appear_cause;               // what kept its origin sections from it, last
    double last_departure = kNoTime;      // from the previous timing point (or entry)
    double appeared = kNoTime;
    std::vector<long> section_record;     // per path section: index into result.sections
    std::vector<std::uint8_t> holds;      // per path section: it holds the section now
    bool request_pending = false;
    double last_sample = -kInf;
    // head_position is asked several times per event, and a leg's motion is mostly out of
    // cache: the last answer is kept with everything it depends on.
    std::uint64_t own_version = 0;   // counts writes of `own`
    struct {
        double now = kNoTime, t0 = kNoTime, position = 0.0;
        long leg = -2;
        std::uint64_t own_version = 0;
        bool free_end = false;
    } mutable head_memo;
};

// The day's clock and its event queue.  Each train's events fall in three groups cancelled
// separately: its motion (points along the way, arrival), the brake point for its authority
// (which moves whenever the authority grows, while the motion stays), and the rest.
class DayEvents {
public:
    explicit DayEvents(std::size_t trains) : generations_(kEntitiesPerTrain * trains) {}

    double now() const { return now_; }
    static std::uint32_t train_of(std::uint32_t entity) { return entity / kEntitiesPerTrain; }

    void push(double time, Kind kind, std::uint32_t t, std::uint32_t payload = 0) {
        std::uint32_t entity = t == kNoTrain       ? no_entity
                               : kind == kBrakePoint ? brake_entity(t)
                               : is_motion(kind)     ? motion_entity(t)
                                                     : fixed_entity(t);
        SimTime when = SimTime::from_seconds(std::max(time, now_));
        if (when < queue_.now()) when = queue_.now();
        // Releases and authority checks come a constant time after the event that makes them:
        // they are pushed in order, and their own lanes spare the heap a third of the events.
        if (kind == kRelease || kind == kAuthorityCheck)
            queue_.push_in_order(kind == kRelease ? 0 : 1, when, phase_of(kind), kind, entity,
                                 generations_.current(entity), payload);
        else
            queue_.push(when, phase_of(kind), kind, entity, generations_.current(entity), payload);
    }
    void cancel_motion(std::uint32_t t) {
        generations_.bump(motion_entity(t));
        generations_.bump(brake_entity(t));
    }
    void cancel_brake_point(std::uint32_t t) { generations_.bump(brake_entity(t)); }

    // The next event still current, with the clock moved to it; false when none is left.
    bool next(Event& e) {
        if (!queue_.pop_current(e, generations_)) return false;
        now_ = e.time.to_seconds();
        return true;
    }

private:
    static constexpr std::uint32_t kEntitiesPerTrain = 3;
    static std::uint32_t motion_entity(std::uint32_t t) { return kEntitiesPerTrain * t; }
    static std::uint32_t fixed_entity(std::uint32_t t) { return kEntitiesPerTrain * t + 1; }
    static std::uint32_t brake_entity(std::uint32_t t) { return kEntitiesPerTrain * t + 2; }

    EventQueue queue_;
    GenerationTable generations_;
    double now_ = 0.0;
};

}  // namespace knockon::day
