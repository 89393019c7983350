#include "tools/knockon/options.hpp"

#include <algorithm>
#include <charconv>
#include <cstdio>
#include <iostream>
#include <sstream>

#include "models/service_paths.hpp"
#include "models/single_track.hpp"
#include "tools/results/plan_output.hpp"
#include "tools/results/study_hdf5.hpp"
#include "tools/knockon/ranks.hpp"

namespace knockon::cli {

namespace {

std::string number_text(double v) {
    char buf[48];
    std::snprintf(buf, sizeof buf, "%g", v);
    return buf;
}

std::string minutes_text(double seconds) {
    char buf[48];
    std::snprintf(buf, sizeof buf, "%.10g", seconds / 60.0);
    return buf;
}

}  // namespace

std::uint64_t count_option(const po::variables_map& vm, const char* name, std::uint64_t lo, std::uint64_t hi) {
    const std::string text = vm[name].as<std::string>();
    std::uint64_t value = 0;
    const auto [end, ec] = std::from_chars(text.data(), text.data() + text.size(), value);
    if (ec != std::errc() || end != text.data() + text.size() || text.empty())
        throw UsageError(std::string("--") + name + " must be a whole number, not '" + text + "'");
    if (value < lo || value > hi)
        throw UsageError(std::string("--") + name + " must be between " + std::to_string(lo) + " and " +
                         std::to_string(hi) + ", not " + text);
    return value;
}

std::optional<ShardChoice> shard_option(const po::variables_map& vm) {
    if (!vm.count("shard")) return std::nullopt;
    const std::string text = vm["shard"].as<std::string>();
    const auto whole = [](const char* first, const char* last, std::uint32_t& v) {
        const auto [end, ec] = std::from_chars(first, last, v);
        return first != last && ec == std::errc() && end == last;
    };
    const std::size_t slash = text.find('/');
    ShardChoice c;
    if (slash == std::string::npos || !whole(text.data(), text.data() + slash, c.shard) ||
        !whole(text.data() + slash + 1, text.data() + text.size(), c.shards) || c.shard == 0 || c.shard > c.shards)
        throw UsageError("--shard must be K/N with whole numbers 1 <= K <= N (shard K of N), not '" + text + "'");
    return c;
}

ReplicationRange shard_block(const po::variables_map& vm, const ShardChoice& shard, std::uint32_t planned,
                             const std::string& what) {
    if (spread_over_ranks())
        throw UsageError("--shard runs one share of " + what + " days in one process; under mpirun the processes "
                         "share the days themselves: give one or the other");
    if (!vm.count("out"))
        throw UsageError("--shard needs --out: a shard's days go into its file for knockon merge");
    if (vm.count("until-ci"))
        throw UsageError("--until-ci cannot be split into shards: when to stop depends on every earlier day");
    if (shard.shards > planned)
        throw UsageError("--shard " + std::to_string(shard.shard) + "/" + std::to_string(shard.shards) +
                         " needs at least " + std::to_string(shard.shards) + " replications, not " +
                         std::to_string(planned));
    return shard_range(shard.shard, shard.shards, planned);
}

ShardRun shard_run(const po::variables_map& vm, const ShardChoice& shard, std::uint32_t planned,
                   const ReplicationRange& block, const std::string& scenario_text,
                   const std::vector<double>& thresholds) {
    ShardRun run;
    run.shard = shard.shard;
    run.shards = shard.shards;
    run.planned = planned;
    run.first = block.first;
    run.end = block.end;
    run.scenario_text = scenario_text;
    run.thresholds = thresholds;
    run.order = vm["order"].as<std::string>();
    return run;
}

std::string shard_done_text(const std::string& command, const ShardChoice& shard, const ReplicationRange& block,
                            std::uint32_t planned, const std::string& out, bool stopped_early) {
    return "knockon " + command + ": shard " + std::to_string(shard.shard) + " of " + std::to_string(shard.shards) +
           ": replications " + std::to_string(block.first) + " to " + std::to_string(block.end - 1) + " of " +
           std::to_string(planned) + (stopped_early ? " (stopped early)" : "") + " written to " + out +
           ".\nNo figures from one shard: merge all " + std::to_string(shard.shards) +
           " shard files with 'knockon merge PARTS... -o " + (command == "compare" ? "COMPARISON" : "STUDY") +
           ".h5' for the figures.\nCaution: " + kSafetyCaution + "\n";
}

void add_punctuality_option(po::options_description& options) {
    options.add_options()("punctuality", po::value<std::string>()->default_value("3,5"),
                          "punctuality thresholds in minutes, comma separated; a delay counts as within N "
                          "minutes when it is strictly below N minutes");
}

std::vector<double> punctuality_thresholds(const po::variables_map& vm) {
    const std::string text = vm["punctuality"].as<std::string>();
    std::vector<double> out;
    std::size_t start = 0;
    while (start <= text.size()) {
        const std::size_t comma = std::min(text.find(',', start), text.size());
        const std::string item = text.substr(start, comma - start);
        double minutes = 0.0;
        const auto [end, ec] = std::from_chars(item.data(), item.data() + item.size(), minutes);
        if (item.empty() || ec != std::errc() || end != item.data() + item.size() || !(minutes > 0.0) ||
            minutes > 1440.0)
            throw UsageError("--punctuality must list thresholds in minutes (0 < N <= 1440), e.g. 3,5; not '" +
                             text + "'");
        out.push_back(60.0 * minutes);
        start = comma + 1;
    }
    std::sort(out.begin(), out.end());
    out.erase(std::unique(out.begin(), out.end()), out.end());
    // Thresholds become field names of the results files; two that print alike would collide.
    for (std::size_t i = 1; i < out.size(); ++i)
        if (punctuality_field(out[i]) == punctuality_field(out[i - 1]))
            throw UsageError("--punctuality: thresholds of " + minutes_text(out[i - 1]) + " and " +
                             minutes_text(out[i]) + " minutes would both be stored as the field " +
                             punctuality_field(out[i]) + "; give thresholds that differ in the first six digits "
                             "of their seconds, not '" + text + "'");
    return out;
}

void add_deadlock_option(po::options_description& options) {
    options.add_options()("allow-deadlock",
                          "accept days that end in deadlock: exit status 0 instead of 3 (their figures are left "
                          "out either way, and the outputs say so first)");
}

bool allow_deadlock(const po::variables_map& vm) { return vm.count("allow-deadlock") > 0; }

int deadlock_status(const std::string& command, std::size_t deadlocked, std::size_t days, const po::variables_map& vm) {
    if (deadlocked == 0) return 0;
    const std::string which = days == 1 ? std::string("the simulated day ended in deadlock")
                                        : std::to_string(deadlocked) + " of " + std::to_string(days) +
                                              " simulated days ended in deadlock";
    if (allow_deadlock(vm)) {
        std::fprintf(stderr, "knockon %s: note: %s; accepted (--allow-deadlock)\n", command.c_str(), which.c_str());
        return 0;
    }
    std::fprintf(stderr,
                 "knockon %s: %s (see the output; any files asked for are written whole); exit status %d "
                 "(--allow-deadlock accepts it with status 0)\n",
                 command.c_str(), which.c_str(), kDeadlockStatus);
    return kDeadlockStatus;
}

void add_order_option(po::options_description& options) {
    options.add_options()("order", po::value<std::string>()->default_value("auto"),
                          "route-setting order at conflicts: timetable, first-come, dispatch, or auto (dispatch "
                          "where the line has single line, else timetable; README)");
}

RouteOrder route_order_option(const po::variables_map& vm, const Scenario& scenario) {
    const std::string order = vm["order"].as<std::string>();
    // auto: the scenario's single track as its paths find it, a line's or a network's.
    if (order == "auto")
        return !service_paths(scenario)->single_track().empty() ? RouteOrder::dispatch : RouteOrder::timetable;
    if (order == "timetable") return RouteOrder::timetable;
    if (order == "first-come") return RouteOrder::first_come;
    if (order == "dispatch") return RouteOrder::dispatch;
    throw UsageError("--order must be auto, timetable, first-come or dispatch, not '" + order + "'");
}

double step_option(const po::variables_map& vm) {
    const double step = vm["step"].as<double>();
    if (!(step >= kMinStep && step <= kMaxStep))
        throw UsageError("--step must be between " + number_text(kMinStep) + " and " + number_text(kMaxStep) +
                         " metres, not " + number_text(step));
    return step;
}

double sample_option(const po::variables_map& vm) {
    const double s = vm["sample"].as<double>();
    if (!(s == 0.0 || (s >= kMinSample && s <= 86400.0)))
        throw UsageError("--sample must be 0 (no trajectories) or between " + number_text(kMinSample) +
                         " and 86400 seconds, not " + number_text(s));
    return s;
}

void check_sample_count(const std::vector<TrainPlan>& plan, double sample_interval) {
    if (sample_interval <= 0.0) return;
    double seconds = 0.0;   // planned time on the line, summed over the runs
    for (const TrainPlan& tp : plan) seconds += std::max(0.0, tp.run.vanish_time - tp.run.appear_time);
    const double samples = seconds / sample_interval;
    if (samples > kMaxSamples)
        throw UsageError("--sample " + number_text(sample_interval) + " would record about " + number_text(samples) +
                         " trajectory samples for the " + std::to_string(plan.size()) +
                         " planned runs (more than " + number_text(kMaxSamples) + "); give a larger interval, at least " +
                         number_text(seconds / kMaxSamples) + " s");
}

std::string command_line_without_threads(const std::string& command_line) {
    std::istringstream in(command_line);
    std::string out, token;
    bool skip_value = false;
    while (in >> token) {
        if (skip_value) {
            skip_value = false;
            continue;
        }
        const std::string name = token.substr(0, token.find('='));
        if (name.size() >= 4 && std::string("--threads").compare(0, name.size(), name) == 0) {
            skip_value = name.size() == token.size();
            continue;
        }
        out += (out.empty() ? "" : " ") + token;
    }
    return out;
}

bool parse_command_line(const std::string& command, const std::vector<std::string>& args,
                        po::options_description& options, po::variables_map& vm, const std::string& positional,
                        const std::string& usage_name) {
    options.add_options()("help,h", "show this help");
    // The positional input is not listed in the help's options (it is in the usage line).
    po::options_description hidden;
    hidden.add_options()(positional.c_str(), po::value<std::string>(), "input file");
    po::options_description all;
    all.add(options).add(hidden);
    po::positional_options_description pos;
    pos.add(positional.c_str(), 1);
    try {
        po::store(po::command_line_parser(args).options(all).positional(pos).run(), vm);
        po::notify(vm);
    } catch (const po::error& e) {
        throw UsageError(e.what());
    }
    if (vm.count("help")) {
        std::cout << "usage: knockon " << command << " " << usage_name << " [options]\n" << options;
        return false;
    }
    if (!vm.count(positional)) throw UsageError("a " + usage_name + " file is required");
    return true;
}

}  // namespace knockon::cli
