// Reading any scenario file: a network file (`knockon: 2`) through the network reader, anything
// else through the line scenario reader, whose messages then say what is wrong.
#include "tools/read/network_reader.hpp"
#include "tools/read/scenario_reader.hpp"

namespace knockon {

Scenario parse_scenario(const std::string& yaml_text, const std::string& file_name, const std::string& variant) {
    if (is_network_text(yaml_text)) return parse_network_scenario(yaml_text, file_name, variant);
    return parse_line_scenario(yaml_text, file_name, variant);
}

Scenario read_scenario(const std::string& path, const std::string& variant) {
    return parse_scenario(read_scenario_text(path), path, variant);
}

}  // namespace knockon
