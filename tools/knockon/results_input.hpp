#pragma once
// What `knockon report` and `knockon plot` read when given a results file instead of a scenario:
// the file, the scenario it came from (root attribute scenario_file, or --scenario), planned
// again for the diagram, and the simulated day to draw over the plan (a day file's day, or the
// chosen traced day of a study).  Every problem is a UsageError (exit status 2) naming the file.
#include <memory>
#include <optional>
#include <string>

#include "models/plan.hpp"
#include "models/scenario.hpp"
#include "tools/report/as_run.hpp"
#include "tools/report/results_figures.hpp"
#include "tools/results/results_file.hpp"
#include "tools/knockon/options.hpp"

namespace knockon::cli {

// --scenario, --replication (and the plan options --variant and --step are the commands' own).
void add_results_options(po::options_description& options);
// Refuses those options when the input is a scenario file.
void refuse_results_options(const po::variables_map& vm);

// True when `path` is an HDF5 file (a results file); false for anything else (a scenario).
bool is_results_file(const std::string& path);

struct ResultsInput {
    ResultsFile file;
    std::string scenario_path;               // the scenario file read (stored, or --scenario)
    Scenario scenario;
    PlanResult plan;
    std::optional<SimResult> traced_day;     // study: the chosen traced day
    std::optional<AsRunOverlay> as_run;      // drawn over the plan, when there is a day to draw
    std::string as_run_note;                 // which day is drawn and why, or why none is
    ResultsView view;                        // points into the members above
};

// Not movable once made (the view points into it): hence the unique_ptr.
std::unique_ptr<ResultsInput> open_results(const std::string& path, const po::variables_map& vm);

}  // namespace knockon::cli
