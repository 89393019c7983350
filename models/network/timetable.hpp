#pragma once
// A timetable on a network: services calling at stations, each call on an optional named track,
// over optional via segments, a stop perhaps reversing the train; and corridors, the named
// sequences of stations along which the planner's views (time-distance diagrams, line sections,
// headways, UIC 406 consumption) are reported.  Services, stations, tracks and nodes are named
// as the timetable writes them, so that a scenario built in code reads like a file;
// `check_timetable` resolves the names, says what is wrong, each problem tied to the service,
// call and field it is about, and lays every service's path with find_path (models/network/paths).
#include <cstddef>
#include <optional>
#include <string>
#include <vector>

#include "models/network/paths.hpp"
#include "models/timetable.hpp"
#include "models/train_type.hpp"

namespace knockon::net {

struct NetworkCall {
    // Station id, stop or pass and the times, as a line scenario gives them; `track` names a
    // segment the train must use at the station (empty: whichever of the station's tracks is
    // shortest).
    Call call;
    std::vector<std::string> via;            // segments run over, end to end, on the way to the next call
    bool reverses = false;                   // the train changes direction at this stop
    std::optional<double> min_turnaround;    // [s] a reversal's least time standing (default: the dwell's)
};

// A clock-face pattern: runs every `every` from the first call's time up to `until`.
struct RepeatPattern {
    double every = 0.0;   // [s]
    double until = 0.0;   // [s] after midnight
};

struct NetworkService {
    std::string id;
    std::string train_type;
    std::string category;
    std::string draw_key;                    // what its primary-delay draws are keyed by; empty: the id
    std::string enters_at;                   // a boundary node; empty: it starts at its first call
    std::string leaves_at;                   // a boundary node; empty: it ends at its last call
    std::optional<double> entry_speed;       // [m/s]; entering at a boundary, default the line speed there
    std::optional<RepeatPattern> repeat;
    std::vector<NetworkCall> calls;          // in running order
};

struct Corridor {
    std::string name;
    std::vector<std::string> stations;       // station ids in running order, at least two
};

struct NetworkTimetable {
    std::vector<NetworkService> services;    // as written: a repeat pattern is one entry
    double rounding = 30.0;                  // constructed times are rounded up to this grid [s]
    std::vector<Corridor> corridors;         // as written; none: default_corridors
};

// What a problem is about: a service (and one of its calls) or a corridor.
enum class TimetablePart { service, corridor };

struct TimetableProblem {
    TimetablePart part = TimetablePart::service;
    std::size_t index = 0;       // into services or corridors
    std::size_t call = kNone;    // a service's call; kNone: the service as a whole
    // The field as the network format names it ("station", "track", "via", "reverses", "type",
    // "enter", "leave", "stations"); empty: the call, service or corridor as a whole.
    std::string field;
    std::size_t item = kNone;    // an entry of a list field ("via", "stations"); kNone: the field
    std::string message;
};

// Every problem of the timetable on the graph's network, services first, then corridors; empty
// when none.  Names are checked first; a service whose names all resolve has its path laid, and
// a path that cannot be found is a problem at the call, via or exit it cannot reach.
std::vector<TimetableProblem> check_timetable(const NetworkGraph& graph, const std::vector<TrainType>& types,
                                              const NetworkTimetable& timetable);

// The path request of a service whose names resolve (as check_timetable found them): its calls
// with indices in place of names, the boundaries, the train's length.
PathRequest path_request(const Network& network, const NetworkService& service, double train_length);

// One corridor per distinct route the services take: the station sequence of each service split
// at its reversals, a route and its reverse counted once, in the order services first run them;
// named "FIRST-LAST" (with " 2", " 3", ... where a name repeats).
std::vector<Corridor> default_corridors(const NetworkTimetable& timetable);

// The corridors the planner's views are reported along: those written, else the default ones.
std::vector<Corridor> corridors_of(const NetworkTimetable& timetable);

}  // namespace knockon::net
