#pragma once
// A whole scenario as the models see it: infrastructure, rolling stock, timetable and the
// study settings.  Built by the scenario reader at the edge (tools/io), never from YAML here.
#include <string>
#include <vector>

#include "models/infrastructure.hpp"
#include "models/primary_delay_model.hpp"
#include "models/timetable.hpp"
#include "models/train_type.hpp"

namespace knockon {

// Line types for the UIC Code 406 recommended capacity-consumption limits.
enum class LineType { suburban, high_speed, mixed };
const char* to_string(LineType t);

struct Scenario {
    std::string name;
    std::string source_file;
    LineType line_type = LineType::mixed;
    Infrastructure infrastructure;
    std::vector<TrainType> train_types;
    Timetable timetable;
    PrimaryDelayModel delays;   // optional `delays:` section; empty = no primary delays

    const TrainType* find_train_type(const std::string& id) const;
};

}  // namespace knockon
