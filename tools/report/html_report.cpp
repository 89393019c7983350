#include "tools/report/html_report.hpp"

#include <algorithm>
#include <cmath>
#include <map>

#include "models/units.hpp"
#include "tools/results/plan_output.hpp"
#include "tools/report/svg.hpp"

namespace knockon {

namespace {

const char* const kPageCss = R"(
body { font-family: "DejaVu Sans", "Liberation Sans", Arial, Helvetica, sans-serif; color: #1a1a1a;
       background: #ffffff; max-width: 1180px; margin: 0 auto; padding: 16px 24px; line-height: 1.4; }
h1 { font-size: 1.6em; margin: 0.2em 0 0.5em; }
h2 { font-size: 1.25em; border-bottom: 2px solid #1b3b6f; padding-bottom: 2px; margin-top: 1.8em; }
p { max-width: 60em; }
.caution { border: 2px solid #1a1a1a; border-left-width: 10px; background: #fff4e0; padding: 10px 14px;
           font-size: 1.05em; margin: 12px 0 16px; max-width: 60em; }
.alert { border: 3px solid #1a1a1a; background: #ffffff; padding: 10px 14px; font-size: 1.05em;
         margin: 12px 0 16px; max-width: 60em; }
.warnings { border: 2px solid #1a1a1a; border-left-width: 10px; border-left-style: double; background: #f2f2f2;
            padding: 8px 14px; margin: 0 0 16px; max-width: 60em; }
.warnings ul { margin: 4px 0 0; padding-left: 1.2em; }
.notes { font-size: 0.92em; color: #333333; padding-left: 1.2em; }
table { border-collapse: collapse; font-size: 0.9em; margin: 8px 0 16px; }
caption { text-align: left; font-weight: bold; padding: 4px 0; }
th, td { border: 1px solid #b5b5b5; padding: 3px 8px; text-align: left; vertical-align: top; }
thead th { background: #e8edf5; }
td.num, th.num { text-align: right; font-variant-numeric: tabular-nums; }
tr.warn td { font-weight: bold; }
tr.warn td:first-child::before { content: "\25B2\00A0"; }
tr.signif td:first-child::before { content: "\25C6\00A0"; }
section.verdict { border: 2px solid #1b3b6f; padding: 4px 16px 10px; margin-top: 12px; }
section.verdict h2 { margin-top: 0.6em; }
.verdict-lists { display: flex; flex-wrap: wrap; gap: 8px 32px; }
.verdict-lists > div { flex: 1 1 26em; }
.verdict-lists ol { margin: 4px 0; padding-left: 1.4em; }
.not-given { color: #444444; font-style: italic; }
table.compact { font-size: 0.8em; }
table.compact th, table.compact td { padding: 2px 4px; white-space: nowrap; }
table.facts th { background: none; font-weight: normal; color: #444444; }
code.cmd { font-size: 0.92em; word-break: break-all; }
figure { margin: 12px 0 8px; }
figure svg { max-width: 100%; height: auto; display: block; }
figcaption { font-size: 0.9em; color: #333333; margin-top: 4px; max-width: 60em; }
nav ol { margin: 4px 0 0; }
footer { margin-top: 2.5em; border-top: 1px solid #b5b5b5; padding-top: 6px; font-size: 0.85em; color: #444444; }
@page { size: A4 landscape; margin: 12mm; }
@media print {
  body { max-width: none; padding: 0; font-size: 10pt; }
  nav { display: none; }
  section.page, section.run-facts { break-before: page; }
  figure, .caution, .alert, .warnings, h2, section.verdict { break-inside: avoid; }
  table { break-inside: auto; }
  tr { break-inside: avoid; }
  h2 { break-after: avoid; }
  thead { display: table-header-group; }
  a { color: inherit; text-decoration: none; }
}
)";

}  // namespace

std::string html_escape(const std::string& text) { return svg::escape(text); }

std::string html_paragraph(const std::string& text) { return "<p>" + html_escape(text) + "</p>\n"; }

std::string html_figure(const svg::Element& chart, const std::string& caption) {
    return "<figure>\n" + svg::to_string(chart, false) + "<figcaption>" + html_escape(caption) +
           "</figcaption>\n</figure>\n";
}

std::string html_table(const HtmlTable& table) {
    auto numeric = [&](std::size_t i) { return i < table.numeric.size() && table.numeric[i]; };
    std::string out = table.css_class.empty() ? "<table>\n" : "<table class=\"" + html_escape(table.css_class) + "\">\n";
    if (!table.caption.empty()) out += "<caption>" + html_escape(table.caption) + "</caption>\n";
    out += "<thead><tr>";
    for (std::size_t i = 0; i < table.headers.size(); ++i)
        out += std::string(numeric(i) ? "<th class=\"num\">" : "<th>") + html_escape(table.headers[i]) + "</th>";
    out += "</tr></thead>\n<tbody>\n";
    for (std::size_t r = 0; r < table.rows.size(); ++r) {
        const bool warn = r < table.highlight.size() && table.highlight[r];
        const bool signif = r < table.significant.size() && table.significant[r];
        out += warn ? "<tr class=\"warn\">" : signif ? "<tr class=\"signif\">" : "<tr>";
        for (std::size_t i = 0; i < table.rows[r].size(); ++i)
            out += std::string(numeric(i) ? "<td class=\"num\">" : "<td>") + html_escape(table.rows[r][i]) + "</td>";
        out += "</tr>\n";
    }
    out += "</tbody>\n</table>\n";
    return out;
}

std::string column_label(const std::string& column) {
    static const std::pair<const char*, const char*> kUnits[] = {{"_kmh", " [km/h]"}, {"_s", " [s]"}, {"_m", " [m]"}};
    std::string name = column, unit;
    for (const auto& [suffix, label] : kUnits) {
        const std::string sfx = suffix;
        if (name.size() > sfx.size() && name.compare(name.size() - sfx.size(), sfx.size(), sfx) == 0) {
            name.erase(name.size() - sfx.size());
            unit = label;
            break;
        }
    }
    std::replace(name.begin(), name.end(), '_', ' ');
    return name + unit;
}

HtmlTable html_table_of(const Table& table, std::size_t max_rows) {
    HtmlTable t;
    t.caption = table.title;
    for (const Column& c : table.columns) {
        t.headers.push_back(column_label(c.name));
        t.numeric.push_back(c.kind != ColumnKind::text);
    }
    const std::size_t n = max_rows ? std::min(max_rows, table.rows.size()) : table.rows.size();
    for (std::size_t r = 0; r < n; ++r) {
        std::vector<std::string> row;
        for (std::size_t i = 0; i < table.columns.size(); ++i)
            row.push_back(text_cell(table.rows[r][i], table.columns[i].kind));
        t.rows.push_back(std::move(row));
    }
    return t;
}

namespace {

std::string section_html(const ReportSection& s, const std::string& cls) {
    return "<section id=\"" + html_escape(s.id) + "\"" + (cls.empty() ? "" : " class=\"" + cls + "\"") + ">\n<h2>" +
           html_escape(s.title) + "</h2>\n" + s.html + "</section>\n";
}

}  // namespace

std::string render_html(const Report& report) {
    std::string out;
    out += "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n";
    out += "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n";
    out += std::string("<meta name=\"generator\" content=\"knockon ") + KNOCKON_VERSION + "\">\n";
    out += "<title>" + html_escape(report.title) + "</title>\n<style>" + kPageCss + "</style>\n</head>\n<body>\n";
    // The head: what must be read before any figure.
    out += "<header>\n<h1>" + html_escape(report.title) + "</h1>\n";
    for (const std::string& a : report.alerts)
        out += "<div class=\"alert\" role=\"alert\"><strong>Read first.</strong> " + html_escape(a) + "</div>\n";
    if (!report.caution.empty())
        out += "<div class=\"caution\" role=\"note\"><strong>Caution.</strong> " + html_escape(report.caution) +
               "</div>\n";
    if (!report.warnings.empty()) {
        out += "<div class=\"warnings\" role=\"note\"><strong>Warnings.</strong>\n<ul>\n";
        for (const std::string& w : report.warnings) out += "<li>" + html_escape(w) + "</li>\n";
        out += "</ul>\n</div>\n";
    }
    out += "</header>\n<main>\n";
    // The verdict, then the contents of the views, the views, and the facts about the run last.
    if (!report.verdict.html.empty()) out += section_html(report.verdict, "verdict");
    const bool facts = !report.facts.empty() || !report.notes.empty();
    if (!report.sections.empty()) {
        out += "<nav><strong>Contents</strong>\n<ol>\n";
        for (const ReportSection& s : report.sections)
            out += "<li><a href=\"#" + html_escape(s.id) + "\">" + html_escape(s.title) + "</a></li>\n";
        if (facts) out += "<li><a href=\"#run-facts\">About this run</a></li>\n";
        out += "</ol>\n</nav>\n";
    }
    for (const ReportSection& s : report.sections) {
        // Sections holding a chart start a printed page of their own.
        const bool page = s.html.find("<svg") != std::string::npos;
        out += section_html(s, page ? "page" : "");
    }
    if (facts) {
        std::string html;
        if (!report.facts.empty()) {
            html += "<table class=\"facts\">\n<tbody>\n";
            for (const auto& [label, value] : report.facts)
                html += "<tr><th scope=\"row\">" + html_escape(label) + "</th><td>" + html_escape(value) + "</td></tr>\n";
            html += "</tbody>\n</table>\n";
        }
        if (!report.notes.empty()) {
            html += "<ul class=\"notes\">\n";
            for (const std::string& n : report.notes) html += "<li>" + html_escape(n) + "</li>\n";
            html += "</ul>\n";
        }
        out += section_html({"run-facts", "About this run: files, commands, seed, versions", html}, "run-facts");
    }
    out += "</main>\n<footer>\n";
    out += std::string("Made by knockon ") + KNOCKON_VERSION + ". ";
    if (!report.caution.empty()) out += html_escape(report.caution);
    out += "\n</footer>\n</body>\n</html>\n";
    return out;
}

}  // namespace knockon
