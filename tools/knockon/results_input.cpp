#include "tools/knockon/results_input.hpp"

#include <cmath>
#include <filesystem>
#include <stdexcept>

#include "models/units.hpp"
#include "tools/results/hdf5_read.hpp"
#include "tools/read/scenario_reader.hpp"

namespace knockon::cli {

namespace {

namespace fs = std::filesystem;

// The scenario a results file names: as stored (relative to where the run was started), else
// beside the results file; --scenario overrides both.
std::string scenario_path(const ResultsFile& file, const po::variables_map& vm) {
    if (vm.count("scenario")) {
        const std::string given = vm["scenario"].as<std::string>();
        std::error_code ec;
        if (!fs::is_regular_file(given, ec)) throw UsageError(given + ": no such scenario file (--scenario)");
        return given;
    }
    const std::string stored = file.facts.scenario_file;
    std::error_code ec;
    if (!stored.empty() && fs::is_regular_file(stored, ec)) return stored;
    if (!stored.empty() && fs::path(stored).is_relative()) {
        const fs::path beside = fs::path(file.path).parent_path() / stored;
        if (fs::is_regular_file(beside, ec)) return beside.string();
    }
    throw UsageError(file.path + ": the scenario file '" + stored +
                     "' that the results came from (root attribute scenario_file) was not found; give it with "
                     "--scenario FILE");
}

std::string minutes(double s) { return svg::number(s / 60.0, 1) + " min"; }

std::string paths_source(const SimResult& day) {
    return day.samples.empty()
               ? "paths through its timing points, section entries and stands at signals, straight between them"
               : "paths from its sampled trajectories";
}

std::string unknown_note(const SimResult& day, const PlanResult& plan) {
    const std::vector<std::string> unknown = unknown_trains(day, plan);
    if (unknown.empty()) return "";
    std::string note = " ";
    note.append(std::to_string(unknown.size())).append(unknown.size() == 1 ? " train" : " trains");
    note.append(" of the results (e.g. ").append(unknown.front());
    note.append(") are not in the scenario as read now: it may have changed since the run, and they are not drawn.");
    return note;
}

}  // namespace

void add_results_options(po::options_description& options) {
    options.add_options()("scenario", po::value<std::string>(),
                          "with a results file: the scenario to plan for the diagram (default: the file named "
                          "by its scenario_file attribute)")(
        "replication", po::value<std::string>(),
        "with a study file: draw this traced replication as run (default: the traced day whose knock-on "
        "delay is nearest the median)");
}

void refuse_results_options(const po::variables_map& vm) {
    if (vm.count("replication")) throw UsageError("--replication applies to a study results file (.h5)");
    if (vm.count("scenario")) throw UsageError("--scenario applies to a results file (.h5)");
}

bool is_results_file(const std::string& path) { return h5::looks_like_hdf5(path); }

std::unique_ptr<ResultsInput> open_results(const std::string& path, const po::variables_map& vm) {
    auto in = std::make_unique<ResultsInput>();
    try {
        in->file = read_results(path);
    } catch (const ResultsFileError& e) {
        throw UsageError(e.what());
    }
    const ResultsFile& f = in->file;
    const ResultsKind kind = f.facts.kind;
    std::optional<std::uint32_t> requested;
    if (vm.count("replication")) {
        if (kind != ResultsKind::study)
            throw UsageError("--replication picks a traced day of a study file; " + path + " is a " + to_string(kind) +
                             " file");
        requested = static_cast<std::uint32_t>(count_option(vm, "replication", 0, UINT32_MAX));
    }
    if (kind != ResultsKind::day && vm.count("punctuality") && !vm["punctuality"].defaulted())
        throw UsageError("--punctuality applies to a day file; " + path + " holds its own thresholds");

    // The scenario, planned as the run planned it.
    std::string variant;
    if (vm.count("variant")) variant = vm["variant"].as<std::string>();
    else if (kind == ResultsKind::comparison) variant = f.variants.front().name;
    else variant = f.facts.variant;
    double step = vm["step"].as<double>();
    if (vm["step"].defaulted() && std::isfinite(f.facts.step) && f.facts.step > 0.0) step = f.facts.step;
    in->scenario_path = scenario_path(f, vm);
    in->scenario = read_scenario(in->scenario_path, variant);
    in->plan = make_plan(in->scenario, RunOptions{step});

    // The day drawn over the plan.
    const SimResult* day = nullptr;
    std::optional<ReplicationChoice> choice;
    if (kind == ResultsKind::day) {
        day = &*f.day;
        in->as_run_note = "Drawn over the plan: the simulated day as run, " + paths_source(*day) + ".";
    } else if (kind == ResultsKind::study) {
        try {
            choice = choose_replication(f.study->per_day, f.traced, requested);
        } catch (const std::invalid_argument& e) {
            throw UsageError(path + ": " + e.what());
        }
        if (choice) {
            try {
                in->traced_day = read_traced_day(path, choice->replication);
            } catch (const ResultsFileError& e) {
                throw UsageError(e.what());
            }
            day = &*in->traced_day;
            double knock_on = 0.0;
            for (const TimingRecord& r : day->timing) knock_on += r.knock_on;
            in->as_run_note = "Drawn over the plan: " + choice->reason + ". That day's knock-on delay, all trains: " +
                              minutes(knock_on) + "; " + paths_source(*day) + ".";
        } else {
            in->as_run_note =
                "As-run paths are not available: this study kept no traced days (--traces " + f.traces +
                "). To draw one over the plan, run the study with traced days (--traces sample:K for K days "
                "spread over the study, or all), e.g. knockon simulate SCENARIO --replications N --traces sample:5 "
                "--out study.h5, and report on that file.";
        }
    } else {
        in->as_run_note = "The plan of " + f.variants.front().name +
                          ". A comparison keeps no traced days; for as-run paths of a variant run knockon simulate "
                          "SCENARIO --variant NAME --replications N --traces sample:5 --out FILE.h5 and report on "
                          "that file.";
    }
    if (day && day->deadlock.deadlocked)
        in->as_run_note += " This day ended in deadlock (its last event at " + format_time_of_day(day->deadlock.time) +
                           "): the paths of the trains left waiting end where they stood.";
    if (day) {
        const std::string label =
            choice ? "as run, replication " + std::to_string(choice->replication) : std::string("as run");
        in->as_run = as_run_overlay(*day, in->scenario, in->plan, label);
        try {
            const std::optional<std::uint32_t> replication =
                choice ? std::optional<std::uint32_t>(choice->replication) : std::nullopt;
            if (const auto trees = read_delay_trees(path, replication, *day))
                in->as_run->trees = largest_delay_trees(*day, *trees, *in->as_run, in->scenario, in->plan);
        } catch (const ResultsFileError& e) {
            throw UsageError(e.what());
        }
        in->as_run_note += unknown_note(*day, in->plan);
    }

    in->view.file = &in->file;
    in->view.scenario = &in->scenario;
    in->view.plan = &in->plan;
    in->view.day = day;
    in->view.choice = choice;
    if (kind == ResultsKind::day) in->view.day_thresholds = punctuality_thresholds(vm);
    return in;
}

}  // namespace knockon::cli
