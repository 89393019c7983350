#pragma once
// The interlocking's bookkeeping of train-detection sections: which train holds each section,
// and in which order trains may take it.
//
// A route is granted only when every section it needs is free or already held by the same
// train.  Under the timetable order policy a train may also take a section only after every
// train planned to use that section before it has released it (so a late train keeps its
// place, as a dispatcher working to the timetable would); under first come first served any
// free section may be taken.
#include <cstdint>
#include <string>
#include <vector>

namespace knockon {

// timetable: in planned order at every section; first_come: to whoever asks first; dispatch:
// first come, but only grants that leave a way for every train on the line to run to its end
// (no deadlock can form: see sim/dispatch.hpp).
enum class RouteOrder { timetable, first_come, dispatch };

inline constexpr std::uint32_t kNoTrain = UINT32_MAX;
// The "holder" of a section taken out of use by a disruption.
inline constexpr std::uint32_t kDisruption = UINT32_MAX - 1;

class Interlocking {
public:
    // planned_order[section] lists the trains that use the section, in planned order.
    Interlocking(std::size_t sections, RouteOrder order, std::vector<std::vector<std::uint32_t>> planned_order);

    // Why `train` may not take `section` now: the holding train, its predecessor in planned
    // order that has not released yet, or kNoTrain when it may.
    std::uint32_t blocker(std::uint32_t train, std::uint32_t section) const;
    // The first train planned on `section` before `train` that has not yet released it, or
    // kNoTrain (the promise the timetable order keeps; the dispatcher keeps some of them).
    std::uint32_t planned_before(std::uint32_t train, std::uint32_t section) const;
    void take(std::uint32_t train, const std::vector<std::uint32_t>& sections);
    // The train gives the section up.  Its place in the planned order is used up.
    void release(std::uint32_t train, std::uint32_t section);
    std::uint32_t holder(std::uint32_t section) const { return holder_[section]; }
    // A disruption takes the section out of use (nesting allowed); trains already holding it
    // keep it, but no route through it is granted until it is back.
    void take_out_of_use(std::uint32_t section) { ++out_of_use_[section]; }
    void restore(std::uint32_t section) { if (out_of_use_[section]) --out_of_use_[section]; }

private:
    RouteOrder order_;
    std::vector<std::uint32_t> holder_;
    std::vector<std::uint32_t> out_of_use_;
    std::vector<std::vector<std::uint32_t>> planned_;   // per section, trains in planned order
    std::vector<std::size_t> next_;                     // per section: first planned train not yet done
    std::vector<std::vector<std::uint8_t>> done_;       // per section, per planned slot: released
};

}  // namespace knockon
