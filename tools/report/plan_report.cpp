// The report of a timetable analysis (plan_report in html_report.hpp): its verdict and views.
#include <algorithm>
#include <cmath>

#include "models/units.hpp"
#include "tools/report/html_report.hpp"
#include "tools/results/plan_output.hpp"
#include "tools/report/plan_report_tables.hpp"
#include "tools/report/svg.hpp"

namespace knockon {

namespace {

constexpr std::size_t kThinnestBuffers = 10;
constexpr std::size_t kConflictRows = 50;   // beyond this the table says how many were left out

std::string seconds(double s) { return std::isfinite(s) ? svg::number(s, 0) + " s" : "-"; }
std::string percent(double share) { return svg::number(share * 100.0, 1) + " %"; }
std::string km_text(double metres) { return svg::number(metres / 1000.0, 1) + " km"; }

// "Main (WRF-OLV-EMR), Branch (OLV-PLC-HTB-QSB)".
std::string corridor_list(const Scenario& scenario) {
    std::string out;
    for (const net::Corridor& c : scenario.network->corridors) {
        std::string stations;
        for (const std::string& st : c.stations) stations += (stations.empty() ? "" : "-") + st;
        out += (out.empty() ? "" : ", ") + c.name + " (" + stations + ")";
    }
    return out;
}

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
    if (!scenario.network) {
        html += figure(time_distance_chart(scenario.infrastructure, plan, w, chart, options.as_run),
                       "Distance runs downwards along the line (chainage in km on the right, stations on the left, "
                       "main signals as ticks); time runs to the right. Pointing at a path, block or conflict "
                       "shows its details.");
        return {"time-distance", "Time-distance diagram", html};
    }
    // A network: one diagram per corridor, each train over the part of its path between the
    // corridor's stations it passes.
    html += paragraph("One diagram per corridor of the network. Distance runs downwards from the corridor's first "
                      "station, measured along the trains' paths; each train is drawn over the part of its path "
                      "between corridor stations it passes, in either direction. At a crossing place a train on "
                      "the place's second track is drawn a few pixels aside, in the place's band, so that two "
                      "trains crossing there read as a crossing.");
    for (const auto& axis : diagram_axes(scenario, plan)) {
        ChartOptions c = chart;
        std::string stations;
        for (const AxisStation& st : axis->stations) stations += (stations.empty() ? "" : "-") + st.id;
        c.title = "Time-distance diagram, corridor " + axis->name + " (" + stations + "), " + svg::format_hhmm(w.from) +
                  "-" + svg::format_hhmm(w.to);
        html += figure(time_distance_chart(*axis, plan, w, c, options.as_run),
                       "Corridor " + axis->name + ": distance along it downwards (km on the right, stations on the "
                       "left, main signals as ticks, left column for trains running down the page); time runs to "
                       "the right. Pointing at a path, block, band or conflict shows its details.");
    }
    return {"time-distance", "Time-distance diagrams", html};
}

// The hour-by-hour profile: a chart of each hour's busiest line section, and a table of every line
// section and direction by hour.
std::string hourly_capacity_html(const PlanResult& plan) {
    if (plan.hourly_capacity.empty()) return "";
    ChartOptions chart;
    chart.title = "Capacity consumption hour by hour (UIC 406 compression of each clock hour)";
    chart.footnote = kUic406Note;
    std::string html = paragraph(
        "Hour by hour: the trains of each clock hour compressed on their own, from the plan's blocking times, "
        "as a share of the hour (occupation time / 60 min), for each line section and direction from its "
        "first train's hour to its last's; the chart shows each hour's highest figure, against the peak-hour "
        "limit.");
    html += figure(hourly_capacity_chart(plan, chart),
                   "Each bar: the line section and direction with the highest consumption in that clock hour "
                   "(named when pointed at). " + std::string(kUic406Note));
    // Columns: every hour any line section has; rows: line sections and directions.
    double h0 = INFINITY, h1 = -INFINITY;
    for (const CapacityFigure& f : plan.hourly_capacity) {
        h0 = std::min(h0, f.from);
        h1 = std::max(h1, f.from);
    }
    HtmlTable t;
    t.caption = "Capacity consumption by clock hour [% of the hour]";
    t.css_class = "compact";
    t.headers = {"line section", "direction"};
    t.numeric = {false, false};
    for (double h = h0; h <= h1; h += 3600.0) {
        t.headers.push_back(svg::format_hhmm(h));
        t.numeric.push_back(true);
    }
    bool over_any = false;
    for (std::size_t i = 0; i < plan.hourly_capacity.size();) {
        const CapacityFigure& first = plan.hourly_capacity[i];
        std::vector<std::string> row = {first.line_section, to_string(first.direction)};
        row.resize(t.headers.size(), "-");
        bool over = false;
        for (; i < plan.hourly_capacity.size() && plan.hourly_capacity[i].line_section == first.line_section &&
               plan.hourly_capacity[i].direction == first.direction;
             ++i) {
            const CapacityFigure& f = plan.hourly_capacity[i];
            const std::size_t col = 2 + static_cast<std::size_t>(std::lround((f.from - h0) / 3600.0));
            const bool above = f.consumption > f.limit;
            row[col] = (above ? std::string(kOverMark) + " " : std::string()) + svg::number(f.consumption * 100.0, 1);
            over = over || above;
        }
        over_any = over_any || over;
        t.rows.push_back(std::move(row));
        t.highlight.push_back(over);
    }
    html += html_table(t);
    html += paragraph(over_any ? std::string("Marked (") + kOverMark + "): above the peak-hour limit of " +
                                     percent(plan.hourly_capacity.front().limit) + "."
                               : "No hour lies above the peak-hour limit of " +
                                     percent(plan.hourly_capacity.front().limit) + ".");
    return html;
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
        html += html_table(t) + paragraph(std::string("Marked rows (") + kOverMark + ", bold) lie above their limit.");
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
    html += hourly_capacity_html(plan);
    return {"capacity", "Capacity consumption", html};
}

ReportSection buffers_section(const PlanResult& plan, const std::vector<Table>& tables) {
    // Same-direction pairs, pairs at junctions, opposing pairs on single-track stretches (their
    // crossing buffer) and links (turnaround, connection and crew buffers), all in one ranking.
    struct Pair {
        const HeadwayPair* same = nullptr;
        const Crossing* opposing = nullptr;
        const LinkPlan* link = nullptr;
        double buffer() const { return same ? same->buffer : opposing ? opposing->buffer : link->buffer(); }
    };
    std::vector<Pair> pairs;
    for (const HeadwayPair& h : plan.headways) pairs.push_back({&h, nullptr, nullptr});
    for (const HeadwayPair& h : plan.junction_headways) pairs.push_back({&h, nullptr, nullptr});
    for (const Crossing& c : plan.crossings) pairs.push_back({nullptr, &c, nullptr});
    for (const LinkPlan& l : plan.links) pairs.push_back({nullptr, nullptr, &l});
    std::stable_sort(pairs.begin(), pairs.end(), [](const Pair& a, const Pair& b) { return a.buffer() < b.buffer(); });
    const std::size_t shown = std::min(pairs.size(), kThinnestBuffers);
    std::string html = paragraph(
        "The " + std::to_string(shown) + " smallest buffers of " + std::to_string(pairs.size()) +
        (plan.links.empty() ? " consecutive train pairs" : " consecutive train pairs and links") +
        ": buffer = scheduled headway - minimum headway at the reference points "
        "(departure or pass at the line section's first station); the critical section is where the "
        "stairways touch at the minimum headway. Opposing pairs on a single-track stretch (direction "
        "\"opposing\") show their crossing buffer (see Crossings)." +
        std::string(plan.junction_headways.empty()
                        ? ""
                        : " Trains of different corridors one after the other over a switch or diamond (direction "
                          "\"junction\") compare their stairways over the sections both block, the scheduled "
                          "headway taken from each head reaching the junction.") +
        std::string(plan.links.empty() ? ""
                                       : " A link (turnaround, connection, crew) shows the time from the earlier "
                                         "train's arrival to the later one's departure as its scheduled headway, "
                                         "its minimum time as the minimum headway, and the difference as its buffer.") +
        " All pairs: knockon plan --csv or --json.");
    HtmlTable t;
    t.caption = plan.links.empty() ? "Thinnest buffers" : "Thinnest buffers, headways and links together";
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
        if (const LinkPlan* l = pairs[i].link) {
            const std::string& at = plan.trains[l->to].run.calls[l->to_call].station;
            t.rows.push_back({at, to_string(l->kind), train_id(plan, l->from), train_id(plan, l->to),
                              seconds(l->departure - l->arrival), seconds(l->min_time), seconds(l->buffer()),
                              std::string(to_string(l->kind)) + " at " + at});
            t.highlight.push_back(l->buffer() < -kLinkTolerance);
            continue;
        }
        const HeadwayPair& h = *pairs[i].same;
        t.rows.push_back({headway_place(h), h.junction.empty() ? to_string(h.direction) : "junction",
                          train_id(plan, h.leader), train_id(plan, h.follower),
                          seconds(h.scheduled_headway), seconds(h.minimum_headway), seconds(h.buffer),
                          h.critical_section});
        t.highlight.push_back(h.buffer < 0.0);
    }
    if (t.rows.empty())
        html += paragraph("No line section has two consecutive trains.");
    else
        html += html_table(t) + paragraph(std::string("Marked rows (") + kOverMark +
                                          ", bold) have a negative buffer: a conflict.");
    if (!plan.junction_headways.empty()) {
        HtmlTable jt = html_table_of(plan_table(tables, "junction_headways"));
        for (const HeadwayPair& h : plan.junction_headways) jt.highlight.push_back(h.buffer < 0.0);
        html += paragraph("Every pair of trains of different corridors one after the other at a junction, as knockon "
                          "plan gives them.") +
                html_table(jt);
    }
    if (!plan.links.empty()) {
        const Table& links = plan_table(tables, "links");
        HtmlTable lt = html_table_of(links);
        for (const LinkPlan& l : plan.links) lt.highlight.push_back(l.buffer() < -kLinkTolerance);
        html += paragraph("Every link of the timetable with its buffer (planned departure minus arrival plus "
                          "minimum time), as knockon plan gives them.") +
                html_table(lt);
    }
    return {"buffers", plan.links.empty() ? "Thinnest buffers" : "Thinnest buffers and links", html};
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

HtmlTable plan_headline(const PlanResult& plan) {
    HtmlTable t;
    t.caption = "The plan's headline figures";
    t.headers = {"figure", "value"};
    t.numeric = {false, false};
    auto add = [&](const std::string& label, const std::string& value, bool mark) {
        t.rows.push_back({label, value});
        t.highlight.push_back(mark);
    };
    const std::size_t conflicts = plan.conflicts.size() + plan.crossings_too_short.size();
    add("plan: conflicts", std::to_string(conflicts), conflicts > 0);
    const HeadwayPair* thinnest = nullptr;
    for (const auto* list : {&plan.headways, &plan.junction_headways})
        for (const HeadwayPair& h : *list)
            if (!thinnest || h.buffer < thinnest->buffer) thinnest = &h;
    if (thinnest)
        add("plan: thinnest headway buffer",
            seconds(thinnest->buffer) + ", " + train_id(plan, thinnest->leader) + " then " +
                train_id(plan, thinnest->follower) +
                (thinnest->junction.empty()
                     ? " on " + thinnest->line_section + " " + to_string(thinnest->direction)
                     : " at " + headway_place(*thinnest)),
            thinnest->buffer < 0.0);
    const LinkPlan* link = nullptr;
    for (const LinkPlan& l : plan.links)
        if (!link || l.buffer() < link->buffer()) link = &l;
    if (link)
        add("plan: thinnest link buffer",
            seconds(link->buffer()) + ", " + to_string(link->kind) + " " + train_id(plan, link->from) + " to " +
                train_id(plan, link->to) + " at " + plan.trains[link->to].run.calls[link->to_call].station,
            link->buffer() < -kLinkTolerance);
    for (const char* window : {"peak hour", "day"}) {
        const CapacityFigure* top = nullptr;
        for (const CapacityFigure& f : plan.capacity)
            if (f.window == window && (!top || f.consumption > top->consumption)) top = &f;
        if (!top) continue;
        add(std::string("plan: highest ") + window + " consumption (UIC 406)",
            percent(top->consumption) + " on " + top->line_section + " " + to_string(top->direction) + ", " +
                svg::format_hhmm(top->from) + "-" + svg::format_hhmm(top->to) + " (limit " + percent(top->limit) + ")",
            top->consumption > top->limit);
    }
    std::size_t hours_over = 0;
    for (const CapacityFigure& f : plan.hourly_capacity) hours_over += f.consumption > f.limit;
    if (!plan.hourly_capacity.empty())
        add("plan: line section hours above the peak-hour limit", std::to_string(hours_over), hours_over > 0);
    add("plan: stretches the timetable allows too little time for", std::to_string(plan.tight_stretches.size()),
        !plan.tight_stretches.empty());
    add("plan: signals giving less warning than a train needs", std::to_string(plan.spacing_warnings.size()),
        !plan.spacing_warnings.empty());
    return t;
}

Report plan_report(const Scenario& scenario, const PlanResult& plan, const PlanReportOptions& options) {
    const Infrastructure& in = scenario.infrastructure;
    const bool network = scenario.network.has_value();
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
    r.facts = {{"scenario", scenario.name}, {"file", scenario.source_file}};
    if (network) {
        const net::Network& n = scenario.network->network;
        r.facts.push_back({"layout", layout_summary(scenario)});
        r.facts.push_back({"line type (UIC 406 limits)", to_string(scenario.line_type)});
        r.facts.push_back({"stations", std::to_string(n.stations.size())});
        r.facts.push_back({"main signals", std::to_string(n.signals.size())});
    } else {
        r.facts.push_back({"line length", km_text(in.length)});
        r.facts.push_back({"line type (UIC 406 limits)", to_string(scenario.line_type)});
        r.facts.push_back({"stations", std::to_string(in.stations.size())});
        r.facts.push_back({"main signals", std::to_string(in.signals.size())});
    }
    r.facts.insert(r.facts.end(), {
               {"train types", std::to_string(scenario.train_types.size())},
               {"trains", trains},
               {"conflicts", std::to_string(plan.conflicts.size() + plan.crossings_too_short.size())},
               {"made by", std::string("knockon ") + KNOCKON_VERSION}});
    if (!options.command_line.empty()) r.facts.push_back({"command", options.command_line});
    r.notes = {kUic406Note,
               "Planned times: trains run at their performance and wait at each stop until the scheduled "
               "departure and the minimum dwell are both over. Times are of the day, HH:MM or HH:MM:SS."};

    const std::vector<Table> tables = plan_tables(scenario, plan);
    r.verdict = {"verdict", "Verdict",
                 paragraph("The timetable analysis in brief: " + std::to_string(plan.trains.size()) + " trains on " +
                           (network ? "a network, reported along its corridors (" + corridor_list(scenario) + ")."
                                    : km_text(in.length) + " of line.")) +
                     html_table(plan_headline(plan))};
    r.sections.push_back(time_distance_section(scenario, plan, options));
    r.sections.push_back(capacity_section(plan));
    r.sections.push_back(buffers_section(plan, tables));
    r.sections.push_back(conflicts_section(plan));
    if (!plan.single_track.empty()) r.sections.push_back(crossings_section(plan));
    r.sections.push_back(running_times_section(tables));
    r.sections.push_back(headway_matrix_section(tables));
    r.sections.push_back(spacing_section(plan, tables));
    return r;
}

}  // namespace knockon
