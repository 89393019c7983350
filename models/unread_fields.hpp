#pragma once
// The fields of a line scenario a reader could not read (and has reported already): the model's
// checks (models/infrastructure_checks, models/line_timetable_checks) skip every rule that needs
// one of them, so no problem is reported twice or follows from a value that was never given.
// Empty for a scenario built in code.
#include <cstddef>
#include <set>
#include <string>
#include <string_view>
#include <tuple>

#include "models/line_problem.hpp"

namespace knockon {

class UnreadFields {
public:
    // `call` is LineProblem::kNone for a field of the object itself.
    void add(LineObject kind, std::size_t index, std::string field, std::size_t call = LineProblem::kNone) {
        fields_.emplace(kind, index, call, std::move(field));
        objects_.emplace(kind, index);
    }
    bool has(LineObject kind, std::size_t index, std::string_view field, std::size_t call = LineProblem::kNone) const {
        return fields_.count({kind, index, call, std::string(field)}) > 0;
    }
    // Whether any field of the object (or of its calls) is unread.
    bool any(LineObject kind, std::size_t index) const { return objects_.count({kind, index}) > 0; }

private:
    std::set<std::tuple<LineObject, std::size_t, std::size_t, std::string>> fields_;
    std::set<std::pair<LineObject, std::size_t>> objects_;
};

}  // namespace knockon
