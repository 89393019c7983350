// The report laid out for the person who decides: the verdict first with the figures the JSON
// gives, the views, the facts about the run last; the plan's reference tables (running times,
// headway matrix, spacing warnings) and the links' buffers as `knockon plan --json` gives them; the
// hour-by-hour capacity profile against a hand computation; the diagram's window on the hour a
// hand-made day lost the most time in; station names that neither overlap nor leave the drawing;
// and one mark for "above the limit", another for "significant".
#include <catch2/catch.hpp>

#include <hdf5.h>

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <fstream>
#include <functional>
#include <map>
#include <optional>
#include <nlohmann/json.hpp>
#include <regex>
#include <string>
#include <tuple>
#include <vector>

#include "models/plan.hpp"
#include "models/units.hpp"
#include "tools/report/as_run.hpp"
#include "tools/report/chart_kit.hpp"
#include "tools/results/hdf5_read.hpp"
#include "tools/report/plan_charts.hpp"
#include "tools/results/results_file.hpp"
#include "tools/read/scenario_reader.hpp"
#include "report_page_support.hpp"
#include "results_test_support.hpp"

using namespace resultstest;
using nlohmann::json;

namespace {

const std::string kSpacing = kSource + "/tests/data/checks/signal_on_fall.yaml";
const std::string kLinks = kSource + "/tests/data/links/double_line_connections.yaml";

using reportpage::rows_of;
using reportpage::section_of;
using reportpage::unescape;

bool has_row(const std::vector<std::vector<std::string>>& rows, const std::vector<std::string>& want) {
    return std::find(rows.begin(), rows.end(), want) != rows.end();
}

// A JSON value as the text tables write it: times HH:MM:SS, durations one decimal, other numbers
// two, null as "-".
std::string as_time(const json& v) { return v.is_null() ? "-" : knockon::format_time_of_day(v.get<double>()); }
std::string fixed(const json& v, int decimals) {
    if (v.is_null()) return "-";
    char buf[64];
    std::snprintf(buf, sizeof buf, "%.*f", decimals, v.get<double>());
    return buf;
}

json plan_json(const std::string& scenario, const TempDir& dir) {
    const Result r = run_knockon("plan " + q(scenario) + " --json", dir);
    INFO(r.err);
    REQUIRE(r.status == 0);
    return json::parse(r.out);
}

std::string report_page(const std::string& input, const TempDir& dir, const std::string& extra = "") {
    const fs::path html = dir.path / "report.html";
    const Result r = run_knockon("report " + q(input) + " -o " + q(html) + extra, dir);
    INFO(r.err);
    REQUIRE(r.status == 0);
    return read_text(html);
}

// The value of the verdict row labelled `label`.
std::string verdict_value(const std::string& page, const std::string& label) {
    for (const auto& row : rows_of(section_of(page, "verdict")))
        if (row.size() == 2 && row[0] == label) return row[1];
    return "(no row " + label + ")";
}

}  // namespace

TEST_CASE("the plan report gives its verdict first and the facts about the run last", "[report][cli]") {
    TempDir dir;
    const json plan = plan_json(kTwoSpeed, dir);
    const std::string page = report_page(kTwoSpeed, dir, " --all");
    check_self_contained(page);
    // Order: the caution, the verdict, the views, then the facts (files, command, version).
    const std::size_t caution = page.find("<div class=\"caution\""), verdict = page.find("<section id=\"verdict\""),
                      diagram = page.find("<section id=\"time-distance\""),
                      facts = page.find("<section id=\"run-facts\""), last_view = page.find("<section id=\"spacing\"");
    REQUIRE(verdict != std::string::npos);
    REQUIRE(facts != std::string::npos);
    CHECK(caution < verdict);
    CHECK(verdict < diagram);
    CHECK(last_view < facts);
    CHECK(page.find("<table class=\"facts\">") > facts);
    CHECK(section_of(page, "run-facts").find("knockon report ") != std::string::npos);
    CHECK(section_of(page, "verdict").find("knockon report ") == std::string::npos);

    // The verdict's figures are the JSON's: conflicts, the thinnest buffer, the highest peak hour.
    const std::size_t conflicts = plan["conflicts"].size() + plan["crossings_too_short"].size();
    REQUIRE(conflicts > 0);   // two_speed_line.yaml: F3 -> F4 95 s apart against 120 s
    CHECK(verdict_value(page, "plan: conflicts") == std::to_string(conflicts));
    const json* thinnest = nullptr;
    for (const json& h : plan["headways"])
        if (!thinnest || h["buffer_s"].get<double>() < (*thinnest)["buffer_s"].get<double>()) thinnest = &h;
    REQUIRE(thinnest);
    CHECK(verdict_value(page, "plan: thinnest headway buffer")
              .rfind(knockon::svg::number((*thinnest)["buffer_s"].get<double>(), 0) + " s, " +
                         (*thinnest)["leader"].get<std::string>() + " then " +
                         (*thinnest)["follower"].get<std::string>(),
                     0) == 0);
    const json* peak = nullptr;
    for (const json& c : plan["capacity"])
        if (c["window"] == "peak hour" && (!peak || c["consumption"].get<double>() > (*peak)["consumption"].get<double>()))
            peak = &c;
    REQUIRE(peak);
    CHECK(verdict_value(page, "plan: highest peak hour consumption (UIC 406)")
              .rfind(knockon::svg::number(100.0 * (*peak)["consumption"].get<double>(), 1) + " % on " +
                         (*peak)["line_section"].get<std::string>(),
                     0) == 0);
    // The conflicts row carries the "above the limit or a conflict" mark.
    CHECK(section_of(page, "verdict").find("<tr class=\"warn\"><td>plan: conflicts</td>") != std::string::npos);
}

TEST_CASE("the plan report lays out the running times headway matrix and spacing warnings of the plan",
          "[report][cli]") {
    // Running times and the matrix of two_speed_line.yaml (two train types), the spacing warning
    // of signal_on_fall.yaml.
    TempDir dir;
    const json plan = plan_json(kTwoSpeed, dir);
    const std::string page = report_page(kTwoSpeed, dir);
    REQUIRE_FALSE(plan["running_times"].empty());
    REQUIRE(plan["headway_matrix"].size() >= 4);

    const auto running = rows_of(section_of(page, "running-times"));
    for (const json& r : plan["running_times"]) {
        INFO(r.dump());
        CHECK(has_row(running, {r["train"], r["type"], r["station"], r["stops"], as_time(r["scheduled_arrival"]),
                                as_time(r["scheduled_departure"]), as_time(r["planned_arrival"]),
                                as_time(r["planned_departure"]), fixed(r["technical_running_s"], 1),
                                fixed(r["scheduled_running_s"], 1), fixed(r["timetabled_running_s"], 1),
                                fixed(r["reserve_s"], 1)}));
    }
    CHECK(running.size() == 1 + plan["running_times"].size());   // and the header

    // The matrix: a row per line section and leader type, a column per follower type.
    const auto matrix = rows_of(section_of(page, "headway-matrix"));
    REQUIRE_FALSE(matrix.empty());
    const std::vector<std::string>& head = matrix.front();
    for (const json& e : plan["headway_matrix"]) {
        INFO(e.dump());
        const auto col = std::find(head.begin(), head.end(), "follower " + e["follower_type"].get<std::string>());
        REQUIRE(col != head.end());
        bool found = false;
        for (const auto& row : matrix)
            if (row.size() == head.size() && row[0] == e["line_section"] && row[1] == e["leader_type"])
                found = row[static_cast<std::size_t>(col - head.begin())] == fixed(e["minimum_headway_s"], 1);
        CHECK(found);
    }

    CHECK(verdict_value(page, "plan: signals giving less warning than a train needs") == "0");
    CHECK(section_of(page, "spacing").find("at least its stopping distance") != std::string::npos);

    TempDir other;
    const json falls = plan_json(kSpacing, other);
    REQUIRE(falls["spacing_warnings"].size() == 1);   // signal_on_fall.yaml: U03 warns too late
    const std::string warned = report_page(kSpacing, other);
    const auto spacing = rows_of(section_of(warned, "spacing"));
    for (const json& w : falls["spacing_warnings"])
        CHECK(has_row(spacing, {w["signal"], w["train"], fixed(w["speed_kmh"], 2), fixed(w["warning_m"], 2),
                                fixed(w["stopping_distance_m"], 2)}));
    CHECK(count_class(section_of(warned, "spacing"), "warn") == falls["spacing_warnings"].size());
    CHECK(verdict_value(warned, "plan: signals giving less warning than a train needs") == "1");
}

TEST_CASE("the report shows the links' buffers beside the headway buffers", "[report][cli]") {
    TempDir dir;
    const json plan = plan_json(kLinks, dir);
    REQUIRE(plan["links"].size() == 2);
    const std::string page = report_page(kLinks, dir);
    const std::string buffers = section_of(page, "buffers");
    CHECK(buffers.find("<h2>Thinnest buffers and links</h2>") != std::string::npos);
    const auto rows = rows_of(buffers);
    double thinnest = INFINITY;
    for (const json& l : plan["links"]) {
        INFO(l.dump());
        CHECK(has_row(rows, {l["kind"], l["from"], l["at"], as_time(l["arrival"]), l["to"], l["departs_from"],
                             as_time(l["departure"]), fixed(l["minimum_s"], 1), fixed(l["max_wait_s"], 1),
                             fixed(l["buffer_s"], 1)}));
        thinnest = std::min(thinnest, l["buffer_s"].get<double>());
    }
    // In the ranking with the headway pairs: scheduled = departure - arrival, minimum = minimum time.
    const json& l0 = plan["links"][0];
    CHECK(has_row(rows, {l0["departs_from"], l0["kind"], l0["from"], l0["to"],
                         knockon::svg::number(l0["departure"].get<double>() - l0["arrival"].get<double>(), 0) + " s",
                         knockon::svg::number(l0["minimum_s"].get<double>(), 0) + " s",
                         knockon::svg::number(l0["buffer_s"].get<double>(), 0) + " s",
                         l0["kind"].get<std::string>() + " at " + l0["departs_from"].get<std::string>()}));
    CHECK(verdict_value(page, "plan: thinnest link buffer").rfind(knockon::svg::number(thinnest, 0) + " s, ", 0) == 0);
}

TEST_CASE("the hourly capacity profile equals a hand computation of UIC 406 occupancy", "[report][cli]") {
    // two_trains.yaml with a third train an hour later: T1 08:00, T2 08:05, T3 09:10 from A, all of
    // one type and stopping pattern, so their stairways are one shape shifted in time.  UIC Code 406
    // (compression): the occupation of a window is the compressed stairways of its trains closed into
    // a cycle, and consumption = occupation / window length.  For trains of one shape the minimum
    // headway h of any pair is the longest blocking time of a section of the line section (the
    // follower may block each section only once the leader has released it), so by hand:
    //   08:00-09:00: two trains, occupation 2h (T1 -> T2, and T2 -> T1 of the next cycle);
    //   09:00-10:00: one train, occupation h (T3 behind itself).
    TempDir dir;
    const fs::path scenario = dir.path / "three_trains.yaml";
    {
        std::ofstream out(scenario);
        out << read_text(kTwoTrains)
            << "    - id: T3\n      type: EMU10\n      category: stopping\n      direction: up\n      calls:\n"
               "        - {station: A, dep: \"09:10\"}\n        - {station: B}\n        - {station: C}\n";
    }
    const knockon::Scenario s = knockon::read_scenario(scenario.string());
    const knockon::PlanResult plan = knockon::make_plan(s);
    REQUIRE(plan.trains.size() == 3);
    // h for line section A-B by hand from T1's blocking times of the detection sections with any
    // part between A (0.5 km) and B (5 km).
    const double a = 500.0, b = 5000.0;
    double h = 0.0;
    for (const knockon::SectionBlocking& sb : plan.trains[0].stairway.sections)
        if (std::min(sb.x_hi, b) - std::max(sb.x_lo, a) > 1e-6) h = std::max(h, sb.end - sb.start);
    REQUIRE(h > 60.0);
    // The program's figures, through plan --json and the report.
    const json j = plan_json(scenario.string(), dir);
    std::vector<const json*> ab;
    for (const json& f : j["capacity_by_hour"])
        if (f["line_section"] == "A-B") ab.push_back(&f);
    REQUIRE(ab.size() == 2);
    CHECK((*ab[0])["from"].get<double>() == 8 * 3600.0);
    CHECK((*ab[0])["trains"].get<double>() == 2);
    CHECK((*ab[0])["occupation_s"].get<double>() == Approx(2 * h).margin(0.01));
    CHECK((*ab[0])["consumption"].get<double>() == Approx(2 * h / 3600.0).margin(1e-6));
    CHECK((*ab[1])["from"].get<double>() == 9 * 3600.0);
    CHECK((*ab[1])["trains"].get<double>() == 1);
    CHECK((*ab[1])["consumption"].get<double>() == Approx(h / 3600.0).margin(1e-6));
    // The report's table: a row for A-B up with the two hours, per cent of the hour.
    const std::string page = report_page(scenario.string(), dir);
    const auto rows = rows_of(section_of(page, "capacity"));
    const auto pct = [](double share) { return knockon::svg::number(100.0 * share, 1); };   // [% of the hour]
    CHECK(has_row(rows, {"A-B", "up", pct((*ab[0])["consumption"].get<double>()), pct((*ab[1])["consumption"].get<double>())}));
    CHECK(has_row(rows, {"A-B", "up", pct(2 * h / 3600.0), pct(h / 3600.0)}));
    // The chart: one bar per clock hour with trains (08 and 09), and the limit.
    const std::string chart = knockon::svg::to_string(knockon::hourly_capacity_chart(plan), false);
    CHECK(count_class(chart, "hour-bar") == 2);
    CHECK(count_class(chart, "cap-limit") == 1);
    // The same chart on its own through plot.
    const fs::path svg = dir.path / "hourly.svg";
    const Result p = run_knockon("plot " + q(scenario) + " --chart hourly-capacity --svg " + q(svg), dir);
    INFO(p.err);
    REQUIRE(p.status == 0);
    CHECK(count_class(read_text(svg), "hour-bar") == 2);
}

TEST_CASE("the diagram opens on the hour a hand-made day lost the most time in", "[report]") {
    // A day by hand: knock-on of 100 s at 07:40, 150 s at 08:10 and 80 s at 08:50 (departures), and
    // 200 s at a terminus reached at 09:30 (no departure: its arrival counts).  Per hour: 07 -> 100,
    // 08 -> 230, 09 -> 200: the 08:00-09:00 hour (common practice, no source: a sum per clock hour).
    knockon::SimResult day;
    const auto record = [&](double arrival, double departure, double knock_on) {
        knockon::TimingRecord r;
        r.arrival = arrival;
        r.departure = departure;
        r.knock_on = knock_on;
        day.timing.push_back(r);
    };
    record(7 * 3600.0 + 39 * 60.0, 7 * 3600.0 + 40 * 60.0, 100.0);
    record(8 * 3600.0 + 10 * 60.0, 8 * 3600.0 + 10 * 60.0, 150.0);
    record(8 * 3600.0 + 49 * 60.0, 8 * 3600.0 + 50 * 60.0, 80.0);
    record(9 * 3600.0 + 30 * 60.0, NAN, 200.0);
    record(6 * 3600.0, 6 * 3600.0, 0.0);
    const std::optional<knockon::LossHour> worst = knockon::worst_knock_on_hour(day);
    REQUIRE(worst);
    CHECK(worst->window.from == 8 * 3600.0);
    CHECK(worst->window.to == 9 * 3600.0);
    CHECK(worst->knock_on == Approx(230.0));
    // A day without knock-on has no such hour, and the window falls back on the busiest hour.
    knockon::SimResult calm;
    CHECK_FALSE(knockon::worst_knock_on_hour(calm));

    const knockon::Scenario s = knockon::read_scenario(kTwoTrains);
    const knockon::PlanResult plan = knockon::make_plan(s);
    std::string why;
    knockon::WindowRequest request;
    request.worst = worst;
    knockon::TimeWindow w = knockon::choose_window(plan, request, &why);
    CHECK(w.from == 8 * 3600.0);
    CHECK(why.find("lost the most time to knock-on delay (3.8 min") != std::string::npos);
    request.worst = knockon::LossHour{{10 * 3600.0, 11 * 3600.0}, 0.0};   // nothing lost: the busiest hour
    w = knockon::choose_window(plan, request, &why);
    CHECK(why.find("busiest clock hour") != std::string::npos);
    request.from = 6 * 3600.0;   // asked for: as asked
    request.worst = worst;
    CHECK(knockon::choose_window(plan, request, &why).from == 6 * 3600.0);
}

TEST_CASE("the report of a day opens its diagram on the day's worst hour", "[report][cli]") {
    // delayed_line.yaml: S-0710 stands 4 minutes longer at B, and S-0715 behind it is held: the
    // day's knock-on lies in the 07 hour, which the report says and draws.
    TempDir dir;
    const fs::path day = dir.path / "day.h5";
    REQUIRE(run_knockon("simulate " + q(kDelayedLine) + " --delay S-0710:dwell@B:4 --out " + q(day), dir).status == 0);
    const fs::path html = dir.path / "day.html";
    const Result r = run_knockon("report " + q(day) + " -o " + q(html), dir);
    INFO(r.err);
    REQUIRE(r.status == 0);
    CHECK(r.out.find("time-distance window 07:00-08:00") != std::string::npos);
    CHECK(read_text(html).find("the hour in which the day drawn lost the most time to knock-on delay") !=
          std::string::npos);
}

TEST_CASE("station names neither overlap nor leave the drawing", "[report]") {
    // Labels moved apart where wanted closer than the gap, in order, within the bounds.
    const std::vector<double> at = knockon::spread_labels({100.0, 104.0, 300.0, 106.0}, 13.0, 0.0, 500.0);
    REQUIRE(at.size() == 4);
    CHECK(at[0] == Approx(100.0));
    CHECK(at[1] == Approx(113.0));
    CHECK(at[3] == Approx(126.0));
    CHECK(at[2] == Approx(300.0));
    // Crowded at the bottom: pulled back up inside the bound.
    const std::vector<double> low = knockon::spread_labels({495.0, 498.0, 499.0}, 13.0, 0.0, 500.0);
    CHECK(low[2] == Approx(500.0));
    CHECK(low[1] == Approx(487.0));
    CHECK(low[0] == Approx(474.0));

    // two_trains.yaml drawn with A and B 100 m apart and long names: the labels keep a line apart
    // and start inside the drawing.
    knockon::Scenario s = knockon::read_scenario(kTwoTrains);
    const knockon::PlanResult plan = knockon::make_plan(s);
    s.infrastructure.stations[0].name = "Aston Fieldend Lower Junction North Sidings";
    s.infrastructure.stations[1].name = "Brimwell Lock and Quayside";
    s.infrastructure.stations[1].at = 600.0;
    const std::string svg =
        knockon::svg::to_string(knockon::time_distance_chart(s.infrastructure, plan, {7 * 3600.0, 9 * 3600.0}), false);
    static const std::regex label(R"rx(<text x="([-0-9.]+)" y="([-0-9.]+)" text-anchor="end" class="station-label">([^<]*)<)rx");
    std::vector<double> ys;
    for (auto it = std::sregex_iterator(svg.begin(), svg.end(), label); it != std::sregex_iterator(); ++it) {
        const double x = std::stod((*it)[1].str());
        ys.push_back(std::stod((*it)[2].str()));
        // Bold 11 px text, at most 0.65 em a character (DejaVu Sans Bold's widest lower-case average).
        CHECK(x - 0.65 * 11.0 * static_cast<double>((*it)[3].str().size()) >= 0.0);
    }
    REQUIRE(ys.size() == 3);
    std::sort(ys.begin(), ys.end());
    CHECK(ys[1] - ys[0] >= 13.0 - 1e-9);
    CHECK(ys[2] - ys[1] >= 13.0 - 1e-9);
    CHECK(count_class(svg, "label-leader") >= 1);
}

TEST_CASE("above the limit and significant have a mark each and the legend shows no made-up figure",
          "[report][cli]") {
    // The capacity legend's sample of a bold value is the mark, not a number.
    const knockon::Scenario s = knockon::read_scenario(kTwoTrains);
    const knockon::PlanResult plan = knockon::make_plan(s);
    const std::string cap = knockon::svg::to_string(knockon::capacity_chart(plan), false);
    const std::string legend = cap.substr(cap.find("class=\"legend\""));
    CHECK_FALSE(std::regex_search(legend, std::regex(R"(>[0-9.]+ %<)")));
    CHECK(legend.find(std::string(">") + knockon::kOverMark + "<") != std::string::npos);
    CHECK(std::string(knockon::kOverMark) != knockon::kSignificantMark);

    // A comparison: the differences whose interval excludes 0 (from compare --json) are the rows
    // marked significant, none marked as above a limit.
    TempDir dir;
    const fs::path scenario = write_variant_fixture(dir);
    const fs::path cmp = dir.path / "cmp.h5";
    const Result c = run_knockon("compare " + q(scenario) + " --replications 6 --json --out " + q(cmp), dir);
    INFO(c.err);
    REQUIRE(c.status == 0);
    std::size_t significant = 0;
    std::function<void(const json&)> walk = [&](const json& v) {
        if (v.is_object() && v.contains("ci95_lower") && v["ci95_lower"].is_number() && v["ci95_upper"].is_number())
            significant += v["ci95_lower"].get<double>() > 0.0 || v["ci95_upper"].get<double>() < 0.0;
        if (v.is_structured())
            for (const json& x : v) walk(x);
    };
    const json doc = json::parse(c.out);
    for (const json& variant : doc["variants"])
        if (variant.contains("difference") && variant["difference"].is_object()) walk(variant["difference"]);
    REQUIRE(significant > 0);   // slow_release adds knock-on beyond chance
    const std::string page = report_page(cmp.string(), dir);
    const std::string variants = section_of(page, "variants");
    CHECK(count_class(variants, "signif") == significant);
    CHECK(count_class(variants, "warn") == 0);
    CHECK(page.find("tr.signif td:first-child::before { content: \"\\25C6") != std::string::npos);
}

TEST_CASE("the verdict of a study gives the JSON's figures and names the days that ended in deadlock",
          "[report][cli]") {
    // single_line_crossings.yaml under first come first served deadlocks on some days (accepted).
    TempDir dir;
    const std::string crossings = kSource + "/tests/data/study/single_line_crossings.yaml";
    const fs::path h5 = dir.path / "study.h5";
    const Result r = run_knockon("simulate " + q(crossings) + " --replications 40 --order first-come --json "
                                 "--allow-deadlock --out " + q(h5),
                                 dir);
    INFO(r.err);
    REQUIRE(r.status == 0);
    const json j = json::parse(r.out);
    const std::string page = report_page(h5.string(), dir);
    const std::string verdict = section_of(page, "verdict");
    // The deadlocked days: the count from the JSON, the replication numbers from the file's flags.
    const std::size_t deadlocked = j["study"]["deadlocked_days"].get<std::size_t>();
    REQUIRE(deadlocked > 0);
    CHECK(verdict_value(page, "days that ended in deadlock") ==
          std::to_string(deadlocked) + " of " + std::to_string(j["study"]["replications"].get<int>()));
    const knockon::h5::InputFile f(h5.string());
    const std::vector<double> flags = f.number_column("/study/per_day", "deadlocked");
    std::string days;
    std::size_t named = 0;
    for (std::size_t k = 0; k < flags.size(); ++k)
        if (flags[k] != 0.0 && named++ < 20) days += (days.empty() ? "" : ", ") + std::to_string(k);
    CHECK(named == deadlocked);
    CHECK(verdict.find("Days that ended in deadlock (replication numbers): " + days) != std::string::npos);
    // Knock-on per day: mean and 95 % half-width as the JSON gives them.
    const json& k = j["per_day"]["total_knock_on_s"];
    char want[64];
    std::snprintf(want, sizeof want, "%.2f \u00B1 %.2f min", k["mean"].get<double>() / 60.0,
                  k["ci95_half_width"].get<double>() / 60.0);
    CHECK(verdict_value(page, "knock-on delay") == want);
    // The two lists have their places, filled from the attribution of the complete days: "not
    // given" exactly where the JSON has no source or no buffer.
    CHECK(verdict.find("<div id=\"top-sources\">") != std::string::npos);
    CHECK(verdict.find("<div id=\"top-buffers\">") != std::string::npos);
    CHECK(count_class(verdict, "not-given") ==
          (j["attribution"]["sources"].empty() ? 1u : 0u) + (j["attribution"]["buffers"].empty() ? 1u : 0u));
    // The deadlock alert stays above the verdict.
    CHECK(page.find("role=\"alert\"") < page.find("<section id=\"verdict\""));
}

namespace {

// A source as the text output names it, from its JSON record (kind, train, place, section).
std::string source_words(const json& s) {
    const std::string kind = s["kind"].get<std::string>();
    const auto field = [&](const char* k) { return s.contains(k) ? s[k].get<std::string>() : std::string(); };
    if (kind == "entry") return field("train") + " late start or entry at " + field("place");
    if (kind == "dwell") return field("train") + " long dwell at " + field("place");
    if (kind == "running") return field("train") + " slow run from " + field("place");
    if (kind == "disruption") return "section " + field("section") + " out of use";
    if (kind == "dispatch") return "the dispatcher";
    if (kind == "timetable") return "the timetable itself (holder on time)";
    return "not recorded";
}

// Mean ± 95 % half-width in minutes, two decimals, as the JSON estimate gives them.
std::string minutes_ci(const json& e) {
    char buf[64];
    std::snprintf(buf, sizeof buf, "%.2f \u00B1 %.2f min", e["mean"].get<double>() / 60.0,
                  e["ci95_half_width"].get<double>() / 60.0);
    return buf;
}

// The markup of <div id="ID"> up to its end.
std::string div_of(const std::string& html, const std::string& id) {
    const std::size_t a = html.find("<div id=\"" + id + "\"");
    if (a == std::string::npos) return "";
    return html.substr(a, html.find("</div>", a) - a);
}

}  // namespace

TEST_CASE("the verdict's top sources and buffers and the ranking of sources equal the study's JSON attribution",
          "[report][cli]") {
    TempDir dir;
    const fs::path h5 = dir.path / "study.h5";
    const Result r = run_knockon("simulate " + q(kSource + "/scenarios/demo.yaml") + " --replications 20 --json --out " +
                                     q(h5),
                                 dir);
    INFO(r.err);
    REQUIRE(r.status == 0);
    const json a = json::parse(r.out)["attribution"];
    const json& sources = a["sources"];
    const json& buffers = a["buffers"];
    // The demo's 20 days have knock-on from more than three sources over more than three buffers.
    REQUIRE(sources.size() > 3);
    REQUIRE(buffers.size() > 3);
    const std::string page = report_page(h5.string(), dir);
    const std::string verdict = section_of(page, "verdict");
    CHECK(count_class(verdict, "not-given") == 0);

    // The verdict's lists: the first three of the JSON's, in its order, with their figures.
    const auto top_sources = rows_of(div_of(verdict, "top-sources"));
    REQUIRE(top_sources.size() == 4);   // the header and three rows
    for (std::size_t i = 0; i < 3; ++i)
        CHECK(top_sources[i + 1] == std::vector<std::string>{std::to_string(i + 1), source_words(sources[i]),
                                                            minutes_ci(sources[i]["damage_s"])});
    const auto top_buffers = rows_of(div_of(verdict, "top-buffers"));
    REQUIRE(top_buffers.size() == 4);
    for (std::size_t i = 0; i < 3; ++i)
        CHECK(top_buffers[i + 1] ==
              std::vector<std::string>{std::to_string(i + 1),
                                       buffers[i]["leader"].get<std::string>() + " -> " +
                                           buffers[i]["follower"].get<std::string>(),
                                       minutes_ci(buffers[i]["knock_on_s"])});
    // The largest first (the JSON's order is the ranking; common practice, no source).
    CHECK(sources[0]["damage_s"]["mean"].get<double>() >= sources[1]["damage_s"]["mean"].get<double>());

    // The ranking across days: every source the JSON has (up to the table's 30 rows), in its order,
    // with its mean, half-width and 95 % interval.
    const auto ranking = rows_of(section_of(page, "knock-on-sources"));
    REQUIRE(!ranking.empty());
    CHECK(ranking[0] == std::vector<std::string>{"rank", "source", "kind", "knock-on caused per day", "95 % interval"});
    const std::size_t shown = std::min<std::size_t>(30, sources.size());
    for (std::size_t i = 0; i < shown; ++i) {
        const json& d = sources[i]["damage_s"];
        char interval[64];
        std::snprintf(interval, sizeof interval, "%.2f to %.2f min", d["ci95_lower"].get<double>() / 60.0,
                      d["ci95_upper"].get<double>() / 60.0);
        INFO("rank " << i + 1);
        REQUIRE(i + 1 < ranking.size());
        CHECK(ranking[i + 1] == std::vector<std::string>{std::to_string(i + 1), source_words(sources[i]),
                                                        sources[i]["kind"].get<std::string>(), minutes_ci(d),
                                                        interval});
    }
    if (sources.size() > 30)
        CHECK(section_of(page, "knock-on-sources").find(std::to_string(sources.size() - 30) + " more in the results file") !=
              std::string::npos);
    // The buffers of the ranking's buffer table, in the JSON's order.
    for (std::size_t i = 0; i < std::min<std::size_t>(30, buffers.size()); ++i)
        CHECK(has_row(ranking, {"buffer",
                                buffers[i]["leader"].get<std::string>() + " -> " + buffers[i]["follower"].get<std::string>(),
                                minutes_ci(buffers[i]["knock_on_s"])}));
}

TEST_CASE("a study file without an attribution of knock-on says not given in both lists", "[report][cli]") {
    // A study file as knockon of schema 7 wrote it: the same tables, read without attribution.
    TempDir dir;
    const fs::path h5 = dir.path / "study.h5";
    const Result r = run_knockon("simulate " + q(kSource + "/scenarios/demo.yaml") + " --replications 5 --out " + q(h5), dir);
    INFO(r.err);
    REQUIRE(r.status == 0);
    {
        const hid_t file = H5Fopen(h5.string().c_str(), H5F_ACC_RDWR, H5P_DEFAULT);
        REQUIRE(file >= 0);
        const hid_t attr = H5Aopen(file, "schema_version", H5P_DEFAULT);
        REQUIRE(attr >= 0);
        const int seven = 7;
        CHECK(H5Awrite(attr, H5T_NATIVE_INT, &seven) >= 0);
        H5Aclose(attr);
        H5Fclose(file);
    }
    const std::string page = report_page(h5.string(), dir);
    const std::string verdict = section_of(page, "verdict");
    CHECK(count_class(verdict, "not-given") == 2);
    CHECK(div_of(verdict, "top-sources").find("holds no attribution of knock-on delay") != std::string::npos);
    CHECK(div_of(verdict, "top-buffers").find("holds no attribution of knock-on delay") != std::string::npos);
    CHECK(rows_of(div_of(verdict, "top-sources")).empty());
    // No ranking is laid out where the file has none.
    CHECK(section_of(page, "knock-on-sources").empty());
}

TEST_CASE("the verdict of a day file lists the day's top sources of knock-on as its JSON gives them",
          "[report][cli]") {
    TempDir dir;
    const fs::path h5 = dir.path / "day.h5";
    const Result r = run_knockon("simulate " + q(kSource + "/scenarios/demo.yaml") +
                                     " --delay SU-0700:entry:8 --delay FU-0708:dwell@HBT:4 --delay SD-1710:entry:12"
                                     " --json --out " + q(h5),
                                 dir);
    INFO(r.err);
    REQUIRE(r.status == 0);
    // The JSON's sources, largest damage first (ties in the JSON's order).
    const json doc = json::parse(r.out);
    std::vector<json> sources;
    for (const json& s : doc["attribution"]["sources"])
        if (s["damage_s"].get<double>() > 0.0) sources.push_back(s);
    std::stable_sort(sources.begin(), sources.end(), [](const json& a, const json& b) {
        return a["damage_s"].get<double>() > b["damage_s"].get<double>();
    });
    REQUIRE(sources.size() >= 3);   // three late trains on the demo pass knock-on on
    const std::string verdict = section_of(report_page(h5.string(), dir), "verdict");
    const auto top = rows_of(div_of(verdict, "top-sources"));
    REQUIRE(top.size() == 4);
    CHECK(top[0] == std::vector<std::string>{"", "source", "knock-on caused that day"});
    for (std::size_t i = 0; i < 3; ++i)
        CHECK(top[i + 1] == std::vector<std::string>{std::to_string(i + 1), source_words(sources[i]),
                                                    fixed(sources[i]["damage_s"].get<double>() / 60.0, 1) + " min"});
    // A day file holds no knock-on per buffer: that list says so.
    CHECK(count_class(verdict, "not-given") == 1);
    CHECK(div_of(verdict, "top-buffers").find("a day file holds no knock-on per buffer") != std::string::npos);
}

TEST_CASE("the verdict of a comparison lists each variant's top sources and buffers as the file holds them",
          "[report][cli]") {
    TempDir dir;
    const fs::path h5 = dir.path / "cmp.h5";
    const Result r = run_knockon("compare " + q(kSource + "/scenarios/demo.yaml") +
                                     " --variants base,shorter_blocks --replications 12 --out " + q(h5),
                                 dir);
    INFO(r.err);
    REQUIRE(r.status == 0);
    const knockon::ResultsFile file = knockon::read_results(h5.string());
    REQUIRE(file.variants.size() == 2);
    const std::string verdict = section_of(report_page(h5.string(), dir), "verdict");
    CHECK(count_class(verdict, "not-given") == 0);
    for (const knockon::VariantFigures& v : file.variants) {
        INFO("variant " << v.name);
        REQUIRE(v.study.attribution);
        const knockon::StoredAttribution& a = *v.study.attribution;
        // The file's figures as the JSON would give them (mean and half-width in seconds), its
        // sources in its order (the largest damage first), its buffers in its order.
        auto estimate = [](const knockon::Estimate& e) {
            return json{{"mean", e.mean}, {"ci95_half_width", e.half_width}};
        };
        std::vector<std::vector<std::string>> sources, buffers;
        for (const knockon::StoredAttribution::Source& s : a.sources) {
            json j = {{"kind", s.kind}, {"train", s.train}, {"place", s.place}, {"section", s.section}};
            sources.push_back({std::to_string(sources.size() + 1), source_words(j), minutes_ci(estimate(s.damage))});
            if (sources.size() == 3) break;
        }
        for (const knockon::StoredAttribution::Through& t : a.through) {
            if (t.kind != "buffer") continue;
            buffers.push_back({std::to_string(buffers.size() + 1), t.leader + " -> " + t.follower,
                               minutes_ci(estimate(t.knock_on))});
            if (buffers.size() == 3) break;
        }
        REQUIRE(sources.size() == 3);   // the demo's 12 days have knock-on from many sources
        REQUIRE(buffers.size() == 3);
        const auto top_sources = rows_of(div_of(verdict, "top-sources-" + v.name));
        REQUIRE(top_sources.size() == 4);   // the header and three rows
        CHECK(top_sources[0] == std::vector<std::string>{"", "source", "knock-on per day"});
        for (std::size_t i = 0; i < 3; ++i) CHECK(top_sources[i + 1] == sources[i]);
        const auto top_buffers = rows_of(div_of(verdict, "top-buffers-" + v.name));
        REQUIRE(top_buffers.size() == 4);
        for (std::size_t i = 0; i < 3; ++i) CHECK(top_buffers[i + 1] == buffers[i]);
        CHECK(a.sources[0].damage.mean >= a.sources[1].damage.mean);   // the largest first (common practice, no source)
        CHECK(verdict.find("Top three sources of knock-on delay: " + v.name) != std::string::npos);
    }
}

TEST_CASE("the traced day's three largest delay trees are drawn as the day's JSON attribution edges give them",
          "[report][cli]") {
    TempDir dir;
    const fs::path h5 = dir.path / "day.h5";
    const Result r = run_knockon("simulate " + q(kSource + "/scenarios/demo.yaml") +
                                     " --delay SU-0700:entry:8 --delay FU-0708:dwell@HBT:4 --delay SD-1710:entry:12"
                                     " --json --out " + q(h5),
                                 dir);
    INFO(r.err);
    REQUIRE(r.status == 0);
    const json doc = json::parse(r.out);
    // Trees by all the knock-on their source caused, largest first (the lower source number on a
    // tie); what passed from train to train in each: edges of one causing train, receiving train
    // and place, and cause, summed (our own rule, README "Reports of results").
    std::map<std::uint32_t, double> damage;
    for (const json& e : doc["attribution"]["edges"]) damage[e["source"].get<std::uint32_t>()] += e["seconds"].get<double>();
    std::vector<std::pair<std::uint32_t, double>> ranked(damage.begin(), damage.end());
    std::stable_sort(ranked.begin(), ranked.end(), [](const auto& a, const auto& b) { return a.second > b.second; });
    REQUIRE(ranked.size() >= 3);   // three late trains, each passing knock-on on
    using Key = std::tuple<std::size_t, std::string, std::string, std::string, std::string>;   // tree, from, to, place, cause
    std::map<Key, double> want;
    for (std::size_t k = 0; k < 3; ++k)
        for (const json& e : doc["attribution"]["edges"])
            if (e["source"].get<std::uint32_t>() == ranked[k].first && e.contains("from_train"))
                want[{k + 1, e["from_train"].get<std::string>(), e["to_train"].get<std::string>(),
                      e["place"].get<std::string>(), e["cause"].get<std::string>()}] += e["seconds"].get<double>();
    REQUIRE(!want.empty());

    // The whole day in the window, so that every arrow is drawn.
    const std::string diagram = section_of(report_page(h5.string(), dir, " --all"), "time-distance");
    static const std::regex arrow(
        R"re(<line [^>]*class="tree-arrow tree-(\d)" data-tree="\d" data-from="([^"]*)" data-to="([^"]*)" data-place="([^"]*)" data-cause="([^"]*)" data-seconds="([^"]*)")re");
    std::map<Key, double> drawn;
    std::size_t arrows = 0;
    for (auto m = std::sregex_iterator(diagram.begin(), diagram.end(), arrow); m != std::sregex_iterator(); ++m) {
        ++arrows;
        drawn[{std::stoul((*m)[1].str()), (*m)[2].str(), (*m)[3].str(), (*m)[4].str(), (*m)[5].str()}] +=
            std::stod((*m)[6].str());
    }
    CHECK(arrows == want.size());   // one arrow per causing train, delayed train and place
    CHECK(count_class(diagram, "tree-head") == arrows + 3);   // a head per arrow and per legend entry
    REQUIRE(drawn.size() == want.size());
    for (const auto& [key, seconds] : want) {
        INFO("tree " << std::get<0>(key) << " " << std::get<1>(key) << " -> " << std::get<2>(key) << " at "
                     << std::get<3>(key));
        REQUIRE(drawn.count(key));
        CHECK(drawn[key] == Approx(seconds).margin(1e-3));
    }
    // The legend names each tree's source and all its knock-on, largest first.
    for (std::size_t k = 0; k < 3; ++k) {
        const json* source = nullptr;
        for (const json& s : doc["attribution"]["sources"])
            if (s["id"].get<std::uint32_t>() == ranked[k].first) source = &s;
        REQUIRE(source);
        char minutes[32];
        std::snprintf(minutes, sizeof minutes, "%.1f", ranked[k].second / 60.0);
        // Drawings drop a trailing zero (svg::number): 11.95 min is drawn "12".
        std::string drawn_minutes = minutes;
        if (drawn_minutes.size() > 2 && drawn_minutes.compare(drawn_minutes.size() - 2, 2, ".0") == 0)
            drawn_minutes.resize(drawn_minutes.size() - 2);
        CHECK(unescape(diagram).find("delay tree " + std::to_string(k + 1) + ": " + source_words(*source) + ", " +
                                     drawn_minutes + " min of knock-on") != std::string::npos);
    }
}

TEST_CASE("a study's traced day is drawn with its delay trees", "[report][cli]") {
    // A traced day keeps edges of sources that caused no knock-on (0 s), which no source row
    // names: the report reads them and draws the trees that did cause some.
    TempDir dir;
    const fs::path h5 = dir.path / "study.h5";
    const Result r = run_knockon("simulate " + q(kSource + "/scenarios/demo.yaml") +
                                     " --replications 8 --traces sample:2 --out " + q(h5),
                                 dir);
    INFO(r.err);
    REQUIRE(r.status == 0);
    const std::string diagram = section_of(report_page(h5.string(), dir, " --all"), "time-distance");
    CHECK(count_class(diagram, "tree-arrow") > 0);
    CHECK(diagram.find("delay tree 1: ") != std::string::npos);
}
