#pragma once
// The `train_types` list of a scenario, read one way for a line scenario (knockon: 1) and a
// network file (knockon: 2): every field in its unit and range, traction and braking tables,
// ids used once, and a type read without errors able to start on level track
// (models/train_type_checks).
#include <map>
#include <optional>
#include <string>
#include <vector>

#include <yaml-cpp/yaml.h>

#include "models/train_type.hpp"
#include "tools/read/yaml_fields.hpp"

namespace knockon::yamlio {

struct TrainTypeList {
    std::vector<TrainType> types;                 // each entry with an id of its own, in file order
    std::map<std::string, std::string> where;     // id -> "file:line:col: path", for later messages
    std::map<std::string, int> lines;             // id -> line of its entry, for "first at line N"
    std::vector<std::string> ids;                 // in file order, for "known: ..." remarks
};

// Reads `seq`, the value of `top`'s `train_types`.  `longest`, when given, is the longest run a
// train could have (a line's length): a longer train is an error at its `length`.
TrainTypeList read_train_types(ErrorList& errors, const MapFields& top, const YAML::Node& seq,
                               std::optional<double> longest);

}  // namespace knockon::yamlio
