#pragma once
// One service's planned run and its blocking-time stairway: what every timetable analysis and
// the simulation build on.
#include <vector>

#include "models/blocking_time.hpp"
#include "models/links.hpp"
#include "models/service_run.hpp"

namespace knockon {

struct TrainPlan {
    ServiceRun run;
    Stairway stairway;
    // The links that hold this train's departures (it is the later service), in timetable order.
    std::vector<LinkPlan> incoming;
};

}  // namespace knockon
