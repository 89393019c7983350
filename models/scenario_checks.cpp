#include "models/scenario_checks.hpp"

#include <string>
#include <vector>

#include "models/infrastructure_checks.hpp"
#include "models/line_timetable_checks.hpp"
#include "models/scenario_error.hpp"

namespace knockon {

namespace {

std::string name_of(const Scenario& sc, const LineProblem& p) {
    const Infrastructure& in = sc.infrastructure;
    switch (p.kind) {
        case LineObject::track: return in.tracks[p.index].id;
        case LineObject::station: return in.stations[p.index].id;
        case LineObject::signal: return in.signals[p.index].id;
        case LineObject::joint: return std::to_string(p.index);
        case LineObject::area: return std::to_string(p.index);
        case LineObject::area_list: return {};
        case LineObject::service: return sc.timetable.services[p.index].id;
    }
    return {};
}

}  // namespace

void check_scenario(const Scenario& scenario) {
    if (scenario.network) return;
    const std::string file = scenario.source_file.empty() ? std::string("scenario") : scenario.source_file;
    const Infrastructure& in = scenario.infrastructure;
    std::vector<LineProblem> problems = check_signalling_areas(in.areas, in.length).problems;
    const InfrastructureCheck infra = check_infrastructure(in);
    problems.insert(problems.end(), infra.problems.begin(), infra.problems.end());
    const auto& services = scenario.timetable.services;
    for (std::size_t k = 0; k < services.size(); ++k)
        for (LineProblem& p :
             check_line_service(scenario.infrastructure, infra, scenario.train_types, services[k], k).problems)
            problems.push_back(std::move(p));
    if (problems.empty()) return;
    std::vector<std::string> messages;
    for (const LineProblem& p : problems)
        messages.push_back(file + ": " + describe_object(p, name_of(scenario, p)) + ": " + p.message);
    throw ScenarioError(messages);
}

}  // namespace knockon
