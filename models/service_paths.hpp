#pragma once
// What planning and simulation need of a scenario's infrastructure, whatever form it was given
// in (a line, models/line_paths; a network, models/network/network_paths): each service's path
// laid as a TrainPath, the line sections the planner reports along, the single-track stretches
// the dispatcher works, the interlocking's times.  `service_paths` makes the one for a scenario.
#include <memory>
#include <vector>

#include "models/infrastructure.hpp"
#include "models/line_section.hpp"
#include "models/path.hpp"
#include "models/primary_delay_model.hpp"
#include "models/single_track.hpp"
#include "models/timetable.hpp"

namespace knockon {

struct Scenario;

class ServicePaths {
public:
    virtual ~ServicePaths() = default;
    // Lays the service's path; throws PathError saying what does not connect.  `rear` and `ahead`
    // say how far to extend the layout behind the start and beyond the end [m].
    virtual TrainPath lay(const Service& service, double rear = 0.0, double ahead = 0.0) const = 0;
    // The longest overlap of any signal [m]: how far beyond its end a path must be laid.
    virtual double longest_overlap() const = 0;
    virtual const InterlockingTimes& interlocking() const = 0;
    // The sections headways, buffers and UIC 406 consumption are reported for, in report order.
    virtual std::vector<LineSection> line_sections() const = 0;
    virtual SingleTrackLayout single_track() const = 0;
    // The detection sections (network indices, as PathSection::index) a disruption takes out of
    // use: every one that overlaps its range by more than a micrometre (DetectionSections::crossed),
    // a switch's or diamond's section too where the range reaches into its fouling points.  A
    // line finds the segments its track was cut into, a network the named segment.
    virtual std::vector<std::size_t> sections_out_of_use(const DisruptionRule& rule) const = 0;
    // Per detection section of the layout (by network index, PathSection::index): whether it is a
    // switch's or diamond's own section, where routes of different corridors can meet.
    virtual std::vector<bool> node_sections() const = 0;
};

// The scenario's paths (a network's when it has one, else its line's).  Keeps references into
// `scenario`, which must outlive the result.  Throws PathError where the layout cannot be read.
std::unique_ptr<ServicePaths> service_paths(const Scenario& scenario);

}  // namespace knockon
