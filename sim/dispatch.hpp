#pragma once
// The dispatcher's safety rule (route order `dispatch`): a grant is made only if, after it, every
// train on the line still has a way to run to the end of its path.  The check plays the trains
// forward on the sections alone: a train may move on to the next place where it can stand clear
// of opposing traffic (a crossing place, or track of one direction; SimModel::Train::advance) when
// every section up to and through that place is free, and leaves the line when that place is its
// path's end; moving releases what it held.  A train whose held sections end at the far end of
// such a place (on a network a route into a loop holds up to the section before the switch) may
// first come to a stand there, releasing what it holds behind.  If some order of such moves takes
// every train off the line, a way exists, and granting cannot close a circle of trains each
// waiting for the next: the trains could at worst wait their turn in that order.  If no such
// order is found the grant waits (the check errs on the side of waiting: it moves trains from
// place to place whole, and tries the trains in a fixed order instead of every order).
#include <cstdint>
#include <vector>

#include "sim/interlocking.hpp"
#include "sim/sim_model.hpp"

namespace knockon {

// Where two opposing trains cross, when the one asking for a single-track stretch (`asking`) is
// planned to use it after an opposing train (`planned_first`) that has not yet been through.
// Both are forecast to run with the delay they have now (SectionAuthority::forecast_delay in sim/movement_authority), over their planned
// blocking times of the stretch.  Keeping the planned order costs the asking train the time from
// its own forecast blocking start until the other train's forecast release; going first costs the
// other train the time from its forecast blocking start until the asking train's forecast
// release.  Each cost is weighted by its train's dispatch weight (the category weights of the
// scenario, 1 by default), and the asking train goes first only if that costs strictly less
// weighted delay: on an undisturbed day keeping the order costs nothing, so the plan stands.
// The crossing then moves to a place further along the asking train's path (the safety rule,
// DispatchCheck, still decides whether the grant may be made at all).
struct CrossingChoice {
    double keep_cost = 0.0;   // delay to the asking train if it waits [s]
    double swap_cost = 0.0;   // delay to the other train if the asking train goes first [s]
    bool asking_goes_first = false;
};
CrossingChoice choose_crossing(const StretchUse& asking, double asking_delay, double asking_weight,
                               const StretchUse& planned_first, double first_delay, double first_weight);

class DispatchCheck {
public:
    explicit DispatchCheck(const SimModel& model) : model_(model) {}
    // Whether `train` may take `sections` (global indices, each free or its own) now.  outside[t]
    // is 1 for a train not yet given the sections it appears on (its origin_sections): before it
    // can move it must take those, whatever it holds ahead (a train entering over the line end
    // asks for its first routes before it appears).
    bool leaves_a_way(const Interlocking& interlocking, std::uint32_t train, const std::vector<std::uint32_t>& sections,
                      const std::vector<std::uint8_t>& outside) const;

private:
    const SimModel& model_;
    // Scratch, kept between calls (one check per grant).
    mutable std::vector<std::uint32_t> holder_;
    mutable std::vector<std::uint32_t> trains_, frontier_;
    // The last answer per train, for the same sections while the holders stay the same
    // (Interlocking::version): asked again and again while trains wait.
    struct Memo {
        std::uint64_t version = UINT64_MAX;
        const std::uint32_t* sections = nullptr;
        bool result = false;
    };
    mutable std::vector<Memo> memo_;
    mutable std::vector<std::uint8_t> outside_;
    bool check(const Interlocking& interlocking, std::uint32_t train, const std::vector<std::uint32_t>& sections,
               const std::vector<std::uint8_t>& outside) const;
};

}  // namespace knockon
