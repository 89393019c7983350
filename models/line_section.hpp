#pragma once
// The line sections the planner reports headways, buffers and UIC 406 consumption along.
#include <string>
#include <vector>

#include "models/infrastructure.hpp"

namespace knockon {

// A line section: the stretch between two consecutive stations, in one direction.  On a line "up"
// is increasing chainage; on a network, the running order of the corridor it lies on.
struct LineSection {
    std::string from_station, to_station;
    Direction direction = Direction::up;
    std::string corridor;   // the first network corridor it lies on (corridors may share it); empty on a line
    std::string name() const { return from_station + "-" + to_station; }
};

// A line's sections: its stations by chainage, each consecutive pair up, then down.
std::vector<LineSection> line_sections(const Infrastructure& infra);

}  // namespace knockon
