#include <cstdio>
#include <set>

#include "tools/io/scenario_reader.hpp"
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

}  // namespace

// Checks the base scenario and every variant (each merged onto the base and read in full).  A
// problem of the base shows up again in every variant that does not override it; it is reported
// once, and only the problems a variant adds are marked with its name.
int validate(const std::vector<std::string>& args) {
    po::options_description options("validate options");
    po::variables_map vm;
    if (!parse_command_line("validate", args, options, vm)) return 0;
    const std::string file = vm["scenario"].as<std::string>();

    std::vector<std::string> problems;
    std::set<std::string> seen;
    auto add = [&](const std::vector<std::string>& messages, const std::string& variant) {
        for (const std::string& m : messages)
            if (seen.insert(m).second) problems.push_back(variant.empty() ? m : m + " (in variant " + variant + ")");
    };
    Scenario base;
    try {
        base = read_scenario(file);
    } catch (const ScenarioError& e) {
        add(e.messages, "");
    }
    std::vector<VariantInfo> variants;
    try {
        variants = read_variants(file);
    } catch (const ScenarioError& e) {
        add(e.messages, "");
    }
    std::vector<std::string> lines;
    for (const VariantInfo& v : variants) {
        try {
            lines.push_back("  variant " + v.name + ": ok; " + facts(read_scenario(file, v.name)));
        } catch (const ScenarioError& e) {
            add(e.messages, v.name);
        }
    }
    if (!problems.empty()) throw ScenarioError(problems);

    std::printf("%s: ok: %s; %s\n", file.c_str(), base.name.c_str(), facts(base).c_str());
    if (!variants.empty()) {
        for (const std::string& l : lines) std::printf("%s\n", l.c_str());
        std::printf("%s: ok (base and %zu variant%s)\n", file.c_str(), variants.size(),
                    variants.size() == 1 ? "" : "s");
    }
    return 0;
}

}  // namespace knockon::cli
