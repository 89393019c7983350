#pragma once
// Problems of a scenario's input, found by the reader or while planning.  Each message names
// where the input says what is wrong ("file:line:col: path.to.field: message", or the file at
// least); commands print them all and exit with status 2, writing nothing.
#include <stdexcept>
#include <string>
#include <vector>

namespace knockon {

struct ScenarioError : std::runtime_error {
    explicit ScenarioError(std::vector<std::string> messages);
    // One line per problem, in file order; what() holds them joined by newlines.
    std::vector<std::string> messages;
};

}  // namespace knockon
