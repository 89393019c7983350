#pragma once
// A whole scenario as the models see it: infrastructure, rolling stock, timetable and the
// study settings.  Built by the scenario reader at the edge (tools/read), never from YAML here.
#include <map>
#include <optional>
#include <string>
#include <vector>

#include "models/infrastructure.hpp"
#include "models/network/network.hpp"
#include "models/network/timetable.hpp"
#include "models/primary_delay_model.hpp"
#include "models/timetable.hpp"
#include "models/train_type.hpp"

namespace knockon {

// Line types for the UIC Code 406 recommended capacity-consumption limits.
enum class LineType { suburban, high_speed, mixed };
const char* to_string(LineType t);

// Where the input gave each timetable entry, each of its calls, each train type and signal, as a
// location ("file:line:col: path.to.entry"), so that a problem found while planning points back
// into the file.  Empty for a scenario built in code (messages then name the file or nothing).
struct SourceMap {
    std::vector<std::string> services;             // per timetable entry (Service::entry)
    std::vector<std::vector<std::string>> calls;   // per timetable entry, per call
    std::map<std::string, std::string> train_types;   // by type id
    std::map<std::string, std::string> signals;       // by signal id
    std::vector<std::string> links;                   // per Timetable::links entry
};

// The network of a scenario read from a network file (`knockon: 2`): the layout, the corridors
// the planner's views are reported along, and per timetable service (Timetable::services, in
// order) the network run it is: its calls with their tracks and vias, its boundaries, in one
// heading (models/network/runs splits a reversing service into one run per heading).
struct ScenarioNetwork {
    net::Network network;
    std::vector<net::Corridor> corridors;
    std::vector<net::NetworkService> runs;
};

struct Scenario {
    std::string name;
    std::string source_file;
    SourceMap sources;
    LineType line_type = LineType::mixed;
    Infrastructure infrastructure;
    std::vector<TrainType> train_types;
    Timetable timetable;
    PrimaryDelayModel delays;   // optional `delays:` section; empty = no primary delays
    // A network scenario's layout; `infrastructure` is then empty.  None for a line scenario.
    std::optional<ScenarioNetwork> network;

    const TrainType* find_train_type(const std::string& id) const;
    // Locations for messages: the service's timetable entry, one of its calls, a train type.
    std::string where(const Service& service) const;
    std::string where(const Service& service, std::size_t call) const;
    std::string where_type(const std::string& id) const;
    std::string where_signal(const std::string& id) const;
    std::string where_link(std::size_t link) const;
};

}  // namespace knockon
