#pragma once
// What is wrong with a line's infrastructure as a model, whoever built it: tracks off the line
// or ending before they start, loops that do not lie within a main track, main tracks of one
// direction alongside each other, stations off the line, signals and joints off their track,
// two objects with one id.  Each problem names the object and field (models/line_problem); the
// scenario reader locates them, planning refuses a scenario built in code with them
// (models/scenario_checks).  The syntax of a file (types, units, unknown keys) is the reader's.
#include <optional>
#include <string>
#include <vector>

#include "models/infrastructure.hpp"
#include "models/line_problem.hpp"
#include "models/unread_fields.hpp"

namespace knockon {

// Chainages written in km and in m are snapped to one grid by parse_quantity; this tolerance
// only absorbs rounding in sums [m].
inline constexpr double kChainageTolerance = 1e-6;
// Main signals of one direction on a track closer than this stand at one place [m].
inline constexpr double kSignalSpacingMin = 1.0;

struct InfrastructureCheck {
    std::vector<LineProblem> problems;   // in the order of the infrastructure's vectors
    // Per track and station: read in full, the first with its id and without problems of its own
    // (on the line, ending beyond its start).  Nothing is checked against an object not usable.
    std::vector<bool> track_usable, station_usable;
    // The ids in order, each once (the first object of an id is the one that counts), and the
    // index of that first object.
    std::vector<std::string> track_ids, station_ids;
    std::vector<std::size_t> track_at, station_at;

    // Index of the first track or station with that id, if any.
    std::optional<std::size_t> track_index(const std::string& id) const;
    std::optional<std::size_t> station_index(const std::string& id) const;
};

// The signalling areas: each on the line and ending beyond its start, and together covering the
// line from 0 km to its end in chainage order without gaps or overlaps (judged only on a list
// without other problems: `complete` false when a reader could not read every area).  `covers`
// true when they do: only then can a signal's aspect system be looked up.
struct AreasCheck {
    std::vector<LineProblem> problems;
    bool covers = false;
};
AreasCheck check_signalling_areas(const std::vector<SignallingArea>& areas, std::optional<double> length,
                                  const UnreadFields& unread = {}, bool complete = true);

// Every problem of the infrastructure but its signalling areas (check_signalling_areas, which a
// reader needs first); `unread` names fields the reader could not read, so that
// rules needing them are skipped (`length_read` false: the line's length, so nothing is checked
// against the line end).
InfrastructureCheck check_infrastructure(const Infrastructure& infrastructure, const UnreadFields& unread = {},
                                         bool length_read = true);

// "known: a, b, c" (at most a dozen names), or "none are defined".
std::string known_list(const std::vector<std::string>& ids);

// "unknown track \"X\"; known: A, B" for a reference to no object.
std::string unknown_name(const char* kind, const std::string& id, const std::vector<std::string>& known);

// "<what> 3.2 km lies off track T, which runs from 0 km to 3 km" when x is off the track.
std::optional<std::string> off_track(const std::string& what, double x, const Track& track);

// When a chainage lies off the line [0, length]: "3.2 km lies before the line start (0 km)" or
// "... beyond the line end (3 km)"; length unknown: only the start is checked.
std::optional<std::string> off_line(double x, std::optional<double> length);

}  // namespace knockon
