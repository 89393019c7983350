#pragma once
// Timetable analysis of a whole scenario: every service's planned run and blocking-time
// stairway, headways and buffers of consecutive trains, the minimum-headway matrix by train
// type, conflicts, and UIC 406 capacity consumption per line section.
#include <memory>
#include <string>
#include <vector>

#include "models/blocking_time.hpp"
#include "models/capacity.hpp"
#include "models/headway.hpp"
#include "models/running_time.hpp"
#include "models/scenario.hpp"
#include "models/service_paths.hpp"
#include "models/service_run.hpp"
#include "models/single_track_plan.hpp"
#include "models/train_plan.hpp"

namespace knockon {


struct HeadwayMatrixEntry {
    std::string line_section;
    std::string leader_type, follower_type;
    double minimum_headway = 0.0;   // the largest over all train pairs of these types [s]
    std::string critical_section;
};

struct Conflict {
    std::string section;
    std::size_t first = 0, second = 0;   // first blocks the section first
    double overlap = 0.0;                // [s]
    double from = 0.0;                   // when the second's blocking starts [s]
    // How the two run over the section (section_meeting, models/path): in opposite headings over
    // a segment of it both use; `apart` when they share no segment of it (converging or crossing).
    bool opposing = false;
    bool apart = false;
    std::string stretch;                 // the single-track stretch holding the section, if any
    // A link the timetable cannot keep (index into PlanResult::links, else -1): `section` is then
    // the station where the later train leaves, `overlap` how much the minimum time is missed by,
    // `from` the later train's planned departure.
    long link = -1;
    LinkKind link_kind = LinkKind::turnaround;
};
// "opposing trains on single-track stretch HTW-BRC", "opposing trains", "same direction",
// "converging or crossing routes", or for a link "turnaround shorter than its minimum turnaround
// time".
std::string conflict_kind(const Conflict& c);
// Link buffers below this are rounding of given times, not a link the timetable breaks [s].
inline constexpr double kLinkTolerance = 0.5;

struct CapacityFigure {
    std::string line_section;
    Direction direction = Direction::up;
    std::string window;                  // "peak hour" or "day"
    double from = 0.0, to = 0.0;         // [s]
    std::size_t trains = 0;
    double occupation = 0.0;             // compressed occupation time [s]
    double consumption = 0.0;            // share of the window
    double limit = 0.0;                  // UIC 406 recommended limit (as recalled)
};

// The worst train at a signal whose warning comes too late (warning_shortfalls).
struct SpacingWarning {
    std::string signal;
    std::size_t train = 0;            // index into PlanResult::trains
    double available = 0.0, needed = 0.0, speed = 0.0;   // [m], [m], [m/s]
};

// A stretch on which the timetable allows less than the scheduled running time (technical plus
// supplement): the train runs late there even undisturbed.  It runs from the last stop or given
// time before a given time to that time (passes with constructed times in between).
struct TightStretch {
    std::size_t train = 0;       // index into PlanResult::trains
    std::size_t from_call = 0;   // indices into its run's calls: where the stretch starts
    std::size_t call = 0;        // and where it ends (its time falls short)
    double timetabled = 0.0, scheduled = 0.0, technical = 0.0;   // running times over it [s]
};
// Shortfalls below this are rounding of given times, not a tight timetable [s].
inline constexpr double kTightTolerance = 0.5;

struct PlanResult {
    std::vector<TrainPlan> trains;
    std::vector<LineSection> line_sections;
    std::vector<HeadwayPair> headways;
    // Consecutive trains of different corridors at a junction that no line section pairs
    // (models/junction_headway); none on a line.
    std::vector<HeadwayPair> junction_headways;
    std::vector<HeadwayMatrixEntry> headway_matrix;
    std::vector<Conflict> conflicts;
    std::vector<CapacityFigure> capacity;
    // The hour-by-hour profile: per line section and direction (in the order of `capacity`), each
    // clock hour from its first train to its last, window "hour", limit the peak-hour one.
    std::vector<CapacityFigure> hourly_capacity;
    std::vector<SpacingWarning> spacing_warnings;   // by signal id
    std::vector<TightStretch> tight_stretches;      // by train, in running order
    // Single-track stretches (empty on a line without any) and what the timetable does on them.
    SingleTrackLayout single_track;
    std::vector<Crossing> crossings;                // by place, then time
    std::vector<StretchCapacity> stretch_capacity;  // by stretch: peak hour, day
    std::vector<CrossingTooShort> crossings_too_short;
    // Every link of the timetable with its buffer, in timetable order.
    std::vector<LinkPlan> links;
};

PlanResult make_plan(const Scenario& scenario, const RunOptions& options = {});

// Headways of consecutive trains in every line section (part of make_plan).
std::vector<HeadwayPair> consecutive_headways(const std::vector<LineSection>& sections,
                                              const std::vector<TrainPlan>& trains);

// Every service's planned run and stairway only (what the simulation builds on).  Throws
// ScenarioError, each message located at the service's timetable entry, for a train that cannot
// run (it stalls on a climb, its brakes cannot hold it on a fall, its path does not connect),
// and before any work when the plan would exceed kMaxPlanGridPoints.
std::vector<TrainPlan> plan_trains(const Scenario& scenario, const RunOptions& options = {});
// The same over the scenario's paths laid already (scenario_paths), for a caller that builds a
// SimModel over them too and so lays them once.
std::vector<TrainPlan> plan_trains(const Scenario& scenario, const ServicePaths& paths, const RunOptions& options = {});
// The scenario's paths (models/service_paths); a layout that cannot take them is an input
// problem (ScenarioError naming the file).  Keeps references into `scenario`.
std::unique_ptr<ServicePaths> scenario_paths(const Scenario& scenario);

// What a plan holds before it is made: its memory is mostly the speed and time at each point of
// each run's distance grid.
struct PlanSize {
    std::size_t runs = 0;
    double train_km = 0.0;      // from each run's first timing point (or line end) to its last
    double grid_points = 0.0;   // at the step asked for
};
PlanSize plan_size(const Scenario& scenario, const RunOptions& options = {});
// Peak memory per grid point: measured on the demo as the growth from a step of 2 m to 0.5 m,
// about 17 bytes for `plan`, 24 for one simulated day, 30 for a study on 2 threads [bytes].
inline constexpr double kPlanBytesPerGridPoint = 30.0;
// The most grid points a plan may hold (about 1.5 GB in a study); README, "Memory".
inline constexpr double kMaxPlanGridPoints = 5e7;

}  // namespace knockon
