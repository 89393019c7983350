#pragma once
// Reads a network file (`knockon: 2`; README, "Network file") into models/network, with every
// problem located as "file:line:col: path.to.field: message": the reader's own (shape, units,
// ranges, names that refer to nothing) and the network's checks (models/network/checks), each
// put at the object it is about; then the train types, the timetable (models/network/timetable,
// whose checks and paths are located at the service, call or via concerned), the corridors and
// the primary delays.  Train types and delay rules are read as in a line scenario
// (tools/read/train_type_fields, tools/read/delay_fields), calls' times as well (tools/read/call_fields).
#include <cstddef>
#include <string>
#include <vector>

#include "models/network/network.hpp"
#include "models/network/timetable.hpp"
#include "models/primary_delay_model.hpp"
#include "models/scenario.hpp"
#include "models/scenario_error.hpp"
#include "models/train_type.hpp"

namespace knockon {

struct NetworkFile {
    std::string name;
    std::string source_file;
    net::Network network;
    // Found from the layout when it is read, so that a layout the routes cannot be found on is
    // refused with the rest.
    std::size_t sections = 0;
    std::size_t routes = 0;
    std::vector<TrainType> train_types;
    net::NetworkTimetable timetable;
    PrimaryDelayModel delays;
    // Where each service as written, each of its calls and each train type stand in the file.
    SourceMap sources;
};

// Whether the text is a network file: a YAML map whose `knockon` is 2.  Anything else (a line
// scenario, text that is no YAML) is left to the line scenario reader and its messages.
bool is_network_text(const std::string& yaml_text);

// Throws ScenarioError holding every problem.  `variant` names one of the file's variants, merged
// onto the base document as in a line scenario (empty or "base": the file as written).
NetworkFile parse_network(const std::string& yaml_text, const std::string& file_name, const std::string& variant = "");
NetworkFile read_network(const std::string& path, const std::string& variant = "");

// The scenario a network file read without problems describes (what plan, simulate, compare and
// the rest run): its services as runs in one heading (models/network/runs), the turnarounds at
// reversals as links, the corridors as written or the default ones.
Scenario network_scenario(NetworkFile file);

// A network file read as a scenario: parse_network, network_scenario, then the timetable's links
// between the runs (README "Links"), located in the file.  Throws ScenarioError holding every problem.
Scenario parse_network_scenario(const std::string& yaml_text, const std::string& file_name,
                                const std::string& variant = "");

}  // namespace knockon
