#pragma once
// One service's planned run and its blocking-time stairway: what every timetable analysis and
// the simulation build on.
#include "models/blocking_time.hpp"
#include "models/service_run.hpp"

namespace knockon {

struct TrainPlan {
    ServiceRun run;
    Stairway stairway;
};

}  // namespace knockon
