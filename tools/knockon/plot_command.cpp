// `knockon plot`: one chart of the report as a standalone SVG file (for slides and documents).
// Of a scenario: the plan's charts; of a results file also the charts of its results.
#include <algorithm>
#include <cstdio>

#include "models/plan.hpp"
#include "tools/report/chart_kit.hpp"
#include "tools/results/output_file.hpp"
#include "tools/report/plan_charts.hpp"
#include "tools/results/plan_output.hpp"
#include "tools/report/results_figures.hpp"
#include "tools/read/scenario_reader.hpp"
#include "tools/knockon/options.hpp"
#include "tools/knockon/results_input.hpp"

namespace knockon::cli {

// In report_command.cpp: the options both commands take.
void add_drawing_options(po::options_description& options);
WindowRequest window_request(const po::variables_map& vm);
TimeWindow checked_window(const PlanResult& plan, const WindowRequest& request, std::string* reason);
void refuse_day_options(const po::variables_map& vm);

namespace {

std::string chart_list() {
    std::string out = "time-distance, capacity, hourly-capacity (any input); with a day or study file: ";
    const std::vector<std::string> s = result_chart_names(ResultsKind::study);
    for (std::size_t i = 0; i < s.size(); ++i) out += s[i] + (i + 1 < s.size() ? ", " : "; ");
    out += "with a comparison file: ";
    const std::vector<std::string> c = result_chart_names(ResultsKind::comparison);
    for (std::size_t i = 0; i < c.size(); ++i) out += c[i] + (i + 1 < c.size() ? ", " : "");
    return out;
}

// The axis of the time-distance diagram: the line's, or the network corridor --corridor names
// (the first without it), which the title then names.
std::unique_ptr<DiagramAxis> diagram_axis_option(const po::variables_map& vm, const Scenario& sc,
                                                 const PlanResult& plan, std::string& title) {
    std::vector<std::unique_ptr<DiagramAxis>> axes = diagram_axes(sc, plan);
    if (!sc.network) {
        if (vm.count("corridor"))
            throw UsageError("--corridor is for a network scenario; a line's diagram runs along the line");
        return std::move(axes.front());
    }
    if (axes.empty()) throw UsageError("the network has no corridor to draw a time-distance diagram along");
    std::size_t pick = 0;
    if (vm.count("corridor")) {
        const std::string want = vm["corridor"].as<std::string>();
        std::string known;
        pick = axes.size();
        for (std::size_t i = 0; i < axes.size(); ++i) {
            if (axes[i]->name == want) pick = i;
            known += (i ? ", " : "") + axes[i]->name;
        }
        if (pick == axes.size()) throw UsageError("--corridor: no corridor '" + want + "'; the network has " + known);
    }
    title += ", corridor " + axes[pick]->name;
    return std::move(axes[pick]);
}

}  // namespace

int plot(const std::vector<std::string>& args) {
    po::options_description options("plot options");
    options.add_options()("chart", po::value<std::string>(), ("the chart (required): " + chart_list()).c_str())(
        "svg", po::value<std::string>(), "write the chart to this SVG file (required)")(
        "width", po::value<double>()->default_value(1100.0), "width of the drawing [px]; it scales")(
        "corridor", po::value<std::string>(),
        "a network: the corridor the time-distance diagram runs along (default: the first)");
    add_drawing_options(options);
    po::variables_map vm;
    if (!parse_command_line("plot", args, options, vm, "input", "SCENARIO|RESULTS.h5")) return 0;
    if (!vm.count("chart")) throw UsageError("--chart is required: " + chart_list());
    const std::string chart = vm["chart"].as<std::string>();
    if (!vm.count("svg")) throw UsageError("an output file is required: --svg FILE.svg");
    const double width = vm["width"].as<double>();
    if (!(width >= 400.0 && width <= 20000.0)) throw UsageError("--width must be in [400, 20000] pixels");
    const double step = step_option(vm);
    const WindowRequest request = window_request(vm);
    if (chart != "time-distance" && (request.all || request.from || request.to || vm.count("corridor")))
        throw UsageError("--from, --to, --all and --corridor apply to --chart time-distance only");
    const std::string input = vm["input"].as<std::string>();
    const std::string path = vm["svg"].as<std::string>();
    check_output_path(path, {input});
    const bool results = is_results_file(input);
    const bool plan_chart = chart == "time-distance" || chart == "capacity" || chart == "hourly-capacity";
    if (!results && !plan_chart) {
        const std::vector<std::string> a = result_chart_names(ResultsKind::study);
        const std::vector<std::string> b = result_chart_names(ResultsKind::comparison);
        const bool known = std::find(a.begin(), a.end(), chart) != a.end() || std::find(b.begin(), b.end(), chart) != b.end();
        throw UsageError(known ? "--chart " + chart + " needs a results file (.h5) from simulate or compare"
                               : "--chart: unknown chart '" + chart + "'; known: " + chart_list());
    }

    std::unique_ptr<ResultsInput> in;
    Scenario scenario;
    PlanResult plan;
    if (results) {
        in = open_results(input, vm);
        check_output_path(path, {input, in->scenario_path});
    } else {
        refuse_results_options(vm);
        refuse_day_options(vm);
        const std::string variant = vm.count("variant") ? vm["variant"].as<std::string>() : std::string();
        scenario = read_scenario(input, variant);
        plan = make_plan(scenario, RunOptions{step});
    }
    const Scenario& sc = in ? in->scenario : scenario;
    const PlanResult& pl = in ? in->plan : plan;

    ChartOptions co;
    co.width = width;
    svg::Element doc("svg");
    if (chart == "time-distance") {
        WindowRequest asked = request;   // as for report: the day's worst hour unless asked otherwise
        if (in && in->view.day) asked.worst = worst_knock_on_hour(*in->view.day);
        const TimeWindow w = checked_window(pl, asked, nullptr);
        const AsRunOverlay* as_run = in && in->as_run ? &*in->as_run : nullptr;
        co.title = sc.name + ": time-distance diagram, " + svg::format_hhmm(w.from) + "-" + svg::format_hhmm(w.to) +
                   (as_run ? " (" + as_run->label + ")" : std::string());
        co.footnote = kSafetyCaution;
        doc = time_distance_chart(*diagram_axis_option(vm, sc, pl, co.title), pl, w, co, as_run);
    } else if (chart == "capacity") {
        co.title = sc.name + ": capacity consumption per line section (UIC 406 compression)";
        co.footnote = kUic406Note;
        doc = capacity_chart(pl, co);
    } else if (chart == "hourly-capacity") {
        co.title = sc.name + ": capacity consumption hour by hour (UIC 406 compression of each clock hour)";
        co.footnote = kUic406Note;
        doc = hourly_capacity_chart(pl, co);
    } else {
        try {
            ResultChart c = make_result_chart(chart, in->view, width);
            // What the figures are and where they come from, for whoever reads the file.
            c.svg.add(svg::Element("desc")).text(c.caption);
            doc = std::move(c.svg);
        } catch (const std::invalid_argument& e) {
            throw UsageError(input + ": --chart: " + e.what());
        }
    }
    // Of a results file with deadlocked days (or an incomplete day) every chart says so first.
    if (in)
        if (const std::string notice = results_deadlock_notice(in->view); !notice.empty())
            doc = with_alert(std::move(doc), notice);
    write_file_atomically(path, svg::to_string(doc, true));
    std::printf("wrote %s\n", path.c_str());
    return 0;
}

}  // namespace knockon::cli
