#include "sim/simulation.hpp"

#include <algorithm>
#include <cstdio>
#include <cstdlib>
#include <cmath>
#include <limits>
#include <map>
#include <stdexcept>

#include "sim/deadlock_text.hpp"
#include "sim/crossing_changes.hpp"
#include "sim/day_links.hpp"
#include "sim/day_records.hpp"
#include "sim/day_state.hpp"
#include "sim/event_queue.hpp"
#include "sim/movement_authority.hpp"
#include "sim/route_requests.hpp"
#include "sim/train_motion.hpp"

namespace knockon {
namespace {

using namespace day;

// A train's buffers are kept from one simulated day to the next on the same thread: growing
// thousands of fresh vectors a day cost more than the integration in them.
struct TrainBuffers {
    Trajectory own;
    std::vector<double> route_set;
    std::vector<long> route_record, section_record;
    std::vector<std::uint8_t> holds;
};
std::vector<TrainBuffers>& spare_buffers() {
    thread_local std::vector<TrainBuffers> spare;
    return spare;
}

// The event loop of one day: it keeps the train states and hands each event to the piece whose
// rule it is: the train's motion (sim/train_motion), its movement authority
// (sim/movement_authority), its route requests (sim/route_requests), its links (sim/day_links)
// and the day's records (sim/day_records).  What is left here is the order of things at each
// event: a train appearing, standing, departing, reaching the points along its way, vanishing.
class Day final : private MovementAuthority::Grants {
public:
    Day(const SimModel& model, const InjectedDelays& delays, const SimOptions& options);
    ~Day() {
        std::vector<TrainBuffers>& spare = spare_buffers();
        for (TrainState& s : st_)
            spare.push_back({std::move(s.own), std::move(s.route_set), std::move(s.route_record),
                             std::move(s.section_record), std::move(s.holds)});
    }
    Day(const Day&) = delete;
    Day& operator=(const Day&) = delete;
    SimResult run();

private:
    const SimModel& model_;
    const InjectedDelays& delays_;
    const SimOptions& options_;
    const InterlockingTimes& times_;
    DayEvents events_;
    std::vector<TrainState> st_;   // sized once, before the pieces that keep a pointer to it
    DayRecords records_;
    DayLinks links_;
    TrainMotion motion_;
    RouteRequests requests_;
    SectionAuthority authority_;   // (the concrete class: its calls on the hot path are direct)
    std::vector<std::vector<std::uint32_t>> disrupted_;   // per InjectedDelays::blocked entry: sections
    std::uint32_t trace_ = kNoTrain;   // KNOCKON_TRACE=<train id>: print its events (debugging aid)

    const SimModel::Train& train(std::uint32_t t) const { return model_.trains()[t]; }
    const ServiceRun& run_of(std::uint32_t t) const { return train(t).plan->run; }
    double now() const { return events_.now(); }
    void push(double time, Kind kind, std::uint32_t t, std::uint32_t payload = 0) {
        events_.push(time, kind, t, payload);
    }
    void cancel_motion(std::uint32_t t) { events_.cancel_motion(t); }

    // Minimum dwell at a timing point plus any injected extension [s].
    double dwell_at(std::uint32_t t, std::size_t tp) const { return day::dwell_at(run_of(t), delays_, t, tp); }
    // A train at a stop leaves once its links let it go and its authority allows
    // (MovementAuthority::departure_known).
    bool may_depart(std::uint32_t t) const {
        const TrainState& s = st_[t];
        if (!train(t).links_in.empty() && links_.hold(t, s.stop_call) > now() + kEps) return false;
        return authority_.departure_known(t);
    }
    void schedule_points(std::uint32_t t);
    void schedule_point(std::uint32_t t, Kind kind);
    // Recomputes the motion after the authority or the state changed, and schedules the
    // train's points again where the motion changed (sim/train_motion).
    void replan(std::uint32_t t, bool leave_leg = false) {
        if (motion_.replan(t, leave_leg)) schedule_points(t);
    }
    void join_leg(std::uint32_t t) {
        if (motion_.join_leg(t)) schedule_points(t);
    }

    long record_for(std::uint32_t t, std::size_t k);
    void grant_pending() { authority_.grant_pending(*this); }
    // MovementAuthority::Grants
    void appear_granted(std::uint32_t t, const HoldCause& held_by) override;
    void route_granted(std::uint32_t t, std::size_t route, const HoldCause& held_by) override;
    void try_appear(std::uint32_t t);
    void begin_standing(std::uint32_t t);
    void end_hold(std::uint32_t t);
    void check_authority(std::uint32_t t);
    void depart(std::uint32_t t);
    void vanish(std::uint32_t t);
    void handle(const Event& e);
    // The head reaches the end of its next section / its next signal.
    void head_leaves(std::uint32_t t) {
        TrainState& s = st_[t];
        if (s.section_record[s.next_leave] >= 0) records_.section(s.section_record[s.next_leave]).head_leaves = now();
        ++s.next_leave;
        schedule_point(t, kLeave);
    }
    void passes_signal(std::uint32_t t) {
        ++st_[t].next_pass;
        records_.count_block_passage();
        schedule_point(t, kPass);
    }
    void report_deadlock();
};

Day::Day(const SimModel& model, const InjectedDelays& delays, const SimOptions& options)
    : model_(model),
      delays_(delays),
      options_(options),
      times_(model.interlocking()),
      events_(model.trains().size()),
      st_(model.trains().size()),
      records_(model, delays),
      links_(model, st_, events_, records_),
      motion_(model, delays, options.run, options.sample_interval, st_, events_, records_),
      requests_(model, delays, st_, events_, motion_, links_),
      authority_(model, options.route_order, st_, events_, records_) {
    const auto& trains = model.trains();
    std::vector<TrainBuffers>& spare = spare_buffers();
    for (TrainState& s : st_) {
        if (spare.empty()) break;
        TrainBuffers& b = spare.back();
        s.own = std::move(b.own);
        s.route_set = std::move(b.route_set);
        s.route_record = std::move(b.route_record);
        s.section_record = std::move(b.section_record);
        s.holds = std::move(b.holds);
        spare.pop_back();
    }
    const char* const trace_id = std::getenv("KNOCKON_TRACE");
    for (std::uint32_t t = 0; t < trains.size(); ++t) {
        const ServiceRun& run = run_of(t);
        if (trace_id && run.service->id == trace_id) trace_ = t;
        TrainState& s = st_[t];
        s.route_set.assign(train(t).routes.size(), kNoTime);
        s.route_record.assign(train(t).routes.size(), -1);
        s.section_record.assign(run.path.sections.size(), -1);
        s.holds.assign(run.path.sections.size(), 0);
        const double entry = entry_delay(delays, t);
        push(run.appear_time + entry, kAppear, t);
        // A train entering over the line end asks for its first routes before it comes in.
        if (run.path.starts_at_edge) requests_.schedule_next(t);
    }
    // Disruptions: sections out of use over their drawn interval (unknown sections: no train
    // uses them, so they cannot matter).
    std::map<std::string, std::uint32_t> index;
    if (!delays.blocked.empty())   // (most days have none: no name look-up built for them)
        for (std::uint32_t k = 0; k < records_.section_names().size(); ++k) index[records_.section_names()[k]] = k;
    for (std::uint32_t b = 0; b < delays.blocked.size(); ++b) {
        disrupted_.emplace_back();
        auto it = index.find(delays.blocked[b].section);
        if (it == index.end() || !(delays.blocked[b].to > delays.blocked[b].from)) continue;
        disrupted_.back().push_back(it->second);
        push(delays.blocked[b].from, kDisruptionStart, kNoTrain, b);
        push(delays.blocked[b].to, kDisruptionEnd, kNoTrain, b);
    }
}

void Day::schedule_point(std::uint32_t t, Kind kind) {
    TrainState& s = st_[t];
    const SimModel::Train& tr = train(t);
    // The next place of this kind (a skipped one waits, except signals never read, passed over).
    auto next = [&](const std::vector<Place>& places, std::size_t i) -> const Place* {
        return i < places.size() && !places[i].skip ? &places[i] : nullptr;
    };
    const Place* at = nullptr;
    std::size_t index = 0;
    switch (kind) {
        case kEnter: at = next(tr.enters, index = s.next_enter); break;
        case kLeave: at = next(tr.leaves, index = s.next_leave); break;
        case kClear: at = next(tr.clears, index = s.next_clear); break;
        case kSight:
            while (s.next_sight < tr.sightings.size() && tr.sightings[s.next_sight].skip) ++s.next_sight;
            at = next(tr.sightings, index = s.next_sight);
            break;
        case kPass: at = next(tr.passes, index = s.next_pass); break;
        case kCall: at = next(tr.calls, index = s.next_call); break;
        case kRequest: requests_.schedule_next(t); return;
        default: return;
    }
    if (!at) return;
    const double p = at->s;
    const std::uint32_t payload = static_cast<std::uint32_t>(index);
    // A train standing with its head on p, or braking to a stand there, has not passed p: the
    // motion that takes it on schedules the point again.
    auto held_short = [&] {
        if (s.phase == Phase::standing) return p >= s.s_stand - kEps;
        if (s.phase != Phase::moving || s.free_end) return false;
        const auto e = motion_.ends(t);
        return e.v_end <= 0.0 && p >= e.s_end - kEps;
    };
    if ((kind == kEnter || kind == kPass) && held_short()) return;
    // A leave or a signal at the spot of an enter still to come rides on the enter's event (it
    // has the same time; enters come in order), unless the train comes to a stand there: the
    // head then reaches the end of the section behind on arrival, the next section only when it
    // moves on.  Every new motion schedules its points again, so this holds for each motion.
    if (kind == kLeave || kind == kPass) {
        if (at->at_enter >= 0 && static_cast<std::size_t>(at->at_enter) >= s.next_enter &&
            (kind == kPass || !held_short()))
            return;
    }
    const double when = motion_.time_at_place(t, *at);
    if (!std::isnan(when)) push(when, kind, t, payload);
}

void Day::schedule_points(std::uint32_t t) {
    for (Kind k : {kEnter, kLeave, kClear, kSight, kPass, kCall, kRequest}) schedule_point(t, k);
    const TrainState& s = st_[t];
    if (s.phase == Phase::moving)
        push(s.t0 + motion_.ends(t).duration, s.leg < 0 && s.join_leg >= 0 ? kJoin : s.free_end ? kExit : kArrive, t);
}

long Day::record_for(std::uint32_t t, std::size_t k) {
    return records_.open_section(st_[t], t, train(t).section_index[k], k, now());
}

void Day::appear_granted(std::uint32_t t, const HoldCause& held_by) {
    st_[t].appear_cause = held_by;
    st_[t].appear_granted = true;
    try_appear(t);
}

void Day::route_granted(std::uint32_t t, std::size_t route, const HoldCause& held_by) {
    RouteRecord& record = records_.route(st_[t].route_record[route]);
    record.granted = now();
    record.held_by = held_by;
    record.cleared = st_[t].route_set[route];
    st_[t].request_pending = false;
    ++st_[t].next_request;
    requests_.schedule_next(t);
}

void Day::try_appear(std::uint32_t t) {
    TrainState& s = st_[t];
    const ServiceRun& run = run_of(t);
    if (run.path.starts_at_edge) {
        // The plan needs the driver to know every route whose warning point lies at or behind the
        // line end before the head crosses it (the signals beyond the line end, outside the model,
        // show it): until then the train waits outside.  Without such a route it enters on the
        // authority the last signal outside gave it, up to the first signal in the model.
        const auto& routes = train(t).routes;
        std::size_t known_outside = 0;
        while (known_outside < routes.size() && routes[known_outside].warning_point <= kEps) {
            if (!authority_.route_known(t, known_outside)) return;
            ++known_outside;
        }
        s.phase = Phase::moving;
        s.t0 = now();
        s.s_stand = 0.0;
        s.eoa = 0.0;
        {
            // Held outside the model beyond its (possibly late) entry: knock-on at the first call.
            const double due = run.appear_time + entry_delay(delays_, t);
            if (now() - due > kNoiseFloor) records_.add_knock_on(records_.first_timing(t), now() - due, due, now(), true);
            s.last_departure = now();
        }
        // Motion starts at entry speed on the planned first leg; authority is read at once
        // (signals in sight), and the motion follows from it.
        motion_.enter(t);
        // Signals whose read point lies at or behind the line end, or whose route the driver had
        // to know there, are in view as it enters.
        const auto& sightings = train(t).sightings;
        while (s.next_sight < sightings.size() &&
               (sightings[s.next_sight].skip || sightings[s.next_sight].s <= kEps || s.next_sight < known_outside))
            ++s.next_sight;
        check_authority(t);
        if (!routes.empty() && s.eoa < routes[0].s_entry - kEps) {
            s.eoa = routes[0].s_entry;
            replan(t);
        }
        if (s.eoa <= kEps) {
            // No authority yet: it must stop at the line end (approximation: it waits outside).
            s.phase = Phase::waiting;
            return;
        }
        return;
    }
    // Originating: stands at its first stop until ready and the exit route is set.
    s.phase = Phase::standing;
    s.s_stand = 0.0;
    s.stand_since = now();
    s.stop_call = 0;
    const double entry = entry_delay(delays_, t);
    s.ready_time = std::max(run.calls[0].scheduled_departure + entry, now() + dwell_at(t, 0));
    // Kept off its platform by the previous occupant, or waiting for its set or crew (a link whose
    // earlier train has arrived): what that costs it is knock-on.  Its own readiness counts its
    // dwell from its own (late) appearance: a late start and a long preparation are both its own
    // delays, not knock-on.
    const double ready_on_time =
        std::max(run.calls[0].scheduled_departure + entry, run.appear_time + entry + dwell_at(t, 0));
    s.own_ready = ready_on_time;
    long binding = -1;
    if (!train(t).links_in.empty()) {
        const double hold = links_.hold(t, 0);
        if (std::isfinite(hold) && hold > s.ready_time) s.ready_time = hold;
        binding = s.appear_deferred || hold > ready_on_time + kNoiseFloor ? 0 : -1;
    }
    if (s.ready_time - ready_on_time > kNoiseFloor) {
        HoldCause cause = s.appear_cause;
        if (binding >= 0) cause = links_.cause(links_.binding(t, 0));
        records_.add_knock_on(records_.first_timing(t), s.ready_time - ready_on_time, ready_on_time, s.ready_time, false, cause);
        records_.add_wait({t, std::string(), ready_on_time, s.ready_time, run.calls[0].station, cause});
    }
    const auto& sec = run.path.sections;
    while (s.next_enter < sec.size() && sec[s.next_enter].s_from < kEps) {
        long r = record_for(t, s.next_enter);
        records_.section(r).head_enters = now();
        ++s.next_enter;
    }
    s.eoa = train(t).routes.empty() ? run.path.length : std::min(train(t).routes[0].s_entry, run.path.length);
    if (train(t).routes.empty() || train(t).routes[0].s_entry > kEps) s.eoa = std::max(s.eoa, 0.0);
    records_.record_call(s, t, 0, kNoTime, kNoTime);
    s.next_call = 1;
    push(s.ready_time, kDepartReady, t);
    cancel_motion(t);
    schedule_points(t);
}

void Day::check_authority(std::uint32_t t) {
    TrainState& s = st_[t];
    if (s.phase == Phase::finished) return;
    const double eoa = authority_.known_end(t);
    if (eoa <= s.eoa + kEps) return;
    s.eoa = eoa;
    if (s.phase == Phase::moving) {
        replan(t);
    } else if (s.phase == Phase::standing) {
        if (s.stop_call >= 0) {
            if (s.ready && may_depart(t)) depart(t);
        } else {
            end_hold(t);
            replan(t);
        }
    }
}

void Day::end_hold(std::uint32_t t) {
    TrainState& s = st_[t];
    if (std::isnan(s.hold_from)) return;
    std::string signal;
    HoldCause cause;
    const auto& routes = train(t).routes;
    for (std::size_t j = 0; j < routes.size(); ++j)
        if (std::fabs(routes[j].s_entry - s.s_stand) < 50.0 && routes[j].s_entry >= s.s_stand - kEps) {
            signal = routes[j].entry_signal;
            // What kept the route from this signal back (the train stood for it).
            if (s.route_record[j] >= 0) cause = records_.route(s.route_record[j]).held_by;
            cause.signal = signal;
            break;
        }
    records_.add_hold({t, signal, s.hold_from, now(), std::string(), cause});
    s.hold_from = kNoTime;
}

void Day::depart(std::uint32_t t) {
    TrainState& s = st_[t];
    const std::size_t k = static_cast<std::size_t>(s.stop_call);
    const long link = train(t).links_in.empty() ? -1 : links_.finish(t, k);
    // Ready but kept: by a link that let it go only now, else by the last route out to be set.
    HoldCause cause;
    if (!std::isnan(s.ready_time) && now() - s.ready_time > kNoiseFloor) {
        if (link >= 0 && links_.hold(t, s.stop_call) >= now() - kEps) {
            cause = links_.cause(link);
        } else {
            double last = -kInf;
            const auto& routes = train(t).routes;
            for (std::size_t j = s.next_pass; j < routes.size() && routes[j].after_stop == s.stop_call; ++j)
                if (s.route_record[j] >= 0 && !(st_[t].route_set[j] < last)) {
                    last = st_[t].route_set[j];
                    cause = records_.route(s.route_record[j]).held_by;
                    cause.signal = routes[j].entry_signal;
                }
            // A route nothing held, asked for late only because the link's time was not known
            // before its earlier train arrived: the link kept it.
            if (cause.kind == HoldCause::Kind::none && link >= 0 &&
                links_.hold(t, s.stop_call) > s.ready_time + kNoiseFloor)
                cause = links_.cause(link);
        }
        records_.add_wait({t, std::string(), s.ready_time, now(), run_of(t).calls[k].station, cause});
    }
    records_.record_call(s, t, k, kNoTime, now(), cause);
    s.stop_call = -1;
    s.ready = false;
    s.ready_time = kNoTime;
    motion_.sample_until(t, now());
    motion_.start_leg(t, s.s_stand);
    replan(t);
}

void Day::begin_standing(std::uint32_t t) {
    TrainState& s = st_[t];
    const ServiceRun& run = run_of(t);
    motion_.come_to_stand(t);
    const auto& calls = run.calls;
    if (s.next_call < calls.size() && calls[s.next_call].stops && std::fabs(calls[s.next_call].s - s.s_stand) < 1e-3) {
        const std::size_t k = s.next_call++;
        s.stop_call = static_cast<long>(k);
        records_.record_call(s, t, k, now(), kNoTime);
        if (!train(t).links_out.empty())
            links_.arrive(t, k, [&](std::uint32_t next) {
                // The later train's route out can now be timed by the known hold (a request the
                // link times; any other stands as it was scheduled).
                const TrainState& n = st_[next];
                if ((n.phase == Phase::standing || n.phase == Phase::moving) && !n.request_pending &&
                    n.next_request < train(next).routes.size() && requests_.link_timed_stop(next, n.next_request) >= 0)
                    requests_.schedule_next(next);
            });
        const double min_dwell = dwell_at(t, k);
        if (k + 1 == calls.size() && !run.path.ends_at_edge) {
            push(now() + min_dwell, kVanish, t);
        } else {
            s.ready_time = std::max(calls[k].scheduled_departure, now() + min_dwell);
            s.own_ready = s.ready_time;
            push(s.ready_time, kDepartReady, t);
        }
    } else {
        s.hold_from = now();
    }
    cancel_motion(t);
    schedule_points(t);
}

void Day::vanish(std::uint32_t t) {
    TrainState& s = st_[t];
    motion_.sample_until(t, now());
    if (s.stop_call >= 0) records_.record_call(s, t, static_cast<std::size_t>(s.stop_call), kNoTime, now());
    // A set that turns back stays on its platform: the sections it stands on pass straight to
    // its return part, which holds them until it leaves (models/blocking_time, platform_handover).
    const SimModel::Train& tr = train(t);
    for (const PlatformHandover& h : tr.hands_over) {
        if (!s.holds[h.incoming]) continue;
        SectionRecord& r = records_.section(s.section_record[h.incoming]);
        if (std::isnan(r.tail_clears)) r.tail_clears = now();
        r.released = now();
        authority_.hand_over(t, h.incoming, tr.turns_into, h.outgoing);
    }
    for (std::size_t k = 0; k < s.holds.size(); ++k) {
        if (!s.holds[k]) continue;
        long r = s.section_record[k];
        if (std::isnan(records_.section(r).tail_clears)) records_.section(r).tail_clears = now();
        push(now() + times_.release, kRelease, t, static_cast<std::uint32_t>(k));
    }
    s.phase = Phase::finished;
    cancel_motion(t);
    // The set has left the platform: the services it forms may appear.
    links_.set_left(t);
}

void Day::handle(const Event& e) {
    if (e.entity == no_entity) {
        for (std::uint32_t g : disrupted_[e.payload]) {
            if (e.kind == kDisruptionStart) authority_.close_section(g);
            else authority_.reopen_section(g);
        }
        if (e.kind == kDisruptionEnd) grant_pending();
        return;
    }
    const std::uint32_t t = DayEvents::train_of(e.entity);
    TrainState& s = st_[t];
    const TrainPath& path = run_of(t).path;
    // A point event is for the next point of its kind only: a handler that recomputes the
    // motion schedules the next point itself, and the copy it may leave behind must not count
    // as passing a further point (a skipped signal would never be read: the train would wait
    // at it for good).
    auto stale_point = [&](std::size_t next) { return e.payload != next; };
    switch (static_cast<Kind>(e.kind)) {
        case kAppear:
            if (!links_.set_arrived(t)) {   // a formed service waits for its set (vanish wakes it)
                s.awaiting_set = true;
                break;
            }
            // First the sections it appears on (a train entering over the line end: those up to
            // the first signal, which no route of its own protects) must be free.
            authority_.ask_to_appear(t);
            grant_pending();
            break;
        case kRelease: {
            const std::size_t k = e.payload;
            if (!authority_.release(t, k)) break;
            records_.section(s.section_record[k]).released = now();
            grant_pending();
            break;
        }
        case kAuthorityCheck:
            if (s.phase == Phase::waiting) {
                if (s.appear_granted && path.starts_at_edge) try_appear(t);
            } else {
                check_authority(t);
            }
            break;
        case kDepartReady:
            if (s.phase != Phase::standing || s.stop_call < 0) break;
            s.ready = true;
            if (may_depart(t)) depart(t);
            else if (!train(t).links_in.empty()) links_.schedule_check(t);
            break;
        case kLinkCheck:
            if (s.phase == Phase::standing && s.stop_call >= 0 && s.ready && may_depart(t)) depart(t);
            break;
        case kVanish: vanish(t); break;
        case kEnter: {
            if (stale_point(s.next_enter)) break;
            long r = record_for(t, e.payload);
            // Unprotected stretch (no route covers it): occupied as the head enters.
            authority_.occupy(t, e.payload);
            records_.section(r).head_enters = now();
            ++s.next_enter;
            schedule_point(t, kEnter);
            // The section end and the signal at the same spot (see schedule_point).
            const SimModel::Train& tr = train(t);
            const std::int32_t here = static_cast<std::int32_t>(e.payload);
            if (s.next_leave < tr.leaves.size() && tr.leaves[s.next_leave].at_enter == here) head_leaves(t);
            if (s.next_pass < tr.passes.size() && tr.passes[s.next_pass].at_enter == here) passes_signal(t);
            break;
        }
        case kLeave:
            if (stale_point(s.next_leave)) break;
            head_leaves(t);
            break;
        case kClear: {
            if (stale_point(s.next_clear)) break;
            const std::size_t k = e.payload;
            if (s.section_record[k] >= 0) records_.section(s.section_record[k]).tail_clears = now();
            if (s.holds[k]) push(now() + times_.release, kRelease, t, static_cast<std::uint32_t>(k));
            ++s.next_clear;
            schedule_point(t, kClear);
            break;
        }
        case kSight:
            if (stale_point(s.next_sight)) break;
            ++s.next_sight;
            check_authority(t);
            if (s.phase != Phase::finished) schedule_point(t, kSight);
            break;
        case kPass:
            if (stale_point(s.next_pass)) break;
            passes_signal(t);
            break;
        case kCall:
            if (stale_point(s.next_call)) break;
            records_.record_pass(s, t, e.payload, now());
            ++s.next_call;
            schedule_point(t, kCall);
            break;
        case kRequest: {
            if (e.payload != s.next_request || s.request_pending || !requests_.due(t, e.payload, e.time)) break;
            const SimModel::Route& r = train(t).routes[e.payload];
            s.route_record[e.payload] = records_.open_route(t, r, now());
            s.request_pending = true;
            authority_.ask_for_route(t, e.payload);
            grant_pending();
            break;
        }
        case kArrive: begin_standing(t); break;
        case kBrakePoint: replan(t, true); break;
        case kJoin: join_leg(t); break;
        case kDisruptionStart:
        case kDisruptionEnd: break;   // handled above: they belong to no train
        case kExit:
            // Head over the line end: the rest of the train follows at exit speed; the tail
            // clearings are already scheduled by extrapolation.
            push(now() + run_of(t).type->length / std::max(motion_.traj(t).v.back(), 0.1), kVanish, t);
            break;
    }
}

void Day::report_deadlock() {
    // Every train not finished, with what it waits for and who keeps that from it (sim_result.hpp,
    // DeadlockWait); the words follow from these (sim/deadlock_text).
    DeadlockReport& report = records_.deadlock();
    report.time = now();
    report.waiting.clear();
    for (std::uint32_t t = 0; t < st_.size(); ++t) {
        const TrainState& s = st_[t];
        if (s.phase == Phase::finished) continue;
        const ServiceRun& run = run_of(t);
        const TrainPath& path = run.path;
        const auto& routes = train(t).routes;
        auto chainage = [&](double p) {
            return std::isfinite(p) ? path.chainage_at(std::clamp(p, path.s_min, path.s_max)) : kNoTime;
        };
        const bool outside = s.phase == Phase::waiting;
        DeadlockWait w;
        w.train = t;
        if (!outside) w.chainage = chainage(motion_.head_position(t));
        if (s.phase == Phase::standing && s.stop_call >= 0) w.station = run.calls[s.stop_call].station;
        if (outside) w.since = run.appear_time + entry_delay(delays_, t);
        else if (s.phase == Phase::moving) w.since = s.t0;
        else w.since = s.stop_call >= 0 && !std::isnan(s.ready_time) ? s.ready_time : s.stand_since;

        const long request = authority_.pending_request(t);
        bool blocked = false;   // it waits for sections others keep from it
        if (const long l = links_.stuck(t); l >= 0) {
            // A link whose earlier train never came keeps it, whatever else it might wait for.
            const LinkPlan& link = model_.links()[static_cast<std::size_t>(l)];
            w.waits_for = DeadlockWait::For::link;
            w.link_kind = link.kind;
            w.link_from = static_cast<std::uint32_t>(link.from);
            // (a formed service that never appeared is due at its origin)
            if (outside && !run.calls.empty()) w.station = run.calls.front().station;
        } else if (request == MovementAuthority::kToAppear) {
            w.waits_for = DeadlockWait::For::appear;
            if (!run.calls.empty()) w.station = run.calls.front().station;
            blocked = true;
        } else if (request != MovementAuthority::kNothing) {
            const SimModel::Route& r = routes[static_cast<std::size_t>(request)];
            w.waits_for = outside ? DeadlockWait::For::enter : DeadlockWait::For::route;
            w.signal = r.entry_signal;
            blocked = true;
        } else if (s.phase != Phase::moving) {
            // Nothing it asked for is outstanding: the route that would take its authority on is
            // set but not seen, or was never asked for.
            std::size_t j = 0;
            while (j < routes.size() && routes[j].s_entry < s.eoa - kPositionTolerance) ++j;
            if (j < routes.size()) {
                w.signal = routes[j].entry_signal;
                if (std::isnan(s.route_set[j])) {
                    w.waits_for = DeadlockWait::For::request;
                } else {
                    w.waits_for = outside ? DeadlockWait::For::entry_view : DeadlockWait::For::view;
                    w.route_set = s.route_set[j];
                    w.read_from = chainage(routes[j].read_point);
                }
            }
        }
        if (blocked) authority_.blocks(t, request, w.blocks);
        report.waiting.push_back(std::move(w));
    }
    report.deadlocked = !report.waiting.empty();
    records_.put_deadlock_into_words();
}

SimResult Day::run() {
    Event e;
    while (events_.next(e)) {
        if (trace_ != kNoTrain && e.entity != no_entity && DayEvents::train_of(e.entity) == trace_)
            std::fprintf(stderr, "%.3f kind %u payload %u phase %d s=%.1f eoa=%.1f req=%zu pend=%d\n", now(), e.kind, e.payload,
                         static_cast<int>(st_[trace_].phase), motion_.head_position(trace_), st_[trace_].eoa,
                         st_[trace_].next_request, (int)st_[trace_].request_pending);
        handle(e);
        if (records_.count_event() > options_.max_events)
            throw std::runtime_error("simulation exceeded " + std::to_string(options_.max_events) +
                                     " events: stopped (a bug; please report the scenario)");
    }
    report_deadlock();
    return records_.take();
}

}  // namespace

bool InjectedDelays::empty() const {
    auto none = [](const std::vector<double>& v) {
        return std::all_of(v.begin(), v.end(), [](double d) { return d == 0.0; });
    };
    return none(entry) && std::all_of(dwell.begin(), dwell.end(), none) &&
           std::all_of(running.begin(), running.end(), none) && blocked.empty();
}

SimResult simulate_day(const SimModel& model, const InjectedDelays& delays, const SimOptions& options) {
    Day day(model, delays, options);
    SimResult result = day.run();
    result.crossing_changes = crossing_changes(model, result);
    return result;
}

}  // namespace knockon
