#pragma once
// A network scenario's services laid as paths: each service's network run (ScenarioNetwork::runs)
// becomes a path request (network/timetable), found over the graph (network/paths) and laid as a
// TrainPath (network/train_path) with the network's own section and segment names.  Line
// sections run along the corridors: each consecutive pair of a corridor's stations, in the
// corridor's order ("up"), then against it.
#include <map>
#include <string>
#include <vector>

#include "models/network/graph.hpp"
#include "models/network/sections.hpp"
#include "models/network/train_path.hpp"
#include "models/scenario.hpp"
#include "models/service_paths.hpp"
#include "models/train_type.hpp"

namespace knockon {

class NetworkPaths : public ServicePaths {
public:
    // Keeps references into `scenario` (its network, timetable and types), which must outlive
    // this.  Throws PathError where the network's sections cannot be found.
    explicit NetworkPaths(const Scenario& scenario);
    NetworkPaths(const NetworkPaths&) = delete;
    NetworkPaths& operator=(const NetworkPaths&) = delete;

    TrainPath lay(const Service& service, double rear = 0.0, double ahead = 0.0) const override;
    double longest_overlap() const override;
    const InterlockingTimes& interlocking() const override { return net_.network.interlocking; }
    std::vector<LineSection> line_sections() const override;
    SingleTrackLayout single_track() const override;
    // The rule's `segment` and offset range; throws ScenarioError where that place is not on the
    // network (disruption_place_problem).
    std::vector<std::size_t> sections_out_of_use(const DisruptionRule& rule) const override;
    std::vector<bool> node_sections() const override { return net::node_sections(sections_); }

private:
    const ScenarioNetwork& net_;
    net::NetworkGraph graph_;
    net::DetectionSections sections_;
    std::map<std::string, std::size_t> run_of_;   // service id -> index into net_.runs
};

}  // namespace knockon
