#pragma once
// Minimum headways, buffer times and the critical section between two trains, from their
// blocking-time stairways (blocking time theory): shift the follower's stairway until it touches
// the leader's; the section where they touch is the critical one.
#include <optional>
#include <string>
#include <vector>

#include "models/blocking_time.hpp"
#include "models/line_section.hpp"

namespace knockon {

// A train's blocking times on one line section, relative to its reference time there (its
// departure or pass at the line section's first station).
struct SectionStairway {
    std::size_t train = 0;
    double reference = 0.0;
    std::vector<SectionBlocking> sections;   // only those lying in the line section
};

// Whether the run passes both stations of the line section in order; if so its stairway there:
// the blocking of the sections it crosses between them.
std::optional<SectionStairway> stairway_in(const LineSection& ls, std::size_t train, const ServiceRun& run,
                                           const Stairway& stairway);

struct MinimumHeadway {
    double headway = 0.0;           // follower's reference minus leader's, at the tightest fit [s]
    std::string critical_section;
    std::size_t critical_index = net::kNone;   // its network index (SectionBlocking::index)
};

// Two consecutive trains of a line section (`line_section`, `direction`), or of a junction
// (`junction`: the switch's or diamond's section where trains of different corridors meet,
// models/junction_headway; `line_section` is then empty and `direction` means nothing).
struct HeadwayPair {
    std::string line_section;
    Direction direction = Direction::up;
    std::size_t leader = 0, follower = 0;   // indices into PlanResult::trains
    double scheduled_headway = 0.0;         // follower's reference time minus the leader's [s]
    double minimum_headway = 0.0;
    double buffer = 0.0;                    // scheduled minus minimum; negative = conflict
    std::string critical_section;
    std::size_t critical_index = net::kNone;   // the network's index of the critical section
    std::string junction;
};
// Where a pair's headway is measured: its line section's name, or "junction X".
std::string headway_place(const HeadwayPair& h);

// Smallest reference-time gap at which the follower's stairway nowhere overlaps the leader's;
// nullopt when they share no section.
std::optional<MinimumHeadway> minimum_headway(const SectionStairway& leader, const SectionStairway& follower);

}  // namespace knockon
