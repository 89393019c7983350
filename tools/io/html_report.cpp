#include "tools/io/html_report.hpp"

#include <algorithm>
#include <cmath>
#include <map>

#include "models/units.hpp"
#include "tools/io/plan_output.hpp"
#include "tools/io/svg.hpp"

namespace knockon {

namespace {

constexpr std::size_t kThinnestBuffers = 10;
constexpr std::size_t kConflictRows = 50;   // beyond this the table says how many were left out

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
  section.page { break-before: page; }
  figure, table, .caution, .alert, .warnings, h2 { break-inside: avoid; }
  h2 { break-after: avoid; }
  thead { display: table-header-group; }
  a { color: inherit; text-decoration: none; }
}
)";

std::string seconds(double s) { return std::isfinite(s) ? svg::number(s, 0) + " s" : "-"; }
std::string percent(double share) { return svg::number(share * 100.0, 1) + " %"; }
std::string km_text(double metres) { return svg::number(metres / 1000.0, 1) + " km"; }

const std::string& train_id(const PlanResult& plan, std::size_t i) { return plan.trains[i].run.service->id; }

std::string paragraph(const std::string& text) { return html_paragraph(text); }
std::string figure(const svg::Element& chart, const std::string& caption) { return html_figure(chart, caption); }

ReportSection time_distance_section(const Scenario& scenario, const PlanResult& plan,
                                    const PlanReportOptions& options) {
    const TimeWindow w = options.window;
    ChartOptions chart;
    chart.title = "Time-distance diagram, " + svg::format_hhmm(w.from) + "-" + svg::format_hhmm(w.to);
    chart.footnote = kSafetyCaution;
    std::string html = paragraph(
        "Window " + svg::format_hhmm(w.from) + " to " + svg::format_hhmm(w.to) +
        (options.window_reason.empty() ? std::string() : ": " + options.window_reason) +
        ". Every train's planned path is drawn through its running-time calculation, level where it stands "
        "at a stop. The shaded blocks are its blocking-time stairway: for each route, the time from route "
        "set-up to release, over the detection sections from the entry signal to the end of the overlap "
        "beyond the exit signal. Hatched blocks with a black outline are conflicts: two trains' blocking "
        "times overlap on a section.");
    if (!options.as_run_note.empty()) html += paragraph(options.as_run_note);
    html += figure(time_distance_chart(scenario.infrastructure, plan, w, chart, options.as_run),
                   "Distance runs downwards along the line (chainage in km on the right, stations on the left, "
                   "main signals as ticks); time runs to the right. Pointing at a path, block or conflict "
                   "shows its details.");
    return {"time-distance", "Time-distance diagram", html};
}

ReportSection capacity_section(const PlanResult& plan) {
    ChartOptions chart;
    chart.title = "Capacity consumption per line section (UIC 406 compression)";
    chart.footnote = kUic406Note;
    std::string html = paragraph(
        "Occupation time of the compressed timetable as a share of the window, for each line section "
        "(station to station, per direction): the line section's busiest clock hour and the whole day, "
        "each against its recommended limit.");
    html += figure(capacity_chart(plan, chart), kUic406Note);

    HtmlTable t;
    t.caption = "Capacity consumption";
    t.headers = {"line section", "direction", "window", "from", "to", "trains", "occupation", "consumption", "limit"};
    t.numeric = {false, false, false, true, true, true, true, true, true};
    for (const CapacityFigure& f : plan.capacity) {
        t.rows.push_back({f.line_section, to_string(f.direction), f.window, svg::format_hhmm(f.from),
                          svg::format_hhmm(f.to), std::to_string(f.trains), seconds(f.occupation),
                          percent(f.consumption), percent(f.limit)});
        t.highlight.push_back(f.consumption > f.limit);
    }
    if (t.rows.empty())
        html += paragraph("No line section carries a train.");
    else
        html += html_table(t) + paragraph("Marked rows (\u25B2, bold) lie above their limit.");
    if (!plan.stretch_capacity.empty()) {
        html += paragraph(
            "On a single-track stretch both directions share one track: the trains of both directions are "
            "compressed together in the order of their blocking of the stretch, an opposing train no earlier "
            "than the stretch's sections are released. Each direction alone is shown beside for comparison.");
        HtmlTable st;
        st.caption = "Capacity consumption of single-track stretches, both directions together";
        st.headers = {"stretch", "window", "from", "to", "trains up", "trains down", "up alone", "down alone",
                      "occupation", "both directions", "limit"};
        st.numeric = {false, false, true, true, true, true, true, true, true, true, true};
        for (const StretchCapacity& f : plan.stretch_capacity) {
            st.rows.push_back({plan.single_track.stretches[f.stretch].name, f.window, svg::format_hhmm(f.from),
                               svg::format_hhmm(f.to), std::to_string(f.trains_up), std::to_string(f.trains_down),
                               percent(f.consumption_up), percent(f.consumption_down), seconds(f.occupation),
                               percent(f.consumption), percent(f.limit)});
            st.highlight.push_back(f.consumption > f.limit);
        }
        html += html_table(st);
    }
    return {"capacity", "Capacity consumption", html};
}

ReportSection buffers_section(const PlanResult& plan) {
    // Same-direction pairs and opposing pairs on single-track stretches (their crossing buffer).
    struct Pair {
        const HeadwayPair* same = nullptr;
        const Crossing* opposing = nullptr;
        double buffer() const { return same ? same->buffer : opposing->buffer; }
    };
    std::vector<Pair> pairs;
    for (const HeadwayPair& h : plan.headways) pairs.push_back({&h, nullptr});
    for (const Crossing& c : plan.crossings) pairs.push_back({nullptr, &c});
    std::stable_sort(pairs.begin(), pairs.end(), [](const Pair& a, const Pair& b) { return a.buffer() < b.buffer(); });
    const std::size_t shown = std::min(pairs.size(), kThinnestBuffers);
    std::string html = paragraph(
        "The " + std::to_string(shown) + " smallest buffers of " + std::to_string(pairs.size()) +
        " consecutive train pairs: buffer = scheduled headway - minimum headway at the reference points "
        "(departure or pass at the line section's first station); the critical section is where the "
        "stairways touch at the minimum headway. Opposing pairs on a single-track stretch (direction "
        "\"opposing\") show their crossing buffer (see Crossings). All pairs: knockon plan --csv or --json.");
    HtmlTable t;
    t.caption = "Thinnest buffers";
    t.headers = {"line section", "direction", "leader", "follower", "scheduled headway", "minimum headway", "buffer",
                 "critical section"};
    t.numeric = {false, false, false, false, true, true, true, false};
    for (std::size_t i = 0; i < shown; ++i) {
        if (const Crossing* c = pairs[i].opposing) {
            t.rows.push_back({plan.single_track.stretches[c->stretch].name, "opposing", train_id(plan, c->opposing),
                              train_id(plan, c->waiting), "-", "-", seconds(c->buffer),
                              "crossing at " + plan.single_track.places[c->place].name});
            t.highlight.push_back(c->buffer < 0.0);
            continue;
        }
        const HeadwayPair& h = *pairs[i].same;
        t.rows.push_back({h.line_section, to_string(h.direction), train_id(plan, h.leader), train_id(plan, h.follower),
                          seconds(h.scheduled_headway), seconds(h.minimum_headway), seconds(h.buffer),
                          h.critical_section});
        t.highlight.push_back(h.buffer < 0.0);
    }
    if (t.rows.empty())
        html += paragraph("No line section has two consecutive trains.");
    else
        html += html_table(t) + paragraph("Marked rows (\u25B2, bold) have a negative buffer: a conflict.");
    return {"buffers", "Thinnest buffers", html};
}

ReportSection conflicts_section(const PlanResult& plan) {
    std::string html;
    if (plan.conflicts.empty()) {
        html = paragraph("No conflicts: no two trains' blocking times overlap on any detection section.");
        return {"conflicts", "Conflicts", html};
    }
    html = paragraph(std::to_string(plan.conflicts.size()) +
                     " pairs of blocking times overlap on a detection section (the first train named blocks it "
                     "first; the overlap is the negative buffer there).");
    HtmlTable t;
    t.caption = "Conflicts";
    t.headers = {"section", "first", "second", "from", "overlap", "kind"};
    t.numeric = {false, false, false, true, true, false};
    for (std::size_t i = 0; i < plan.conflicts.size() && i < kConflictRows; ++i) {
        const Conflict& c = plan.conflicts[i];
        t.rows.push_back({c.section, train_id(plan, c.first), train_id(plan, c.second), format_time_of_day(c.from),
                          seconds(c.overlap), conflict_kind(c)});
    }
    html += html_table(t);
    if (plan.conflicts.size() > kConflictRows)
        html += paragraph("... and " + std::to_string(plan.conflicts.size() - kConflictRows) +
                          " more (all: knockon plan --csv or --json).");
    return {"conflicts", "Conflicts", html};
}

ReportSection crossings_section(const PlanResult& plan) {
    const SingleTrackLayout& l = plan.single_track;
    std::string html = paragraph(
        "Single-track stretches: " + std::to_string(l.stretches.size()) +
        ". For each pair of opposing trains that follow each other over a stretch: the crossing place, the "
        "train that waits (it blocks the stretch after the opposing train has released it; at a crossing "
        "proper, where each train comes over the stretch the other leaves by, the one that arrives first) "
        "and the crossing buffer = the waiting train's blocking start of the stretch minus the opposing "
        "train's release of it. A negative buffer is a conflict.");
    for (const CrossingTooShort& c : plan.crossings_too_short)
        html += paragraph("Conflict: " + train_id(plan, c.train) + " (" +
                          svg::number(plan.trains[c.train].run.type->length, 0) + " m) stands at " +
                          l.places[plan.crossings[c.crossing].place].name + " on track " + c.track +
                          " with its tail at km " + svg::number(c.tail / 1000.0, 3) +
                          ", beyond the crossing place's turnouts (km " + svg::number(c.lo / 1000.0, 3) + " to " +
                          svg::number(c.hi / 1000.0, 3) + "): the opposing train cannot pass.");
    for (std::size_t p = 0; p < l.places.size(); ++p) {
        const CrossingPlace& place = l.places[p];
        HtmlTable t;
        std::string tracks;
        for (const CrossingTrack& ct : place.tracks) tracks += (tracks.empty() ? "" : ", ") + ct.track;
        t.caption = place.kind == CrossingPlaceKind::loop
                        ? "Crossings at " + place.name + " (tracks " + tracks + ")"
                        : "Opposing trains at " + place.name + " (" + to_string(place.kind) + ")";
        t.headers = {"meeting", "stretch", "opposing train", "releases", "waiting train", "track", "stop",
                     "blocks", "crossing buffer"};
        t.numeric = {false, false, false, true, false, false, false, true, true};
        for (const Crossing& c : plan.crossings) {
            if (c.place != p) continue;
            t.rows.push_back({c.proper ? "crossing" : "one after the other", l.stretches[c.stretch].name,
                              train_id(plan, c.opposing), format_time_of_day(c.opposing_release),
                              train_id(plan, c.waiting), c.waiting_track.empty() ? "-" : c.waiting_track,
                              c.waiting_stops ? "stop" : "pass", format_time_of_day(c.waiting_blocks),
                              seconds(c.buffer)});
            t.highlight.push_back(c.buffer < 0.0);
        }
        if (!t.rows.empty()) html += html_table(t);
    }
    if (plan.crossings.empty()) html += paragraph("No two opposing trains use any single-track stretch.");
    return {"crossings", "Crossings on single track", html};
}

}  // namespace

std::string html_escape(const std::string& text) { return svg::escape(text); }

std::string html_paragraph(const std::string& text) { return "<p>" + html_escape(text) + "</p>\n"; }

std::string html_figure(const svg::Element& chart, const std::string& caption) {
    return "<figure>\n" + svg::to_string(chart, false) + "<figcaption>" + html_escape(caption) +
           "</figcaption>\n</figure>\n";
}

std::string html_table(const HtmlTable& table) {
    auto numeric = [&](std::size_t i) { return i < table.numeric.size() && table.numeric[i]; };
    std::string out = "<table>\n";
    if (!table.caption.empty()) out += "<caption>" + html_escape(table.caption) + "</caption>\n";
    out += "<thead><tr>";
    for (std::size_t i = 0; i < table.headers.size(); ++i)
        out += std::string(numeric(i) ? "<th class=\"num\">" : "<th>") + html_escape(table.headers[i]) + "</th>";
    out += "</tr></thead>\n<tbody>\n";
    for (std::size_t r = 0; r < table.rows.size(); ++r) {
        const bool warn = r < table.highlight.size() && table.highlight[r];
        out += warn ? "<tr class=\"warn\">" : "<tr>";
        for (std::size_t i = 0; i < table.rows[r].size(); ++i)
            out += std::string(numeric(i) ? "<td class=\"num\">" : "<td>") + html_escape(table.rows[r][i]) + "</td>";
        out += "</tr>\n";
    }
    out += "</tbody>\n</table>\n";
    return out;
}

std::string render_html(const Report& report) {
    std::string out;
    out += "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n";
    out += "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n";
    out += std::string("<meta name=\"generator\" content=\"knockon ") + KNOCKON_VERSION + "\">\n";
    out += "<title>" + html_escape(report.title) + "</title>\n<style>" + kPageCss + "</style>\n</head>\n<body>\n";
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
    if (!report.facts.empty()) {
        out += "<table class=\"facts\">\n<tbody>\n";
        for (const auto& [label, value] : report.facts)
            out += "<tr><th scope=\"row\">" + html_escape(label) + "</th><td>" + html_escape(value) + "</td></tr>\n";
        out += "</tbody>\n</table>\n";
    }
    if (!report.notes.empty()) {
        out += "<ul class=\"notes\">\n";
        for (const std::string& n : report.notes) out += "<li>" + html_escape(n) + "</li>\n";
        out += "</ul>\n";
    }
    if (!report.sections.empty()) {
        out += "<nav><strong>Contents</strong>\n<ol>\n";
        for (const ReportSection& s : report.sections)
            out += "<li><a href=\"#" + html_escape(s.id) + "\">" + html_escape(s.title) + "</a></li>\n";
        out += "</ol>\n</nav>\n";
    }
    out += "</header>\n<main>\n";
    for (const ReportSection& s : report.sections) {
        // Sections holding a chart start a printed page of their own.
        const bool page = s.html.find("<svg") != std::string::npos;
        out += "<section id=\"" + html_escape(s.id) + "\"" + (page ? " class=\"page\"" : "") + ">\n<h2>" +
               html_escape(s.title) + "</h2>\n" + s.html + "</section>\n";
    }
    out += "</main>\n<footer>\n";
    out += std::string("Made by knockon ") + KNOCKON_VERSION + ". ";
    if (!report.caution.empty()) out += html_escape(report.caution);
    out += "\n</footer>\n</body>\n</html>\n";
    return out;
}

Report plan_report(const Scenario& scenario, const PlanResult& plan, const PlanReportOptions& options) {
    const Infrastructure& in = scenario.infrastructure;
    Report r;
    r.title = "Plan report: " + scenario.name;
    r.caution = kSafetyCaution;
    // A timetable the trains cannot keep undermines every figure below: said before them.
    for (const TightStretch& w : plan.tight_stretches) r.warnings.push_back(tight_stretch_text(plan, w));

    std::vector<std::pair<std::string, std::size_t>> per_category;
    for (const std::string& c : train_categories(plan)) {
        std::size_t n = 0;
        for (const TrainPlan& tp : plan.trains) n += tp.run.service->category == c;
        per_category.push_back({c, n});
    }
    std::string trains = std::to_string(plan.trains.size());
    if (!per_category.empty()) {
        trains += " (";
        for (std::size_t i = 0; i < per_category.size(); ++i)
            trains += (i ? ", " : "") + std::to_string(per_category[i].second) + " " + per_category[i].first;
        trains += ")";
    }
    r.facts = {{"scenario", scenario.name},
               {"file", scenario.source_file},
               {"line length", km_text(in.length)},
               {"line type (UIC 406 limits)", to_string(scenario.line_type)},
               {"stations", std::to_string(in.stations.size())},
               {"main signals", std::to_string(in.signals.size())},
               {"train types", std::to_string(scenario.train_types.size())},
               {"trains", trains},
               {"conflicts", std::to_string(plan.conflicts.size() + plan.crossings_too_short.size())},
               {"made by", std::string("knockon ") + KNOCKON_VERSION}};
    if (!options.command_line.empty()) r.facts.push_back({"command", options.command_line});
    r.notes = {kUic406Note,
               "Planned times: trains run at their performance and wait at each stop until the scheduled "
               "departure and the minimum dwell are both over. Times are of the day, HH:MM or HH:MM:SS."};

    r.sections.push_back(time_distance_section(scenario, plan, options));
    r.sections.push_back(capacity_section(plan));
    r.sections.push_back(buffers_section(plan));
    r.sections.push_back(conflicts_section(plan));
    if (!plan.single_track.empty()) r.sections.push_back(crossings_section(plan));
    return r;
}

}  // namespace knockon
