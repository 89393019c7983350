#pragma once
// What the day did differently from the plan on single-track stretches: crossings of opposing
// trains that took place at another crossing place, and trains of one direction that passed a
// stretch in another order (an overtaking moved, added or dropped).  Found after the day from the
// as-run section records, whoever decided it (the dispatcher, or a train simply arriving first).
//
// For a pair of trains sharing stretches, the place their order flips is where they cross (or,
// one direction, where one overtakes the other): the place between the last shared stretch the
// first train passed first and the first one it passed second.  Opposing trains always cross
// somewhere (at the end of their shared stretches when the order never flips); trains of one
// direction may keep their order throughout.  A pair counts when the as-run place differs from the
// planned one.  Each train's change is its delay on leaving the later of the two places minus its
// delay on reaching the earlier one (in its own direction of travel): what it gained (negative) or
// lost (positive) over the part of the line where the crossing moved.
#include <cstdint>
#include <string>
#include <vector>

namespace knockon {

class SimModel;
struct SimResult;

struct CrossingChange {
    enum class Kind { moved_crossing, changed_order };
    Kind kind = Kind::moved_crossing;
    std::uint32_t first = 0, second = 0;   // trains: planned first over the first shared stretch, then the other
    std::string planned_place, actual_place;   // "" where one direction keeps its order
    double when = 0.0;                          // as run: the second train enters the stretch beyond the actual place [s]
    double first_change = 0.0, second_change = 0.0;   // delay lost (+) or gained (-) [s]; NaN when not measurable
};
const char* to_string(CrossingChange::Kind k);

// The changes of one day, in order of `when`.  Trains that did not pass all their shared stretches
// (a deadlocked day) are left out.
std::vector<CrossingChange> crossing_changes(const SimModel& model, const SimResult& day);

}  // namespace knockon
