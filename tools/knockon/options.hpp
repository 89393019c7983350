#pragma once
// Shared command-line parsing: Boost.Program_options with one positional SCENARIO, turning
// every parse error into a UsageError.
#include <boost/program_options.hpp>
#include <cstdint>
#include <optional>
#include <string>
#include <vector>

#include "models/plan.hpp"
#include "sim/interlocking.hpp"
#include "sim/shards.hpp"
#include "tools/results/shard_hdf5.hpp"
#include "tools/knockon/commands.hpp"

namespace knockon::cli {

namespace po = boost::program_options;

// Parses args against `options` plus a positional "scenario"; returns false when --help was asked
// (help text printed to stdout).
// A whole-number option given as text (so that "-1" is refused rather than wrapped around),
// within [lo, hi]; UsageError naming the option otherwise.
std::uint64_t count_option(const po::variables_map& vm, const char* name, std::uint64_t lo, std::uint64_t hi);

// `--punctuality 3,5`: thresholds in whole or decimal minutes, returned in seconds, ascending.
// A delay counts as within a threshold when it is strictly below it (2:59 within 3 minutes).
// Each threshold names fields of the results file (punctuality_field): thresholds that would
// share a name are refused.
void add_punctuality_option(po::options_description& options);
std::vector<double> punctuality_thresholds(const po::variables_map& vm);

// --allow-deadlock: days that ended in deadlock are accepted, exit status 0.  Without it a
// simulated day, a study or a comparison with any deadlocked day exits with kDeadlockStatus once
// its outputs are written whole.  Either way no deadlocked day enters a figure.
inline constexpr int kDeadlockStatus = 3;
void add_deadlock_option(po::options_description& options);
bool allow_deadlock(const po::variables_map& vm);
// 0 or kDeadlockStatus for `deadlocked` of `days` simulated days, with a line on stderr saying
// which and why when there are any.
int deadlock_status(const std::string& command, std::size_t deadlocked, std::size_t days, const po::variables_map& vm);
// `--step`: the distance step of the running-time integration [m].  Below kMinStep the plan's
// memory grows past use (timing points move by about 0.02 s between 1 m and 2 m already).
inline constexpr double kMinStep = 0.5, kMaxStep = 50.0;
double step_option(const po::variables_map& vm);

// `--order`: timetable, first-come or dispatch; auto (the default): dispatch where the scenario has
// single track (a line's or a network's), else timetable.
RouteOrder route_order_option(const po::variables_map& vm, const Scenario& scenario);
void add_order_option(po::options_description& options);

// `--sample`: seconds between trajectory samples of a simulated day; 0 for none, else at least
// kMinSample.  A day may hold at most kMaxSamples samples (about 40 bytes each, 0.4 GB):
// check_sample_count refuses, before the day runs, an interval that would give more for the
// planned runs (README, "Memory").
inline constexpr double kMinSample = 0.5;
inline constexpr double kMaxSamples = 1e7;
double sample_option(const po::variables_map& vm);
void check_sample_count(const std::vector<TrainPlan>& plan, double sample_interval);

// `--shard K/N`: shard K (1 to N) of a study split into N shards (sim/shards.hpp); none when
// the option is not given, UsageError for anything but two whole numbers with 1 <= K <= N.
struct ShardChoice {
    std::uint32_t shard = 0, shards = 0;
};
std::optional<ShardChoice> shard_option(const po::variables_map& vm);
// The replications shard K of N runs of a study or comparison of `planned` days, after the checks
// every command with --shard makes (UsageError): --out given, no --until-ci, at least N days, and
// one process (under mpirun the processes share the days themselves).  `what`: "a study's" or "a
// comparison's".
ReplicationRange shard_block(const po::variables_map& vm, const ShardChoice& shard, std::uint32_t planned,
                             const std::string& what);
// The facts of a shard's run that merge compares, as `simulate` and `compare` both fill them
// (`sample` and `traces` are the command's own).
ShardRun shard_run(const po::variables_map& vm, const ShardChoice& shard, std::uint32_t planned,
                   const ReplicationRange& block, const std::string& scenario_text,
                   const std::vector<double>& thresholds);
// What a shard prints once its file is written: which days it ran and where they went; the
// figures come from `knockon merge`.
std::string shard_done_text(const std::string& command, const ShardChoice& shard, const ReplicationRange& block,
                            std::uint32_t planned, const std::string& out, bool stopped_early);

// The command line as a results file stores it: without --threads (or an abbreviation such as
// --thr, with its value), which changes neither the results nor, so, the file's bytes.
std::string command_line_without_threads(const std::string& command_line);

// The positional argument is stored under `positional` ("scenario" unless a command takes other
// inputs too) and shown as `usage_name` in the help.
bool parse_command_line(const std::string& command, const std::vector<std::string>& args,
                        po::options_description& options, po::variables_map& vm,
                        const std::string& positional = "scenario", const std::string& usage_name = "SCENARIO");

}  // namespace knockon::cli
