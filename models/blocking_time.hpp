#pragma once
// Blocking times by blocking time theory: for each route a train uses (main signal to the next
// main signal, plus the overlap) the time during which no other train may use it:
//
//   setup + sight and reaction + approach + running + clearing + release
//
// The approach starts at the warning point, which the aspect system decides: the previous main
// signal (3-aspect), one or two signals back as the braking distance needs (4-aspect), the distant
// signal (2-aspect), or the braking-curve point (cab signalling with fixed blocks).  A train that
// has a planned stop before the signal — after the warning point or after the previous signal —
// needs the route for its departure from that stop: it may not start against a signal at stop.
//
// Detection sections carry the same intervals: a section is blocked from the start of the first
// route that includes it until the train's tail has cleared it (sectional release) plus the
// release time.  Two trains conflict exactly where their section intervals overlap.
#include <string>
#include <vector>

#include "models/infrastructure.hpp"
#include "models/service_run.hpp"

namespace knockon {

struct RouteBlocking {
    std::string entry_signal;
    std::string exit_signal;      // empty where the path ends before another signal
    double s_entry = 0.0, s_exit = 0.0, overlap = 0.0;
    double warning_point = 0.0;   // s of the point the approach time is measured from
    // The planned stop (index into ServiceRun::calls) whose departure the route is needed for,
    // or -1 when the train runs up to the signal.
    long departure_call = -1;
    // The six components [s].
    double setup = 0.0, sight_reaction = 0.0, approach = 0.0, running = 0.0, clearing = 0.0, release = 0.0;
    double start = 0.0, end = 0.0;   // absolute [s]
};

struct SectionBlocking {
    std::string section;
    std::size_t index = net::kNone;    // the network's detection section (PathSection::index)
    double x_lo = 0.0, x_hi = 0.0;     // chainage extent of the section
    double s_from = 0.0, s_to = 0.0;   // along this train's path
    double start = 0.0, end = 0.0;     // blocked [s]
    double occupied_from = kNoTime, occupied_to = kNoTime;   // physically occupied (NaN: never)
};

struct Stairway {
    std::vector<RouteBlocking> routes;
    std::vector<SectionBlocking> sections;
};

Stairway blocking_stairway(const ServiceRun& run, const InterlockingTimes& times);

// Where the driver can first read a lineside signal's aspect: its sighting distance in rear (of
// its distant signal, under two aspects); -infinity under cab signalling (always known).
double aspect_read_point(const PathSignal& sig);

// A signal whose first warning comes too late for the train (tests/REFERENCES.md B6): the distance
// its aspect system gives the driver to stop (three aspects: the block before the signal; four:
// the two blocks before it; two: the distant signal's distance) is shorter than the train's
// stopping distance from its planned speed where the warning is given.  Blocking times take the
// warning as given there; a driver (and the simulation) must brake earlier, so the plan is
// optimistic at such a signal.
struct WarningShortfall {
    std::size_t signal = 0;    // index into run.path.signals
    double available = 0.0;    // [m]
    double needed = 0.0;       // stopping distance [m]
    double speed = 0.0;        // planned speed where the warning is given [m/s]
};
std::vector<WarningShortfall> warning_shortfalls(const ServiceRun& run);

}  // namespace knockon
