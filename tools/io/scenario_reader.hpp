#pragma once
// Reads a scenario file (README, "Scenario file") into the SI model structs.  Every problem found
// is collected and reported at once, each as "file:line:col: path.to.field: message".
#include <stdexcept>
#include <string>
#include <vector>

#include "models/scenario.hpp"

namespace knockon {

struct ScenarioError : std::runtime_error {
    explicit ScenarioError(std::vector<std::string> messages);
    // One line per problem, in file order; what() holds them joined by newlines.
    std::vector<std::string> messages;
};

// Reads and checks the file; throws ScenarioError (also when the file cannot be opened).
Scenario read_scenario(const std::string& path);

// Same from text already in memory; `file_name` is used in messages and as source_file.
Scenario parse_scenario(const std::string& yaml_text, const std::string& file_name);

}  // namespace knockon
