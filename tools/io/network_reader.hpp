#pragma once
// Reads a network file (`knockon: 2`; README, "Network file") into models/network, with every
// problem located as "file:line:col: path.to.field: message": the reader's own (shape, units,
// ranges, names that refer to nothing) and the network's checks (models/network/checks), each
// put at the object it is about.  Train types and a timetable on a network come in a later
// version of the format; this one holds the layout.
#include <cstddef>
#include <string>

#include "models/network/network.hpp"
#include "models/scenario_error.hpp"

namespace knockon {

struct NetworkFile {
    std::string name;
    std::string source_file;
    net::Network network;
    // Found from the layout when it is read, so that a layout the routes cannot be found on is
    // refused with the rest.
    std::size_t sections = 0;
    std::size_t routes = 0;
};

// Whether the text is a network file: a YAML map whose `knockon` is 2.  Anything else (a line
// scenario, text that is no YAML) is left to the line scenario reader and its messages.
bool is_network_text(const std::string& yaml_text);

// Throws ScenarioError holding every problem.
NetworkFile parse_network(const std::string& yaml_text, const std::string& file_name);
NetworkFile read_network(const std::string& path);

}  // namespace knockon
