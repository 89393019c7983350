// `knockon plot`: one chart of the report as a standalone SVG file (for slides and documents).
#include <cstdio>

#include "models/plan.hpp"
#include "tools/io/output_file.hpp"
#include "tools/io/plan_charts.hpp"
#include "tools/io/plan_output.hpp"
#include "tools/io/scenario_reader.hpp"
#include "tools/knockon/options.hpp"

namespace knockon::cli {

// In report_command.cpp: the time-window options both commands take.
void add_window_options(po::options_description& options);
WindowRequest window_request(const po::variables_map& vm);
TimeWindow checked_window(const PlanResult& plan, const WindowRequest& request, std::string* reason);

int plot(const std::vector<std::string>& args) {
    po::options_description options("plot options");
    options.add_options()("chart", po::value<std::string>(), "time-distance or capacity (required)")(
        "svg", po::value<std::string>(), "write the chart to this SVG file (required)")(
        "width", po::value<double>()->default_value(1100.0), "width of the drawing [px]; it scales")(
        "step", po::value<double>()->default_value(2.0), "distance step of the running-time integration [m]")(
        "variant", po::value<std::string>(), "apply this variant of the scenario file (base: none)");
    add_window_options(options);
    po::variables_map vm;
    if (!parse_command_line("plot", args, options, vm)) return 0;
    if (!vm.count("chart")) throw UsageError("--chart time-distance|capacity is required");
    const std::string chart = vm["chart"].as<std::string>();
    if (chart != "time-distance" && chart != "capacity")
        throw UsageError("--chart: unknown chart '" + chart + "'; known: time-distance, capacity");
    if (!vm.count("svg")) throw UsageError("an output file is required: --svg FILE.svg");
    const double width = vm["width"].as<double>();
    if (!(width >= 400.0 && width <= 20000.0)) throw UsageError("--width must be in [400, 20000] pixels");
    const double step = vm["step"].as<double>();
    if (!(step > 0.0 && step <= 50.0)) throw UsageError("--step must be in (0, 50] metres");
    const WindowRequest request = window_request(vm);
    if (chart == "capacity" && (request.all || request.from || request.to))
        throw UsageError("--from, --to and --all apply to --chart time-distance only");

    const std::string variant = vm.count("variant") ? vm["variant"].as<std::string>() : std::string();
    const Scenario scenario = read_scenario(vm["scenario"].as<std::string>(), variant);
    const PlanResult plan = make_plan(scenario, RunOptions{step});

    ChartOptions co;
    co.width = width;
    svg::Element doc("svg");
    if (chart == "time-distance") {
        const TimeWindow w = checked_window(plan, request, nullptr);
        co.title = scenario.name + ": time-distance diagram, " + svg::format_hhmm(w.from) + "-" + svg::format_hhmm(w.to);
        co.footnote = kSafetyCaution;
        doc = time_distance_chart(scenario.infrastructure, plan, w, co);
    } else {
        co.title = scenario.name + ": capacity consumption per line section (UIC 406 compression)";
        co.footnote = kUic406Note;
        doc = capacity_chart(plan, co);
    }
    const std::string path = vm["svg"].as<std::string>();
    write_file_atomically(path, svg::to_string(doc, true));
    std::printf("wrote %s\n", path.c_str());
    return 0;
}

}  // namespace knockon::cli
