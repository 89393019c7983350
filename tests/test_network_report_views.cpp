// The results report of a day on the network demo (scenarios/junction_branch.yaml): the day's
// largest delay trees drawn on the corridor diagrams, held against the day's JSON attribution
// edges, and the signals trains stood at named with segment, heading and km from the segment's
// kilometre posts, held against hand readings of the demo file.
#include <catch2/catch.hpp>

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <map>
#include <nlohmann/json.hpp>
#include <regex>
#include <set>
#include <string>
#include <tuple>
#include <utility>
#include <vector>

#include "report_page_support.hpp"
#include "results_test_support.hpp"
#include "tools/read/scenario_reader.hpp"

using namespace resultstest;
using namespace reportpage;
using nlohmann::json;

namespace {

const std::string kJunction = kSource + "/scenarios/junction_branch.yaml";

// A day with knock-on along both corridors and across them: UP-0631 entering 29 min late runs
// just ahead of UP-0701 (Main); BR-0716 20 min late holds its own return BR-0716.2 at Quenby Sands
// (Branch) and, through the link, UP-0801 at Orlen Vale; DN-0648 6 min late holds BR-0616.2 coming
// off the branch at Orlen Vale.
const char* kDelays = " --delay BR-0716:entry:20 --delay UP-0631:entry:29 --delay DN-0648:entry:6";

struct Day {
    json doc;
    std::string page;
};

Day network_day(const TempDir& dir) {
    const fs::path h5 = dir.path / "day.h5", html = dir.path / "day.html";
    Result r = run_knockon("simulate " + q(kJunction) + kDelays + " --json --out " + q(h5), dir);
    INFO(r.err);
    REQUIRE(r.status == 0);
    Day d{json::parse(r.out), ""};
    r = run_knockon("report " + q(h5) + " --all -o " + q(html), dir);
    INFO(r.err);
    REQUIRE(r.status == 0);
    d.page = read_text(html);
    return d;
}

// Each corridor diagram of the page: its stations (from the title) and its markup.
struct Diagram {
    std::string name;
    std::set<std::string> stations;
    std::string svg;
};

std::vector<Diagram> corridor_diagrams(const std::string& page) {
    const std::string sec = section_of(page, "time-distance");
    static const std::regex title(R"(Time-distance diagram, corridor (\w+) \(([A-Z-]+)\))");
    std::vector<Diagram> out;
    for (std::size_t a = sec.find("<svg"); a != std::string::npos; a = sec.find("<svg", a + 1)) {
        const std::string svg = sec.substr(a, sec.find("</svg>", a) - a);
        std::smatch m;
        if (!std::regex_search(svg, m, title)) continue;
        Diagram d{m[1].str(), {}, svg};
        const std::string list = m[2].str();
        for (std::size_t p = 0; p <= list.size();) {
            const std::size_t e = std::min(list.find('-', p), list.size());
            d.stations.insert(list.substr(p, e - p));
            p = e + 1;
        }
        out.push_back(std::move(d));
    }
    return out;
}

}  // namespace

TEST_CASE("a network day's delay trees are drawn on each corridor where the diagram shows both trains",
          "[report][cli][network]") {
    TempDir dir;
    const Day day = network_day(dir);
    // Trees by all the knock-on their source caused, largest first; an arrow per causing train,
    // delayed train, place and cause (our own rule, README "Reports of results").
    std::map<std::uint32_t, double> damage;
    for (const json& e : day.doc["attribution"]["edges"]) damage[e["source"].get<std::uint32_t>()] += e["seconds"].get<double>();
    std::vector<std::pair<std::uint32_t, double>> ranked(damage.begin(), damage.end());
    std::stable_sort(ranked.begin(), ranked.end(), [](const auto& a, const auto& b) { return a.second > b.second; });
    REQUIRE(ranked.size() >= 3);
    using Key = std::tuple<std::size_t, std::string, std::string, std::string, std::string>;   // tree, from, to, place, cause
    std::map<Key, double> want;
    for (std::size_t k = 0; k < 3; ++k)
        for (const json& e : day.doc["attribution"]["edges"])
            if (e["source"].get<std::uint32_t>() == ranked[k].first && e.contains("from_train"))
                want[{k + 1, e["from_train"].get<std::string>(), e["to_train"].get<std::string>(),
                      e["place"].get<std::string>(), e["cause"].get<std::string>()}] += e["seconds"].get<double>();

    const std::vector<Diagram> diagrams = corridor_diagrams(day.page);
    REQUIRE(diagrams.size() == 2);   // Main and Branch
    static const std::regex arrow(
        R"re(<line [^>]*class="tree-arrow tree-(\d)" data-tree="\d" data-from="([^"]*)" data-to="([^"]*)" data-place="([^"]*)" data-cause="([^"]*)" data-seconds="([^"]*)")re");
    static const std::regex elsewhere(R"(delay tree (\d): [^<]*; elsewhere: (\d+) of its (\d+) arrows)");
    std::size_t drawn_anywhere = 0, off_somewhere = 0;
    for (const Diagram& d : diagrams) {
        INFO("corridor " << d.name);
        // The trains this diagram draws as run, by their tooltips.
        auto shown = [&](const std::string& train) { return d.svg.find("<title>" + train + " as run") != std::string::npos; };
        std::map<Key, double> drawn;
        for (auto m = std::sregex_iterator(d.svg.begin(), d.svg.end(), arrow); m != std::sregex_iterator(); ++m) {
            const Key key{std::stoul((*m)[1].str()), (*m)[2].str(), (*m)[3].str(), (*m)[4].str(), (*m)[5].str()};
            CHECK(!drawn.count(key));   // an arrow at most once per diagram
            drawn[key] += std::stod((*m)[6].str());
        }
        std::map<std::size_t, std::size_t> off_count, of_tree;
        for (const auto& [key, seconds] : want) {
            const auto& [tree, from, to, place, cause] = key;
            INFO("tree " << tree << " " << from << " -> " << to << " at " << place);
            ++of_tree[tree];
            // Drawn here exactly when the diagram draws both trains and the place is one of its stations.
            const bool here = shown(from) && shown(to) && d.stations.count(place);
            CHECK(drawn.count(key) == (here ? 1u : 0u));
            if (here && drawn.count(key)) CHECK(drawn[key] == Approx(seconds).margin(1e-3));
            if (!here) ++off_count[tree];
        }
        for (const auto& [key, seconds] : drawn) CHECK(want.count(key));
        drawn_anywhere += drawn.size();
        // The legend counts the arrows of each tree this diagram does not draw.
        std::map<std::size_t, std::pair<std::size_t, std::size_t>> said;
        const std::string text = unescape(d.svg);
        for (auto m = std::sregex_iterator(text.begin(), text.end(), elsewhere); m != std::sregex_iterator(); ++m)
            said[std::stoul((*m)[1].str())] = {std::stoul((*m)[2].str()), std::stoul((*m)[3].str())};
        for (std::size_t k = 1; k <= 3; ++k) {
            INFO("tree " << k);
            CHECK(text.find("delay tree " + std::to_string(k) + ": ") != std::string::npos);
            if (off_count[k] == 0) {
                CHECK(!said.count(k));
            } else {
                REQUIRE(said.count(k));
                CHECK(said[k] == std::make_pair(off_count[k], of_tree[k]));
                ++off_somewhere;
            }
        }
    }
    // The day passes knock-on along each corridor and across them at Orlen Vale.
    CHECK(drawn_anywhere >= 3);
    CHECK(off_somewhere >= 2);
}

TEST_CASE("a network day's held-at-signals table names each signal's segment heading and km", "[report][cli][network]") {
    TempDir dir;
    // A study of 40 days (quick on the demo): trains stand at signals of segments with kilometre
    // posts (D1, D3) and without (C2, the junction's curve).
    const fs::path h5 = dir.path / "study.h5", html = dir.path / "study.html";
    Result r = run_knockon("simulate " + q(kJunction) + " --replications 40 --out " + q(h5), dir);
    INFO(r.err);
    REQUIRE(r.status == 0);
    r = run_knockon("report " + q(h5) + " -o " + q(html), dir);
    REQUIRE(r.status == 0);
    const std::string page = read_text(html);
    const knockon::Scenario sc = knockon::read_scenario(kJunction);
    REQUIRE(sc.network);
    const knockon::net::Network& n = sc.network->network;
    // The demo file's kilometre posts, one per segment at offset 0 (read by hand from
    // scenarios/junction_branch.yaml); a segment without posts shows its offset.
    const std::map<std::string, double> km_at_start{{"U1", 20.0}, {"U2", 26.0}, {"D1", 20.0},
                                                    {"D2", 26.1}, {"D3", 26.3}, {"BR1", 0.4}};
    const auto rows = rows_of(section_of(page, "delay-growth"));
    std::size_t signals = 0;
    for (const auto& row : rows) {
        if (row.size() != 7 || row[0] == "rank") continue;
        INFO("row of signal " << row[1]);
        const knockon::net::Signal* sig = nullptr;
        for (const knockon::net::Signal& s : n.signals)
            if (s.name == row[1]) sig = &s;
        REQUIRE(sig);
        const std::string& segment = n.segments[sig->at.segment].name;
        CHECK(row[2] == segment);
        CHECK(row[3] == (sig->heading == knockon::net::Heading::forward ? "forward" : "backward"));
        const auto post = km_at_start.find(segment);
        const double km = (post == km_at_start.end() ? 0.0 : post->second) + sig->at.offset / 1000.0;
        REQUIRE(row[4] != "-");
        CHECK(std::stod(row[4]) == Approx(km).margin(0.006));   // two decimals
        ++signals;
    }
    CHECK(signals >= 3);
    // The ranked chart labels a signal with its segment and km (kilometres are each segment's own).
    CHECK(std::regex_search(section_of(page, "delay-growth"), std::regex(R"(\((U1|D1|U2|D3|D2|BR1|BR2|BR3|L\w+|C\w+|P\d) km \d)")));
}
