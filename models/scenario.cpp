#include "models/scenario.hpp"

namespace knockon {

const char* to_string(LineType t) {
    switch (t) {
        case LineType::suburban: return "suburban";
        case LineType::high_speed: return "high_speed";
        case LineType::mixed: return "mixed";
    }
    return "?";
}

const TrainType* Scenario::find_train_type(const std::string& id) const {
    for (const auto& t : train_types)
        if (t.id == id) return &t;
    return nullptr;
}

}  // namespace knockon
