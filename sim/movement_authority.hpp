#pragma once
// Movement authority: who may go where.  The engine (sim/simulation) asks through the
// MovementAuthority interface, in train, route and path-section indices only: a train asks to
// appear or for its next route, the authority grants what it may (telling the engine through
// Grants), the train occupies and releases sections as it runs, and its driver knows the end of
// authority the authority has shown it.  SectionAuthority is the one in use: fixed blocks, routes
// of detection sections granted by the interlocking (sim/interlocking) under the timetable order
// or the dispatcher's rules (sim/dispatch), aspects counting the routes set ahead.
//
// Why a seam: how authority is given (fixed blocks on a line or a network today, moving block
// later) is a rule of its own; the event loop, the train's motion (sim/train_motion) and the
// route requests (sim/route_requests) should not grow with each kind.  The engine holds the
// concrete class, so the calls on its hot path are direct and inline.
#include <algorithm>
#include <cmath>
#include <cstdint>
#include <vector>

#include "sim/day_records.hpp"
#include "sim/day_state.hpp"
#include "sim/dispatch.hpp"
#include "sim/interlocking.hpp"

namespace knockon::day {

class MovementAuthority {
public:
    // Whom the authority tells of a grant (the engine): once per grant, never per event.
    class Grants {
    public:
        // The sections train t appears on are its own (held_by: what kept them from it, last).
        virtual void appear_granted(std::uint32_t t, const HoldCause& held_by) = 0;
        // Route `route` of train t is granted now (TrainState::route_set says when it is set;
        // held_by: what kept it from the train, last).
        virtual void route_granted(std::uint32_t t, std::size_t route, const HoldCause& held_by) = 0;

    protected:
        ~Grants() = default;
    };
    static constexpr long kToAppear = -1;   // pending_request: asks for the sections it appears on
    static constexpr long kNothing = -2;    // pending_request: asks for nothing

    virtual ~MovementAuthority() = default;

    virtual void ask_to_appear(std::uint32_t t) = 0;
    virtual void ask_for_route(std::uint32_t t, std::size_t route) = 0;
    // Grants every pending request it may now, in order of asking.  A route granted is set after
    // the set-up time (TrainState::route_set), and the driver's check of the authority comes the
    // sight-and-reaction time after that (a kAuthorityCheck event).
    virtual void grant_pending(Grants& grants) = 0;
    // The head of train t enters its path section k, which no route covers: it holds it now.
    virtual void occupy(std::uint32_t t, std::size_t k) = 0;
    // Train t gives up its path section k (false: it did not hold it).
    virtual bool release(std::uint32_t t, std::size_t k) = 0;
    // Train t's path section k, which it holds, passes straight to train `to` (its path section k_to).
    virtual void hand_over(std::uint32_t t, std::size_t k, std::uint32_t to, std::size_t k_to) = 0;
    // A disruption takes section g (global index) out of use, and gives it back.
    virtual void close_section(std::uint32_t g) = 0;
    virtual void reopen_section(std::uint32_t g) = 0;

    // The driver of train t knows route j is set.
    virtual bool route_known(std::uint32_t t, std::size_t j) const = 0;
    // The end of authority the driver of train t knows now (never short of what it knew).
    virtual double known_end(std::uint32_t t) const = 0;
    // Standing at a stop, train t has the authority to leave it.
    virtual bool departure_known(std::uint32_t t) const = 0;

    // For a day that stopped with trains waiting: what train t asks for (a route, kToAppear or
    // kNothing), and who keeps the sections of that request from it.
    virtual long pending_request(std::uint32_t t) const = 0;
    virtual void blocks(std::uint32_t t, long request, std::vector<DeadlockBlock>& out) const = 0;
};

class SectionAuthority final : public MovementAuthority {
public:
    SectionAuthority(const SimModel& model, RouteOrder order, std::vector<TrainState>& states, DayEvents& events,
                     DayRecords& records);

    void ask_to_appear(std::uint32_t t) override { pending_.push_back({t, kToAppear}); }
    void ask_for_route(std::uint32_t t, std::size_t route) override {
        pending_.push_back({t, static_cast<long>(route)});
    }
    void grant_pending(Grants& grants) override;
    void occupy(std::uint32_t t, std::size_t k) override {
        TrainState& s = st_[t];
        if (s.holds[k]) return;
        interlocking_.take(t, {train(t).section_index[k]});
        s.holds[k] = 1;
    }
    bool release(std::uint32_t t, std::size_t k) override {
        TrainState& s = st_[t];
        if (!s.holds[k]) return false;
        s.holds[k] = 0;
        interlocking_.release(t, train(t).section_index[k]);
        return true;
    }
    void hand_over(std::uint32_t t, std::size_t k, std::uint32_t to, std::size_t k_to) override;
    void close_section(std::uint32_t g) override { interlocking_.take_out_of_use(g); }
    void reopen_section(std::uint32_t g) override { interlocking_.restore(g); }

    // The route is set and the driver has had the reaction time since.
    bool route_known(std::uint32_t t, std::size_t j) const override {
        const double set = st_[t].route_set[j];
        return !std::isnan(set) && set + times_.sight_reaction <= events_.now() + kEps;
    }
    // The end of authority the signals in view give: a signal is in view from the sight event
    // at its read point (always under cab signalling) until the head passes it (its pass
    // event; a train standing at a signal still reads it).  Counting events, not looking the
    // head up in the motion, keeps this off the long, mostly cold motion arrays.  The aspect a
    // signal shows counts the consecutive routes set from it on, capped by its aspect system;
    // an aspect of k gives authority to the k-th signal ahead.
    double known_end(std::uint32_t t) const override {
        const TrainState& s = st_[t];
        const auto& routes = train(t).routes;
        double eoa = s.eoa;
        for (std::size_t j = s.next_pass; j < routes.size(); ++j) {
            if (!signal_in_view(t, j)) break;
            int k = 0;
            while (k < routes[j].aspect_cap && j + k < routes.size() && route_known(t, j + k)) ++k;
            if (k == 0) continue;
            double end = routes[j + k - 1].authority_end;
            if (j + k < routes.size()) end = routes[j + k].s_entry;
            eoa = std::max(eoa, end);
        }
        return eoa;
    }
    // A train at a stop leaves once the driver knows that every route its departure needs (the
    // routes the plan blocks from this departure, SimModel::Route::after_stop) is set: the
    // starter shows proceed, whether in sight of the stopping mark or repeated there.  Where no
    // route is needed for the departure, its authority must reach beyond the stop.
    bool departure_known(std::uint32_t t) const override {
        const TrainState& s = st_[t];
        const auto& routes = train(t).routes;
        // (they are the routes from the first signal ahead on: models/blocking_time stop_in)
        std::size_t j = s.next_pass;
        for (; j < routes.size() && routes[j].after_stop == s.stop_call; ++j)
            if (!route_known(t, j)) return false;
        return j > s.next_pass || s.eoa > s.s_stand + kEps;
    }

    long pending_request(std::uint32_t t) const override;
    void blocks(std::uint32_t t, long request, std::vector<DeadlockBlock>& out) const override;

private:
    struct Pending {
        std::uint32_t train;
        long route;  // kToAppear: the train waits to appear at its origin
        HoldCause cause = {};   // what kept it back when last tried
    };

    const SimModel::Train& train(std::uint32_t t) const { return model_.trains()[t]; }
    const ServiceRun& run_of(std::uint32_t t) const { return train(t).plan->run; }
    double now() const { return events_.now(); }
    // The driver can read the aspect of route j's entry signal: from its read point (always under
    // cab signalling) until the head passes it, and while standing at a stop whose departure
    // needs the route.
    bool signal_in_view(std::uint32_t t, std::size_t j) const {
        const TrainState& s = st_[t];
        const SimModel::Train& tr = train(t);
        return j < s.next_sight || tr.sightings[j].skip ||
               (s.phase == Phase::standing && s.stop_call >= 0 && tr.routes[j].after_stop == s.stop_call);
    }
    // A grant: the train holds these sections (global indices, and the same as path indices).
    void take_sections(std::uint32_t t, const std::vector<std::uint32_t>& globals,
                       const std::vector<std::uint32_t>& path_sections);
    const std::vector<std::uint32_t>& sections_of(const Pending& p) const;
    const std::vector<std::uint32_t>& path_sections_of(const Pending& p) const;
    // Why t may not take section g (path section k) now: the interlocking's blocker, or under the
    // dispatcher the opposing train it lets through first (crossing_promise); kNoTrain if none.
    std::uint32_t blocker_of(std::uint32_t t, std::uint32_t g, std::uint32_t k) const;
    // Train a's pending requests wait, directly or through other waiting trains, for train b.
    bool waits_on(std::uint32_t a, std::uint32_t b, std::vector<std::uint8_t>& seen) const;
    // The interlocking may give train t these sections now (see grant_pending).
    bool may_take(std::uint32_t t, const std::vector<std::uint32_t>& sections,
                  const std::vector<std::uint32_t>& path_sections) const;
    // Under the dispatcher: the opposing train `t` must let through first on the single-track
    // stretch holding its path section k (global g), by the crossing rule; else kNoTrain.
    std::uint32_t crossing_promise(std::uint32_t t, std::uint32_t g, std::uint32_t k) const;
    // The delay a train has now, as the dispatcher forecasts it: the larger of what its last
    // timing point showed and how late it is for the next one (0 when on time or early).
    double forecast_delay(std::uint32_t t) const;
    // What keeps a request for these sections back now: the first section another train holds or
    // a disruption closes, else the first promised to a train planned earlier, else the dispatcher.
    HoldCause blocking_cause(std::uint32_t t, const std::vector<std::uint32_t>& sections) const;

    const SimModel& model_;
    const InterlockingTimes& times_;
    const RouteOrder order_;
    TrainState* const st_;   // the engine's train states, one per train for the whole day
    DayEvents& events_;
    DayRecords& records_;
    Interlocking interlocking_;
    DispatchCheck dispatch_;
    std::vector<std::uint8_t> outside_;   // [train]: 1 until given the sections it appears on
    std::vector<Pending> pending_;
};

}  // namespace knockon::day
