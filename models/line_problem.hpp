#pragma once
// A problem of a line scenario's model (infrastructure or timetable), as a sentence tied to the
// object and field it is about, so that a reader can put the file, line and column in front of
// it and a scenario built in code gets the same sentence (models/scenario_checks).
#include <cstddef>
#include <limits>
#include <string>

namespace knockon {

// `area_list`: the signalling areas as a whole (index 0).
enum class LineObject { track, station, signal, joint, area, area_list, service };
const char* to_string(LineObject kind);

struct LineProblem {
    static constexpr std::size_t kNone = std::numeric_limits<std::size_t>::max();

    LineObject kind = LineObject::track;
    std::size_t index = 0;        // into the Infrastructure's vector of that kind, or Timetable::services
    std::size_t call = kNone;     // a service's call; kNone: the service as a whole
    // The field as a line scenario names it ("parent", "at", "station"; "calls" for a service's
    // list of calls); empty: the object (or call) as a whole.
    std::string field;
    std::string message;
    // The object of the same kind this one clashes with (the first of two with one id, a signal
    // already standing at the place), or kNone.  A reader may say where that one stands by
    // inserting it into `message` at `other_at`: " (first at line N)" for the first of two
    // objects with one id (other_field "id"), " (line N)" for the object as a whole.
    std::size_t other = kNone;
    std::string other_field;      // the other's field to point at ("id"); empty: the object
    std::size_t other_at = 0;
};

// "track L1", "service S1, call 2": the object a problem is about, for messages without a file.
std::string describe_object(const LineProblem& p, const std::string& name);

}  // namespace knockon
