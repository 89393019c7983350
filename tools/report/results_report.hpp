#pragma once
// The report of a results file (`knockon report RESULTS.h5`): the plan's report of the scenario
// the results came from (html_report.hpp), with the simulated day drawn over the time-distance
// diagram.  The verdict comes first (the headline figures with their intervals, the days that
// ended in deadlock, the top sources of knock-on and buffers to widen where the file attributes
// knock-on, the plan's headline figures); then the views: the diagram, delay distributions,
// punctuality and primary vs knock-on delay, where delays grow, the as-run use of the sections and
// buffers, and for a comparison the variants side by side with their paired differences; the facts
// about the run close the page.
#include <string>

#include "tools/report/html_report.hpp"
#include "tools/report/results_figures.hpp"

namespace knockon {

// `options` as for plan_report (its as_run and as_run_note say what the diagram draws).
Report results_report(const ResultsView& view, const PlanReportOptions& options);

}  // namespace knockon
