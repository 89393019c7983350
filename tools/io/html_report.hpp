#pragma once
// The study report as one self-contained HTML page: inline CSS and SVG, no scripts, no files or
// addresses outside it, laid out to print on A4.
//
// A report is a head (title, facts, the safety caution, notes) and a list of sections, each a
// piece of finished HTML.  plan_report() makes the sections of a timetable analysis; sections of
// simulation or comparison results can be appended to the same Report before render_html().
#include <string>
#include <utility>
#include <vector>

#include "models/plan.hpp"
#include "models/scenario.hpp"
#include "tools/io/plan_charts.hpp"

namespace knockon {

struct ReportSection {
    std::string id;      // HTML id (anchor in the contents list)
    std::string title;   // plain text
    std::string html;    // body markup, already escaped
};

struct Report {
    std::string title;                                        // plain text
    std::vector<std::string> alerts;                          // plain text, first of all (e.g. a deadlock)
    std::vector<std::pair<std::string, std::string>> facts;   // label, value (plain text)
    std::string caution;                                      // shown prominently at the top
    std::vector<std::string> warnings;                        // plain text, listed under the caution
    std::vector<std::string> notes;                           // plain text, under the facts
    std::vector<ReportSection> sections;
};

std::string render_html(const Report& report);

struct PlanReportOptions {
    TimeWindow window;          // of the time-distance diagram
    std::string window_reason;  // why this window, e.g. "the busiest clock hour (14 departures and passes)"
    std::string command_line;   // as the user typed it, for the record
    const AsRunOverlay* as_run = nullptr;   // a simulated day to draw over the plan
    std::string as_run_note;    // said with the diagram: which day is drawn and why, or why none is
};

// Head and sections of the timetable analysis: time-distance diagram, capacity chart and
// table, the thinnest buffers and the conflicts.
Report plan_report(const Scenario& scenario, const PlanResult& plan, const PlanReportOptions& options);

// Building blocks for report sections.
std::string html_escape(const std::string& text);
std::string html_paragraph(const std::string& text);   // <p> of plain text
// A chart with its caption (plain text).
std::string html_figure(const svg::Element& chart, const std::string& caption);
// A table; cells are plain text (escaped here).  `numeric` marks right-aligned columns;
// `highlight` rows get the "warn" class (shown bold with a marker, also in greyscale).
struct HtmlTable {
    std::vector<std::string> headers;
    std::vector<bool> numeric;
    std::vector<std::vector<std::string>> rows;
    std::vector<bool> highlight;
    std::string caption;
};
std::string html_table(const HtmlTable& table);

}  // namespace knockon
