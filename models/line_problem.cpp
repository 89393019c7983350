#include "models/line_problem.hpp"

namespace knockon {

const char* to_string(LineObject kind) {
    switch (kind) {
        case LineObject::track: return "track";
        case LineObject::station: return "station";
        case LineObject::signal: return "signal";
        case LineObject::joint: return "joint";
        case LineObject::area: return "signalling area";
        case LineObject::area_list: return "signalling areas";
        case LineObject::service: return "service";
    }
    return "object";
}

std::string describe_object(const LineProblem& p, const std::string& name) {
    std::string out = to_string(p.kind);
    if (p.kind != LineObject::area_list) out += " " + (name.empty() ? std::to_string(p.index) : name);
    if (p.call != LineProblem::kNone) out += ", call " + std::to_string(p.call);
    if (!p.field.empty()) out += ", " + p.field;
    return out;
}

}  // namespace knockon
