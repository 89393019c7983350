#pragma once
// The plan report's sections of reference tables: running times, the headway matrix by train type
// and the spacing warnings.  Their figures come from the plan's output tables (plan_output.hpp),
// the one place that computes them for the text, JSON and CSV outputs too; these only lay them out.
#include <string>
#include <vector>

#include "models/plan.hpp"
#include "tools/report/html_report.hpp"
#include "tools/results/table.hpp"

namespace knockon {

// The table of that name among plan_tables(); std::out_of_range when there is none.
const Table& plan_table(const std::vector<Table>& tables, const std::string& name);

ReportSection running_times_section(const std::vector<Table>& tables);
ReportSection headway_matrix_section(const std::vector<Table>& tables);
ReportSection spacing_section(const PlanResult& plan, const std::vector<Table>& tables);

}  // namespace knockon
