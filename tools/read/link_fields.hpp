#pragma once
// Links between services (`timetable.links`: forms, feeds, crew_to; README "Links"), read one way
// for a line scenario and a network file, against the services as expanded (runs of a repeat
// pattern named by their first time).
#include <optional>
#include <string>
#include <vector>

#include "models/service_paths.hpp"
#include "models/timetable.hpp"
#include "tools/read/delay_fields.hpp"
#include "tools/read/yaml_fields.hpp"

namespace knockon::yamlio {

// Appends each link of the list at `links` of `timetable` (optional) that has no problem to
// `out`, with its location to `where`; links already in `out` count for "a set forms one later
// service".  `paths`, where given, lays paths for the checks that
// need them (a turnaround's platform track); nullptr leaves those out (a timetable with other
// errors).
void read_links(ErrorList& errors, const MapFields& timetable, const std::vector<Service>& services,
                const StationCheck& station_problem, const ServicePaths* paths, std::vector<ServiceLink>& out,
                std::vector<std::string>& where);

}  // namespace knockon::yamlio
