#pragma once
// Primary delay rules (`delays.entry`, `dwell`, `running`) and delay distributions, read one way
// for a line scenario and a network file (README, "Primary delays").
#include <functional>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "models/primary_delay_model.hpp"
#include "tools/read/yaml_fields.hpp"

namespace knockon::yamlio {

// What is wrong with a station id a rule names (unknown), or nothing.
using StationCheck = std::function<std::optional<std::string>(const std::string&)>;

// The rules in the list at `key` of `m` (optional); a rule with a problem is left out.
void read_delay_rules(ErrorList& errors, const MapFields& m, std::string_view key, std::vector<DelayRule>& out,
                      const StationCheck& station_problem);

// `distribution` and the parameters of that kind, no others; false on a problem (recorded).
bool read_distribution(ErrorList& errors, const MapFields& f, DelayDistribution& d);

}  // namespace knockon::yamlio
