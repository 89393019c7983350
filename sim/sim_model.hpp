#pragma once
// The static part of a simulation: per train its routes (from the planned stairway), section
// indices, and what lets the engine follow planned legs without integrating; per section the
// planned order of trains.  Built once from the plan and shared by every simulated day.
#include <cstdint>
#include <limits>
#include <string>
#include <vector>

#include "models/plan.hpp"
#include "models/service_paths.hpp"
#include "models/single_track.hpp"
#include "models/sorted_index.hpp"
#include "sim/interlocking.hpp"
#include "sim/record_places.hpp"

namespace knockon {

// Positions closer than this are the same place [m].
inline constexpr double kSamePlace = 1e-6;

// A fixed place on a train's path that the engine schedules an event at, with when the head
// reaches it on the planned leg that holds it.
struct Place {
    double s = 0.0;   // on the path [m]
    long leg = -1;    // the leg with s0 + kSamePlace < s <= s_end + kSamePlace, or -1
    double t = 0.0;   // from the leg's start, as the leg's Trajectory::time_at gives it [s]
    bool skip = false;   // no event here (beyond the path's end, a stop, a signal never read)
    // A section's end or a signal where a section begins (the usual case): the index of that
    // enter place, whose event the head reaching this place rides on; else -1.
    std::int32_t at_enter = -1;
};

// One train's planned passage over one single-track stretch: the blocking time of its sections
// together, the path sections it covers, and the way it runs there (its StretchPass,
// models/single_track: up from the stretch's lower place to its upper one).
struct StretchUse {
    std::int32_t stretch = -1;
    std::uint32_t first = 0, end = 0;     // path sections [first, end)
    double start = 0.0, release = 0.0;   // planned blocking of the stretch [s]
    Direction direction = Direction::up;
};

class SimModel {
public:
    // The scenario's paths (models/service_paths) give the interlocking's times, the single-track
    // stretches and the line sections buffers are measured in; `plan` is the scenario's.
    SimModel(const Scenario& scenario, const std::vector<TrainPlan>& plan);
    SimModel(const ServicePaths& paths, const std::vector<TrainPlan>& plan);

    struct Route {
        std::string entry_signal, exit_signal;
        double s_entry = 0.0;
        double authority_end = 0.0;    // where a train may run to when this is the last route set
        double warning_point = 0.0;
        double read_point = 0.0;       // from here the driver can read the entry signal's aspect
        int aspect_cap = 2;
        // The one rule the plan's blocking times also follow (models/blocking_time): a route is
        // wanted when the driver must know its aspect, at the warning point or, where a planned
        // stop lies between the warning point (or the signal in rear) and the signal, at the
        // departure from that stop (after_stop).  Such a stop's departure waits for the route,
        // and the driver standing there knows its aspect (in sight, or told by a repeater).
        long after_stop = -1;          // timing point of a planned stop before the signal, else -1
        // Otherwise, where the train stops before the warning point: that stop (the last one
        // with a departure, else -1) and the planned time from its departure to the warning
        // point, to forecast the request from the train's own departure.
        long stop_before_warning = -1;
        double warning_after_departure = 0.0;
        std::vector<std::uint32_t> sections;   // global section indices, body and overlap
        std::vector<std::uint32_t> path_sections;   // the same sections as indices into the path
    };
    struct Train {
        const TrainPlan* plan = nullptr;
        std::vector<Route> routes;
        std::vector<std::uint32_t> section_index;   // per path section: global index
        // For the dispatcher (sim/dispatch.hpp), per path section k (and k = the number of
        // sections): the next place from k on where the train can stand clear of opposing traffic,
        // as path sections [first, last): a run of sections off single line
        // (the stretches of models/single_track) after any single-line ones; [n, n) where the path ends first.
        std::vector<std::pair<std::uint32_t, std::uint32_t>> advance;
        // Per path section: the single-track stretch it lies in (index into single_track()
        // stretches), or -1; and the train's planned use of each stretch on its path, in path
        // order, for the dispatcher's choice of crossing (sim/dispatch.hpp).
        std::vector<std::int32_t> stretch_of;
        std::vector<StretchUse> stretch_uses;
        const StretchUse* use_of(std::int32_t stretch) const;
        double dispatch_weight = 1.0;   // Service::dispatch_weight
        // Sections a train needs free to appear: where an originating train stands, or those up
        // to the first signal for a train entering over the line end.  Global and path indices.
        std::vector<std::uint32_t> origin_sections, origin_path_sections;
        // Per planned leg and grid point j: the largest s_i + D(v_i) over i <= j, where D is a
        // braking distance on the safe side.  A train following the leg as planned with its
        // authority ending at E need not leave the plan before the first point where this
        // exceeds E: up to there the planned motion stands, and the engine integrates nothing.
        std::vector<std::vector<double>> leg_reach;
        std::vector<SortedIndex> leg_reach_index;   // per leg, over leg_reach
        // Where a train following planned leg k must start braking for an authority ending at
        // eoa (infinity: nowhere on the leg): the first grid point whose reach exceeds eoa, and
        // when the head reaches it from the leg's start (as Trajectory::time_at gives it).
        struct BrakePoint {
            double s = std::numeric_limits<double>::infinity();
            double t = 0.0;
            std::size_t index = 0;   // the point on the leg's motion
        };
        BrakePoint brake_point(std::size_t k, double eoa) const;
        // The same, worked out once per leg for the authority ends the engine meets (signals,
        // ends of routes and path, timing points where slow running starts), sorted by end.
        std::vector<std::vector<std::pair<double, BrakePoint>>> leg_brake_points;
        BrakePoint brake_point_searched(std::size_t k, double eoa) const;
        // Each planned leg's ends, kept together (the legs' motions are long and mostly cold).
        struct LegEnds {
            double s0 = 0.0, s_end = 0.0, duration = 0.0, v_end = 0.0;
        };
        std::vector<LegEnds> leg_ends;
        // The fixed places the engine schedules events at, timed on the planned legs once, so
        // that a train running as planned needs no look-up in its long leg motions:
        std::vector<Place> enters, leaves, clears;       // per path section: start, end, end + length
        std::vector<Place> sightings, passes, warnings;  // per route: read point, entry, warning point
        std::vector<Place> calls;                        // per timing point
        // Links (indices into links()) that hold this train's departures, and those it is the
        // earlier train of (its arrival frees them).
        std::vector<std::uint32_t> links_in, links_out;
        // A set that turns back (models/blocking_time, platform_handover): the return part it
        // becomes, or kNoTrain, and the sections it hands over as it ends (path sections of each).
        std::uint32_t turns_into = kNoTrain;
        std::vector<PlatformHandover> hands_over;
    };

    const InterlockingTimes& interlocking() const { return interlocking_; }
    const SingleTrackLayout& single_track() const { return single_track_; }
    const std::vector<Train>& trains() const { return trains_; }
    const std::vector<std::string>& section_names() const { return section_names_; }
    // Trains per section in planned order (by planned blocking start).
    const std::vector<std::vector<std::uint32_t>>& planned_order() const { return planned_order_; }
    // Consecutive train pairs of the plan with their buffer on the critical section, to measure
    // how much of each buffer the simulated days use.
    struct BufferPair {
        std::uint32_t leader = 0, follower = 0, section = 0;   // section: global index
        std::string line_section;
        double planned_buffer = 0.0;
    };
    const std::vector<BufferPair>& buffer_pairs() const { return buffer_pairs_; }
    // The timetable's links (TrainPlan::incoming of every train), in timetable order.
    const std::vector<LinkPlan>& links() const { return links_; }
    // The places of a day's timing records, laid out as the engine lays them out (train by
    // train, call by call), so that every day of a study shares them (sim/attribution_figures).
    const RecordPlaces& record_places() const { return record_places_; }

private:
    InterlockingTimes interlocking_;
    SingleTrackLayout single_track_;
    std::vector<Train> trains_;
    std::vector<std::string> section_names_;
    std::vector<std::vector<std::uint32_t>> planned_order_;
    std::vector<BufferPair> buffer_pairs_;
    std::vector<LinkPlan> links_;
    RecordPlaces record_places_;
};

}  // namespace knockon
