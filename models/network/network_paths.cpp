#include "models/network/network_paths.hpp"

#include <algorithm>
#include <set>
#include <utility>

#include "models/network/disruption_place.hpp"
#include "models/network/paths.hpp"
#include "models/network/single_track.hpp"
#include "models/network/timetable.hpp"
#include "models/scenario_error.hpp"

namespace knockon {
namespace {

const ScenarioNetwork& network_of(const Scenario& scenario) {
    if (!scenario.network) throw PathError("the scenario has no network");
    return *scenario.network;
}

}  // namespace

NetworkPaths::NetworkPaths(const Scenario& scenario) try
    : net_(network_of(scenario)), graph_(net_.network), sections_(graph_) {
    const auto& services = scenario.timetable.services;
    for (std::size_t i = 0; i < services.size() && i < net_.runs.size(); ++i) run_of_[services[i].id] = i;
} catch (const net::NetworkError& e) {
    throw PathError(e.what());
}

TrainPath NetworkPaths::lay(const Service& service, double rear, double ahead) const {
    auto it = run_of_.find(service.id);
    if (it == run_of_.end()) throw PathError("service " + service.id + " has no run on the network");
    try {
        const net::PathRequest r = net::path_request(net_.network, net_.runs[it->second], rear);
        const net::NetworkPath found = net::find_path(graph_, r);
        return net::train_path(graph_, sections_, {}, r, found, {rear, ahead});
    } catch (const net::NetworkError& e) {
        throw PathError(e.what());
    }
}

double NetworkPaths::longest_overlap() const {
    double o = 0.0;
    for (const net::Signal& s : net_.network.signals) o = std::max(o, s.overlap);
    return o;
}

std::vector<LineSection> NetworkPaths::line_sections() const {
    // A line section is its two stations in order (a train belongs to it when it passes both), so
    // corridors that share a stretch, e.g. a main line and a branch up to their junction, share
    // its line section: it is listed once, under the first corridor, and its headways and UIC 406
    // figures are not counted twice.
    std::vector<LineSection> out;
    std::set<std::pair<std::string, std::string>> listed;
    auto add = [&](const std::string& from, const std::string& to, Direction d, const std::string& corridor) {
        if (listed.emplace(from, to).second) out.push_back({from, to, d, corridor});
    };
    for (const net::Corridor& c : net_.corridors) {
        const auto& st = c.stations;
        for (std::size_t i = 0; i + 1 < st.size(); ++i) add(st[i], st[i + 1], Direction::up, c.name);
        for (std::size_t i = st.size(); i-- > 1;) add(st[i], st[i - 1], Direction::down, c.name);
    }
    return out;
}

std::vector<std::size_t> NetworkPaths::sections_out_of_use(const DisruptionRule& rule) const {
    const auto problems = net::disruption_place_problems(net_.network, rule);
    if (!problems.empty()) {
        std::vector<std::string> messages;
        for (const auto& p : problems) messages.push_back("delays.disruptions: " + p.field + ": " + p.message);
        throw ScenarioError(std::move(messages));
    }
    std::vector<std::size_t> out = sections_.crossed(net_.network.find_segment(rule.segment), rule.from, rule.to);
    std::sort(out.begin(), out.end());
    return out;
}

SingleTrackLayout NetworkPaths::single_track() const { return net::single_track_layout(graph_, sections_); }

}  // namespace knockon
