#pragma once
// The study report as one self-contained HTML page: inline CSS and SVG, no scripts, no files or
// addresses outside it, laid out to print on A4.
//
// A report is laid out for the person who decides: a head (title, alerts such as a deadlock, the
// safety caution, warnings), then the verdict (the headline figures, and what to act on first),
// then the views (diagrams and tables, each a section of finished HTML), and last the facts about
// the run (files, commands, seed, versions) with the notes.  plan_report() makes the verdict and
// sections of a timetable analysis (tools/report/plan_report.cpp); results_report() those of a results
// file.
#include <string>
#include <utility>
#include <vector>

#include "models/plan.hpp"
#include "models/scenario.hpp"
#include "tools/report/plan_charts.hpp"
#include "tools/results/table.hpp"

namespace knockon {

struct ReportSection {
    std::string id;      // HTML id (anchor in the contents list)
    std::string title;   // plain text
    std::string html;    // body markup, already escaped
};

struct Report {
    std::string title;                                        // plain text
    std::vector<std::string> alerts;                          // plain text, first of all (e.g. a deadlock)
    std::vector<std::pair<std::string, std::string>> facts;   // label, value (plain text): at the end
    std::string caution;                                      // shown prominently at the top
    std::vector<std::string> warnings;                        // plain text, listed under the caution
    std::vector<std::string> notes;                           // plain text, under the facts
    ReportSection verdict;                                    // first after the head (empty html: none)
    std::vector<ReportSection> sections;                      // the views, in this order
};

std::string render_html(const Report& report);

struct PlanReportOptions {
    TimeWindow window;          // of the time-distance diagram
    std::string window_reason;  // why this window, e.g. "the busiest clock hour (14 departures and passes)"
    std::string command_line;   // as the user typed it, for the record
    const AsRunOverlay* as_run = nullptr;   // a simulated day to draw over the plan
    std::string as_run_note;    // said with the diagram: which day is drawn and why, or why none is
};

// Verdict and sections of the timetable analysis: time-distance diagram, capacity (per line
// section, and hour by hour), the thinnest buffers (with the links' buffers), the conflicts, the
// running times, the headway matrix and the spacing warnings.
Report plan_report(const Scenario& scenario, const PlanResult& plan, const PlanReportOptions& options);

// Building blocks for report sections.
std::string html_escape(const std::string& text);
std::string html_paragraph(const std::string& text);   // <p> of plain text
// A chart with its caption (plain text).
std::string html_figure(const svg::Element& chart, const std::string& caption);
// A table; cells are plain text (escaped here).  `numeric` marks right-aligned columns.  Two
// marks, each with a symbol of its own so that they read apart also in greyscale: `highlight`
// rows (class "warn", bold, kOverMark first, chart_kit.hpp) lie above a limit or are a conflict; `significant`
// rows (class "signif", kSignificantMark first) differ from zero beyond their 95 % interval.
struct HtmlTable {
    std::vector<std::string> headers;
    std::vector<bool> numeric;
    std::vector<std::vector<std::string>> rows;
    std::vector<bool> highlight;
    std::vector<bool> significant;
    std::string caption;
    std::string css_class;   // of the <table> ("compact": small, no wrapping), or none
};
std::string html_table(const HtmlTable& table);

// A table of the plan's outputs (plan_output.hpp: the one place its figures are computed) laid
// out as the text output formats it: the column names made readable ("buffer_s" -> "buffer [s]"),
// at most `max_rows` rows (0: all).
HtmlTable html_table_of(const Table& table, std::size_t max_rows = 0);
// "buffer_s" -> "buffer [s]", "speed_kmh" -> "speed [km/h]".
std::string column_label(const std::string& column);

// The plan's headline figures for a verdict: conflicts, the thinnest headway and link buffers, the
// highest peak-hour and day consumption, the hours above the limit and the warnings; rows marked
// (highlight) where a figure is above its limit or a conflict.
HtmlTable plan_headline(const PlanResult& plan);


}  // namespace knockon
