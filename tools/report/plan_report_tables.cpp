#include "tools/report/plan_report_tables.hpp"

#include <algorithm>
#include <map>
#include <stdexcept>

#include "tools/results/plan_output.hpp"

namespace knockon {

namespace {

// The index of a column by name (the tables are plan_output's; a missing one is a program error).
std::size_t column(const Table& t, const std::string& name) {
    for (std::size_t i = 0; i < t.columns.size(); ++i)
        if (t.columns[i].name == name) return i;
    throw std::out_of_range("table " + t.name + " has no column " + name);
}

std::string cell(const Table& t, const std::vector<Cell>& row, const std::string& name) {
    const std::size_t i = column(t, name);
    return text_cell(row[i], t.columns[i].kind);
}

}  // namespace

const Table& plan_table(const std::vector<Table>& tables, const std::string& name) {
    for (const Table& t : tables)
        if (t.name == name) return t;
    throw std::out_of_range("the plan has no table " + name);
}

ReportSection running_times_section(const std::vector<Table>& tables) {
    const Table& rt = plan_table(tables, "running_times");
    std::string html = html_paragraph(
        "Every train's timing points: the times the timetable gives, the planned times of the fastest run "
        "(waiting at each stop for the scheduled departure and the minimum dwell), and the running times "
        "from the previous timing point: technical (the fastest run), scheduled (technical plus the "
        "supplement) and timetabled (what the timetable allows); reserve = timetabled - scheduled. Times of "
        "day HH:MM:SS, durations in seconds. The same table: knockon plan (running_times), --csv or --json.");
    HtmlTable t = html_table_of(rt);
    t.css_class = "compact";
    // A negative reserve: the timetable allows less than running time plus supplement.
    const std::size_t reserve = column(rt, "reserve_s");
    for (const auto& row : rt.rows) {
        const double* r = std::get_if<double>(&row[reserve]);
        t.highlight.push_back(r && *r < -kTightTolerance);
    }
    html += html_table(t);
    html += html_paragraph(std::string("Marked rows (") + kOverMark +
                           ", bold): the timetable allows less than running time plus supplement.");
    return {"running-times", "Running times", html};
}

ReportSection headway_matrix_section(const std::vector<Table>& tables) {
    const Table& m = plan_table(tables, "headway_matrix");
    std::string html = html_paragraph(
        "Minimum headway [s] of a follower behind a leader, by train type, in each line section: the largest "
        "over all pairs of trains of those types in the timetable (blocking time theory: the follower's "
        "stairway touching the leader's). Rows: line section and leader type; columns: follower type. The "
        "critical section of each figure: knockon plan (headway_matrix), --csv or --json.");
    if (m.rows.empty()) return {"headway-matrix", "Headway matrix", html + html_paragraph("No line section has two trains.")};
    std::vector<std::string> followers;
    std::map<std::pair<std::string, std::string>, std::map<std::string, std::string>> cells;
    std::vector<std::pair<std::string, std::string>> order;   // (line section, leader type) as first met
    for (const auto& row : m.rows) {
        const std::string ls = cell(m, row, "line_section"), lead = cell(m, row, "leader_type"),
                          follow = cell(m, row, "follower_type");
        if (std::find(followers.begin(), followers.end(), follow) == followers.end()) followers.push_back(follow);
        if (!cells.count({ls, lead})) order.push_back({ls, lead});
        cells[{ls, lead}][follow] = cell(m, row, "minimum_headway_s");
    }
    std::sort(followers.begin(), followers.end());
    HtmlTable t;
    t.caption = "Minimum headway by train type [s]";
    t.headers = {"line section", "leader type"};
    t.numeric = {false, false};
    for (const std::string& f : followers) {
        t.headers.push_back("follower " + f);
        t.numeric.push_back(true);
    }
    for (const auto& key : order) {
        std::vector<std::string> row = {key.first, key.second};
        for (const std::string& f : followers) {
            const auto& c = cells[key];
            const auto it = c.find(f);
            row.push_back(it == c.end() ? "-" : it->second);
        }
        t.rows.push_back(std::move(row));
    }
    return {"headway-matrix", "Headway matrix", html + html_table(t)};
}

ReportSection spacing_section(const PlanResult& plan, const std::vector<Table>& tables) {
    if (plan.spacing_warnings.empty())
        return {"spacing", "Signal spacing",
                html_paragraph("Every main signal gives each train at least its stopping distance of warning at the "
                               "speed it runs there.")};
    std::string html = html_paragraph(
        std::to_string(plan.spacing_warnings.size()) +
        " signal(s) give less warning than a train needs to stop from the speed it runs there (the worst train "
        "of each): blocking times there assume the warning suffices, so the plan is optimistic there and the "
        "simulated driver brakes earlier. A planning check only: signal spacing is for licensed signalling "
        "engineers to decide.");
    HtmlTable t = html_table_of(plan_table(tables, "spacing_warnings"));
    t.highlight.assign(t.rows.size(), true);
    html += html_table(t);
    return {"spacing", "Signal spacing warnings", html};
}

}  // namespace knockon
