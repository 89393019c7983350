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
#include "models/links.hpp"
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

// Where a train stands when it starts at a stop (not entering over the line end): the path
// section lies under its body, from its head at s = 0 back one train length.
bool stands_at_start(const ServiceRun& run, const PathSection& sec);
// Where a train stands when it ends at a stop (not running on over the line end): the path
// section lies under its body, from its head at the path's end back one train length.
bool stands_at_end(const ServiceRun& run, const PathSection& sec);

// A set that turns back never leaves its platform.  The part of a service after its reversal
// (Service::continues, the later train of a turnaround link) starts where the part before it
// ended; the sections both stand on pass from the incoming part to the return part when the
// incoming part ends (ServiceRun::vanish_time: its arrival plus the minimum dwell), with no
// clearing and no release between, so no other train can be let onto the platform.  The one
// rule for the plan (hand_over_platform) and the engine (SimModel::Train::hands_over).
// A link is such a turnback when it is a turnaround into the first call of a part that continues.
bool turns_back(const LinkPlan& link, const ServiceRun& later);
struct PlatformHandover {
    std::size_t incoming = 0, outgoing = 0;   // the section, as an index into each part's path sections
};
std::vector<PlatformHandover> platform_handover(const ServiceRun& incoming, const ServiceRun& outgoing);
// The two parts' stairways under that rule: the incoming part's blocking of each section handed
// over ends when the return part's begins, which begins no later than the handover.  So the
// platform is blocked from the incoming part's arrival (its route in) to the return part's
// departure and clearing plus release, without a gap and without the two overlapping.
void hand_over_platform(const ServiceRun& incoming_run, Stairway& incoming, const ServiceRun& outgoing_run,
                        Stairway& outgoing);

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
