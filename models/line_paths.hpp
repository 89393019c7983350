#pragma once
// A version-1 line's services laid as paths: the line is read into a network once
// (network/from_line), each service's calls become a path request over it (network/paths) and
// the path is laid as a TrainPath (network/train_path).  The one way a line scenario lays a path.
//
// What a line's calls mean in network terms: a train runs on the main track of its direction,
// over every piece of it between its calls (so a loop beside the main track is used only where a
// call names it), enters and leaves at the line's ends where the service says so, and stops at
// the station's chainage.  Section ids are the line model's ("<track>:<from km>-<to km>", see
// section_id), track names the line's track ids.
#include <string>
#include <vector>

#include "models/infrastructure.hpp"
#include "models/network/from_line.hpp"
#include "models/network/graph.hpp"
#include "models/network/sections.hpp"
#include "models/network/train_path.hpp"
#include "models/path.hpp"
#include "models/service_paths.hpp"
#include "models/timetable.hpp"

namespace knockon {

class LinePaths : public ServicePaths {
public:
    // Keeps a reference: `infra` must outlive this.  Throws PathError where the line cannot be
    // read into a network (two loops meeting at one point of their track).
    explicit LinePaths(const Infrastructure& infra);
    LinePaths(const LinePaths&) = delete;
    LinePaths& operator=(const LinePaths&) = delete;

    // Lays the service's path; throws PathError saying what does not connect.  `rear` and `ahead`
    // say how far to extend the layout behind the start and beyond the end [m].
    TrainPath lay(const Service& service, double rear = 0.0, double ahead = 0.0) const override;
    double longest_overlap() const override;
    const InterlockingTimes& interlocking() const override { return infra_.interlocking; }
    std::vector<LineSection> line_sections() const override { return knockon::line_sections(infra_); }
    SingleTrackLayout single_track() const override { return single_track_layout(infra_); }
    // The rule's `track` and chainage range; a track the line does not have blocks nothing (the
    // reader refuses it).  Throws ScenarioError for a rule placed by a network's segment.
    std::vector<std::size_t> sections_out_of_use(const DisruptionRule& rule) const override;
    std::vector<bool> node_sections() const override { return net::node_sections(sections_); }

    const Infrastructure& infrastructure() const { return infra_; }
    const net::LineNetwork& line() const { return line_; }

private:
    static net::LineNetwork read(const Infrastructure& infra);
    net::PathRequest request(const Service& service, double train_length) const;
    std::size_t edge_boundary(Direction d, bool entering) const;
    std::size_t timing_segment(std::size_t station, const std::string& track) const;
    std::vector<std::size_t> main_between(double x_a, double x_b, Direction d) const;

    const Infrastructure& infra_;
    net::LineNetwork line_;
    net::NetworkGraph graph_;
    net::DetectionSections sections_;
    net::PathNames names_;
};

}  // namespace knockon
