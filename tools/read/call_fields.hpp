#pragma once
// One call of a service as a line scenario and a network file both write it: `station`, then
// either `pass` (a time or auto) or a stop's `arr`, `dep` and `min_dwell`, and an optional
// `track`.  The caller opens the map with the keys its format allows.
#include "models/timetable.hpp"
#include "tools/read/yaml_fields.hpp"

namespace knockon::yamlio {

// Fills `call` from `c`; false when a field is missing or wrong (the error recorded).
bool read_call(const MapFields& c, Call& call);

}  // namespace knockon::yamlio
