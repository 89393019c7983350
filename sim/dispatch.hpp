#pragma once
// The dispatcher's safety rule (route order `dispatch`): a grant is made only if, after it, every
// train on the line still has a way to run to the end of its path.  The check plays the trains
// forward on the sections alone: a train may move on to the next place where it can stand clear
// of opposing traffic (a crossing place, or track of one direction; SimModel::Train::advance) when
// every section up to and through that place is free, and leaves the line when that place is its
// path's end; moving releases what it held.  If some order of such moves takes every train off
// the line, a way exists, and granting cannot close a circle of trains each waiting for the next:
// the trains could at worst wait their turn in that order.  If no such order is found the grant
// waits (the check errs on the side of waiting: it moves trains from place to place whole, and
// tries the trains in a fixed order instead of every order).
#include <cstdint>
#include <vector>

#include "sim/interlocking.hpp"
#include "sim/sim_model.hpp"

namespace knockon {

class DispatchCheck {
public:
    explicit DispatchCheck(const SimModel& model) : model_(model) {}
    // Whether `train` may take `sections` (global indices, each free or its own) now.
    bool leaves_a_way(const Interlocking& interlocking, std::uint32_t train,
                      const std::vector<std::uint32_t>& sections) const;

private:
    const SimModel& model_;
    // Scratch, kept between calls (one check per grant).
    mutable std::vector<std::uint32_t> holder_;
    mutable std::vector<std::uint32_t> trains_, frontier_;
};

}  // namespace knockon
