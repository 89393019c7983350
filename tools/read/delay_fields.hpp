#pragma once
// Primary delay rules (`delays.entry`, `dwell`, `running`), disruptions (`delays.disruptions`) and
// delay distributions, read one way for a line scenario and a network file (README, "Primary
// delays").
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

// How the file places a disruption: a line by `track` and chainage, a network by `segment` and
// offsets along it.  The other form's key is refused with a sentence saying why.
enum class DisruptionPlacing { line, network };

// Checks a disruption's place: its track or segment and the range, `from` and `to` where they
// could be read; records any problem at the field of `f` it concerns; false on a problem.  A
// line's range was found to end beyond its start already; a network's check says so itself.
using DisruptionPlaceCheck = std::function<bool(const MapFields& f, const std::string& place,
                                                std::optional<double> from, std::optional<double> to)>;

// The disruptions in the list at `disruptions` of `m` (optional); one with a problem is left out.
void read_disruptions(ErrorList& errors, const MapFields& m, DisruptionPlacing placing, std::vector<DisruptionRule>& out,
                      const DisruptionPlaceCheck& place_problem);

// `distribution` and the parameters of that kind, no others; false on a problem (recorded).
bool read_distribution(ErrorList& errors, const MapFields& f, DelayDistribution& d);

}  // namespace knockon::yamlio
