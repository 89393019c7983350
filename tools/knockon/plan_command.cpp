#include <cstdio>
#include <filesystem>

#include "models/plan.hpp"
#include "tools/results/output_file.hpp"
#include "tools/results/plan_output.hpp"
#include "tools/read/scenario_reader.hpp"
#include "tools/knockon/options.hpp"

namespace knockon::cli {

int plan(const std::vector<std::string>& args) {
    po::options_description options("plan options");
    options.add_options()("json", "print one JSON document instead of tables")(
        "csv", po::value<std::string>(), "also write every table as CSV into this directory")(
        "step", po::value<double>()->default_value(2.0), "distance step of the running-time integration [m]")(
        "variant", po::value<std::string>(), "apply this variant of the scenario file (base: none)");
    po::variables_map vm;
    if (!parse_command_line("plan", args, options, vm)) return 0;
    const double step = step_option(vm);

    const std::string variant = vm.count("variant") ? vm["variant"].as<std::string>() : std::string();
    Scenario scenario = read_scenario(vm["scenario"].as<std::string>(), variant);
    PlanResult result = make_plan(scenario, RunOptions{step});

    if (vm.count("csv")) {
        const std::string dir = vm["csv"].as<std::string>();
        std::error_code ec;
        std::filesystem::create_directories(dir, ec);
        if (ec) throw std::runtime_error(dir + ": cannot create directory: " + ec.message());
        for (const Table& t : plan_tables(scenario, result)) {
            const std::string file = (std::filesystem::path(dir) / (t.name + ".csv")).string();
            check_output_path(file, {vm["scenario"].as<std::string>()});
            write_file_atomically(file, to_csv(t));
        }
    }
    if (vm.count("json"))
        std::printf("%s\n", plan_json(scenario, result).dump(1).c_str());
    else
        std::fputs(plan_text(scenario, result).c_str(), stdout);
    return 0;
}

}  // namespace knockon::cli
