#pragma once
// What is wrong with a network, each problem as a sentence tied to the object it is about, so
// that a reader can put the file, line and column in front of it (as yamlio::ErrorList does for
// a version-1 scenario) and a network built in code gets the same checks.
#include <cstddef>
#include <stdexcept>
#include <string>
#include <vector>

#include "models/network/network.hpp"

namespace knockon::net {

enum class ObjectKind { segment, node, signal, joint, station, timing_point, stopping_point, platform, route_name };
const char* to_string(ObjectKind k);

struct NetworkProblem {
    ObjectKind kind = ObjectKind::segment;
    std::size_t index = 0;   // into the Network's vector of that kind
    // The input field it is about, named as the network format names it ("at", "fouling",
    // "ends"); empty for the object as a whole.
    std::string field;
    std::string message;     // names the object: "segment 'A': length must be more than 0 m"
};

// Every problem found, in the order of the network's vectors (segments first); empty when none.
std::vector<NetworkProblem> check_network(const Network& network);

// Thrown where a network with problems is used; `problems` holds them all.
struct NetworkError : std::runtime_error {
    explicit NetworkError(std::vector<NetworkProblem> problems);
    explicit NetworkError(const std::string& message);   // a problem of no single object
    std::vector<NetworkProblem> problems;
};

}  // namespace knockon::net
