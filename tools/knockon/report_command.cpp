// `knockon report`: the study report as one self-contained HTML file.  Of a scenario: the plan
// (verdict, time-distance diagram, capacity consumption per line section and hour by hour,
// thinnest buffers and links, conflicts, running times, headway matrix, spacing warnings).  Of a results file
// (simulate --out, compare --out): the plan of the scenario it came from with the simulated day
// drawn over it, and the results' sections (tools/report/results_report.hpp).
#include <cstdio>

#include "models/plan.hpp"
#include "models/units.hpp"
#include "tools/report/html_report.hpp"
#include "tools/report/results_report.hpp"
#include "tools/results/output_file.hpp"
#include "tools/read/scenario_reader.hpp"
#include "tools/knockon/options.hpp"
#include "tools/knockon/results_input.hpp"

namespace knockon::cli {

namespace {

// The command line as typed, quoted where a shell would need it, for the report's record.
std::string command_line(const std::string& command, const std::vector<std::string>& args) {
    std::string out = "knockon " + command;
    for (const std::string& a : args) {
        const bool plain = !a.empty() && a.find_first_not_of("abcdefghijklmnopqrstuvwxyzABCDEFGHIJKLMNOPQRSTUVWXYZ"
                                                             "0123456789-_./:=,@+%") == std::string::npos;
        if (plain) {
            out += " " + a;
        } else {
            std::string q = "'";
            for (char c : a) q += c == '\'' ? std::string("'\\''") : std::string(1, c);
            out += " " + q + "'";
        }
    }
    return out;
}

}  // namespace

// --from/--to/--all as a WindowRequest (shared with `plot`).
WindowRequest window_request(const po::variables_map& vm) {
    WindowRequest w;
    w.all = vm.count("all") > 0;
    auto time_option = [&](const char* name) -> std::optional<double> {
        if (!vm.count(name)) return std::nullopt;
        try {
            return parse_time_of_day(vm[name].as<std::string>());
        } catch (const UnitError& e) {
            throw UsageError(std::string("--") + name + ": " + e.what());
        }
    };
    w.from = time_option("from");
    w.to = time_option("to");
    return w;
}

void add_window_options(po::options_description& options) {
    options.add_options()("from", po::value<std::string>(),
                          "start of the time-distance window, HH:MM (default: the busiest clock hour)")(
        "to", po::value<std::string>(), "end of the time-distance window, HH:MM")(
        "all", "time-distance window over every train (from the first blocking to the last)");
}

TimeWindow checked_window(const PlanResult& plan, const WindowRequest& request, std::string* reason) {
    try {
        return choose_window(plan, request, reason);
    } catch (const std::invalid_argument& e) {
        throw UsageError(e.what());
    }
}

// The options `report` and `plot` both take after their own: the plan's --step and --variant, the
// time-distance window, the results-file options and --punctuality.
void add_drawing_options(po::options_description& options) {
    options.add_options()("step", po::value<double>()->default_value(2.0),
                          "distance step of the running-time integration [m] (a results file's own by default)")(
        "variant", po::value<std::string>(),
        "apply this variant of the scenario file (base: none; a results file's own by default)");
    add_window_options(options);
    add_results_options(options);
    add_punctuality_option(options);
}

void refuse_day_options(const po::variables_map& vm) {
    if (!vm["punctuality"].defaulted()) throw UsageError("--punctuality applies to a day results file (.h5)");
}

int report(const std::vector<std::string>& args) {
    po::options_description options("report options");
    options.add_options()("output,o", po::value<std::string>(), "write the report to this HTML file (required)");
    add_drawing_options(options);
    po::variables_map vm;
    if (!parse_command_line("report", args, options, vm, "input", "SCENARIO|RESULTS.h5")) return 0;
    if (!vm.count("output")) throw UsageError("an output file is required: -o FILE.html");
    const double step = step_option(vm);
    const WindowRequest request = window_request(vm);
    const std::string input = vm["input"].as<std::string>();
    const std::string path = vm["output"].as<std::string>();
    check_output_path(path, {input});

    PlanReportOptions ro;
    ro.command_line = command_line("report", args);
    if (is_results_file(input)) {
        const std::unique_ptr<ResultsInput> in = open_results(input, vm);
        check_output_path(path, {input, in->scenario_path});
        // Unless a window was asked for, the diagram opens where the day drawn lost the most time.
        WindowRequest asked = request;
        if (in->view.day) asked.worst = worst_knock_on_hour(*in->view.day);
        ro.window = checked_window(in->plan, asked, &ro.window_reason);
        ro.as_run = in->as_run ? &*in->as_run : nullptr;
        ro.as_run_note = in->as_run_note;
        write_file_atomically(path, render_html(results_report(in->view, ro)));
    } else {
        refuse_results_options(vm);
        refuse_day_options(vm);
        const std::string variant = vm.count("variant") ? vm["variant"].as<std::string>() : std::string();
        const Scenario scenario = read_scenario(input, variant);
        const PlanResult plan = make_plan(scenario, RunOptions{step});
        ro.window = checked_window(plan, request, &ro.window_reason);
        write_file_atomically(path, render_html(plan_report(scenario, plan, ro)));
    }
    std::printf("wrote %s (time-distance window %s-%s)\n", path.c_str(), svg::format_hhmm(ro.window.from).c_str(),
                svg::format_hhmm(ro.window.to).c_str());
    return 0;
}

}  // namespace knockon::cli
