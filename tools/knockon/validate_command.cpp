#include <cstdio>
#include <map>
#include <set>

#include "models/plan.hpp"
#include "tools/read/network_reader.hpp"
#include "tools/results/plan_output.hpp"
#include "tools/read/scenario_reader.hpp"
#include "tools/knockon/options.hpp"

namespace knockon::cli {

namespace {

std::string facts(const Scenario& s) {
    char buf[256];
    std::snprintf(buf, sizeof buf, "%.1f km, %zu stations, %zu signals, %zu train types, %zu trains",
                  s.infrastructure.length / 1000.0, s.infrastructure.stations.size(),
                  s.infrastructure.signals.size(), s.train_types.size(), s.timetable.services.size());
    return buf;
}

// Warnings of a plan, located at the call each stretch ends at: the timetable allows less than
// running time plus supplement.  The runs of one repeat pattern share a call of the file: one
// line per call and stretch, naming the first run and how many more there are.
std::vector<std::string> plan_warnings(const Scenario& sc, const PlanResult& plan) {
    std::vector<std::string> out;
    std::map<std::string, std::pair<std::size_t, std::size_t>> seen;   // location -> (line in out, more runs)
    for (const TightStretch& w : plan.tight_stretches) {
        const ServiceRun& run = plan.trains[w.train].run;
        const std::string where = sc.where(*run.service, run.calls[w.call].call);
        if (auto it = seen.find(where); it != seen.end()) {
            ++it->second.second;
            continue;
        }
        seen[where] = {out.size(), 0};
        out.push_back(where + ": warning: " + tight_stretch_text(plan, w));
    }
    // Signals whose warning is shorter than a train's stopping distance (tests/REFERENCES.md B6), on the
    // steepest fall over the braking distance: located at the signal, with the worst train.
    for (const SpacingWarning& w : plan.spacing_warnings)
        out.push_back(sc.where_signal(w.signal) + ": warning: " + spacing_warning_text(plan, w));
    for (const auto& [where, at] : seen)
        if (at.second > 0)
            out[at.first] += " (and " + std::to_string(at.second) + " more run" + (at.second == 1 ? "" : "s") +
                             " of its pattern)";
    return out;
}

// What validate prints of a network file (knockon: 2) read without problems: the layout's counts,
// then its train types, services and corridors.
void print_network(const std::string& file, const NetworkFile& nf) {
    const net::Network& n = nf.network;
    auto count = [](std::size_t k, const char* one, const char* many) { return std::to_string(k) + " " + (k == 1 ? one : many); };
    std::printf("%s: ok: network %s; %s, %s, %s, %s; %s, %s\n", file.c_str(), nf.name.c_str(),
                count(n.segments.size(), "segment", "segments").c_str(), count(n.nodes.size(), "node", "nodes").c_str(),
                count(n.signals.size(), "signal", "signals").c_str(), count(n.stations.size(), "station", "stations").c_str(),
                count(nf.sections, "detection section", "detection sections").c_str(),
                count(nf.routes, "route", "routes").c_str());
    const net::NetworkTimetable& tt = nf.timetable;
    if (nf.train_types.empty() && tt.services.empty()) return;
    std::printf("%s: ok: %s, %s with their paths; corridors:", file.c_str(),
                count(nf.train_types.size(), "train type", "train types").c_str(),
                count(tt.services.size(), "service", "services").c_str());
    for (const net::Corridor& c : net::corridors_of(tt)) {
        std::string stations;
        for (const std::string& st : c.stations) stations += (stations.empty() ? "" : " ") + st;
        std::printf(" %s (%s);", c.name.c_str(), stations.c_str());
    }
    std::printf(" %s\n", tt.corridors.empty() ? "one per route of the services" : "as written");
}

// A network file: the layout read and checked, its detection sections and routes found; its train
// types, timetable (every service's path laid), corridors and delays read and checked; the same
// for each variant, a problem of the base reported once; then each read as the scenario the
// other commands run (its links) and planned, as a line scenario is.
int validate_network(const std::string& file) {
    std::vector<std::string> problems, warnings;
    std::set<std::string> seen;
    auto add_to = [&](std::vector<std::string>& to, const std::vector<std::string>& messages, const std::string& variant) {
        for (const std::string& m : messages)
            if (seen.insert(m).second) to.push_back(variant.empty() ? m : m + " (in variant " + variant + ")");
    };
    auto add = [&](const std::vector<std::string>& messages, const std::string& variant) {
        add_to(problems, messages, variant);
    };
    auto plan_check = [&](const std::string& variant) {
        try {
            const Scenario sc = read_scenario(file, variant);
            add_to(warnings, plan_warnings(sc, make_plan(sc)), variant);
        } catch (const ScenarioError& e) {
            add(e.messages, variant);
        }
    };
    NetworkFile base;
    try {
        base = read_network(file);
        plan_check("");
    } catch (const ScenarioError& e) {
        add(e.messages, "");
    }
    std::vector<VariantInfo> variants;
    try {
        variants = read_variants(file);
    } catch (const ScenarioError& e) {
        add(e.messages, "");
    }
    std::vector<std::pair<std::string, NetworkFile>> read;
    for (const VariantInfo& v : variants) {
        try {
            read.emplace_back(v.name, read_network(file, v.name));
            plan_check(v.name);
        } catch (const ScenarioError& e) {
            add(e.messages, v.name);
        }
    }
    for (const std::string& w : warnings) std::fprintf(stderr, "%s\n", w.c_str());
    if (!problems.empty()) throw ScenarioError(problems);
    print_network(file, base);
    if (!warnings.empty())
        std::printf("%s: %zu warning%s (on stderr)\n", file.c_str(), warnings.size(), warnings.size() == 1 ? "" : "s");
    for (const auto& [name, nf] : read) print_network(file + " (variant " + name + ")", nf);
    if (!variants.empty())
        std::printf("%s: ok (base and %zu variant%s)\n", file.c_str(), variants.size(), variants.size() == 1 ? "" : "s");
    return 0;
}

}  // namespace

// Checks the base scenario and every variant (each merged onto the base, read in full and
// planned: what cannot run is named here, before any study).  A problem of the base shows up
// again in every variant that does not override it; it is reported once, and only the problems
// a variant adds are marked with its name.  Warnings go to stderr and leave the status 0.
int validate(const std::vector<std::string>& args) {
    po::options_description options("validate options");
    po::variables_map vm;
    if (!parse_command_line("validate", args, options, vm)) return 0;
    const std::string file = vm["scenario"].as<std::string>();
    if (is_network_text(read_scenario_text(file))) return validate_network(file);

    std::vector<std::string> problems, warnings;
    std::set<std::string> seen;
    auto add = [&](std::vector<std::string>& to, const std::vector<std::string>& messages, const std::string& variant) {
        for (const std::string& m : messages)
            if (seen.insert(m).second) to.push_back(variant.empty() ? m : m + " (in variant " + variant + ")");
    };
    // Reads and plans one variant ("" the base); false when it has problems (recorded).
    auto check = [&](const std::string& variant, Scenario& into) {
        try {
            into = read_scenario(file, variant);
            const PlanResult plan = make_plan(into);
            add(warnings, plan_warnings(into, plan), variant);
            return true;
        } catch (const ScenarioError& e) {
            add(problems, e.messages, variant);
            return false;
        }
    };
    Scenario base;
    check("", base);
    std::vector<VariantInfo> variants;
    try {
        variants = read_variants(file);
    } catch (const ScenarioError& e) {
        add(problems, e.messages, "");
    }
    std::vector<std::string> lines;
    for (const VariantInfo& v : variants) {
        Scenario sc;
        if (check(v.name, sc)) lines.push_back("  variant " + v.name + ": ok; " + facts(sc));
    }
    for (const std::string& w : warnings) std::fprintf(stderr, "%s\n", w.c_str());
    if (!problems.empty()) throw ScenarioError(problems);

    std::printf("%s: ok: %s; %s\n", file.c_str(), base.name.c_str(), facts(base).c_str());
    if (!warnings.empty())
        std::printf("%s: %zu warning%s (on stderr)\n", file.c_str(), warnings.size(), warnings.size() == 1 ? "" : "s");
    if (!variants.empty()) {
        for (const std::string& l : lines) std::printf("%s\n", l.c_str());
        std::printf("%s: ok (base and %zu variant%s)\n", file.c_str(), variants.size(),
                    variants.size() == 1 ? "" : "s");
    }
    return 0;
}

}  // namespace knockon::cli
