#pragma once
// What is wrong with a service of a line scenario as a model, whoever built it: calls at unknown
// stations or out of running order, call tracks that do not reach the station, do not carry the
// service's direction or are too short for the train standing in a loop, times running
// backwards, first and last calls that cannot start or end a run.  Each problem names the
// service, call and field (models/line_problem); the scenario reader locates them, planning
// refuses a scenario built in code with them (models/scenario_checks).
#include <cstddef>
#include <vector>

#include "models/infrastructure.hpp"
#include "models/infrastructure_checks.hpp"
#include "models/line_problem.hpp"
#include "models/timetable.hpp"
#include "models/train_type.hpp"
#include "models/unread_fields.hpp"

namespace knockon {

struct ServiceCheck {
    std::vector<LineProblem> problems;
    // No problems, and nothing it names was left out of the checks (a station or track that has
    // problems of its own): the service can be planned on a line without other problems.
    bool clean = true;
};

// The problems of `service` on the infrastructure `infra` has checked, pointing at `index` (its
// place in Timetable::services, or the reader's timetable entry).  `calls_complete` false: the
// reader could not read every call or a field the rules on times and ends need, so only the
// calls against the line are checked; `unread` names call stations it could not read.
ServiceCheck check_line_service(const Infrastructure& infrastructure, const InfrastructureCheck& infra,
                                const std::vector<TrainType>& types, const Service& service, std::size_t index,
                                bool calls_complete = true, const UnreadFields& unread = {});

}  // namespace knockon
