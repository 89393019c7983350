#include "models/scenario.hpp"

#include <utility>

#include "models/scenario_error.hpp"

namespace knockon {

namespace {

std::string join_lines(const std::vector<std::string>& lines) {
    std::string out;
    for (const auto& l : lines) {
        if (!out.empty()) out += '\n';
        out += l;
    }
    return out;
}

}  // namespace

ScenarioError::ScenarioError(std::vector<std::string> msgs)
    : std::runtime_error(join_lines(msgs)), messages(std::move(msgs)) {}

const char* to_string(LineType t) {
    switch (t) {
        case LineType::suburban: return "suburban";
        case LineType::high_speed: return "high_speed";
        case LineType::mixed: return "mixed";
    }
    return "?";
}

const TrainType* Scenario::find_train_type(const std::string& id) const {
    for (const auto& t : train_types)
        if (t.id == id) return &t;
    return nullptr;
}

std::string Scenario::where(const Service& service) const {
    if (service.entry < sources.services.size() && !sources.services[service.entry].empty())
        return sources.services[service.entry];
    return source_file.empty() ? std::string("scenario") : source_file;
}

std::string Scenario::where(const Service& service, std::size_t call) const {
    call += service.first_call;
    if (service.entry < sources.calls.size() && call < sources.calls[service.entry].size())
        return sources.calls[service.entry][call];
    return where(service);
}

std::string Scenario::where_type(const std::string& id) const {
    if (auto it = sources.train_types.find(id); it != sources.train_types.end()) return it->second;
    return source_file.empty() ? std::string("scenario") : source_file;
}

std::string Scenario::where_signal(const std::string& id) const {
    if (auto it = sources.signals.find(id); it != sources.signals.end()) return it->second;
    return source_file.empty() ? std::string("scenario") : source_file;
}

std::string Scenario::where_link(std::size_t link) const {
    if (link < sources.links.size() && !sources.links[link].empty()) return sources.links[link];
    return source_file.empty() ? std::string("scenario") : source_file;
}

}  // namespace knockon
