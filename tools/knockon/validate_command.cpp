#include <cstdio>

#include "tools/io/scenario_reader.hpp"
#include "tools/knockon/options.hpp"

namespace knockon::cli {

int validate(const std::vector<std::string>& args) {
    po::options_description options("validate options");
    po::variables_map vm;
    if (!parse_command_line("validate", args, options, vm)) return 0;
    const std::string file = vm["scenario"].as<std::string>();
    Scenario s = read_scenario(file);
    std::printf("%s: ok: %s; %.1f km, %zu stations, %zu signals, %zu train types, %zu trains\n", file.c_str(),
                s.name.c_str(), s.infrastructure.length / 1000.0, s.infrastructure.stations.size(),
                s.infrastructure.signals.size(), s.train_types.size(), s.timetable.services.size());
    return 0;
}

}  // namespace knockon::cli
