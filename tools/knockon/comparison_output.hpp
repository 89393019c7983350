#pragma once
// What `knockon compare` prints, and `knockon merge` of a comparison's shards: the readable tables
// or one JSON document.  Days that ended in deadlock are stated first and enter no figure
// (tools/results/deadlock_output).
#include <memory>
#include <string>
#include <vector>

#include <boost/program_options/variables_map.hpp>
#include <nlohmann/json.hpp>

#include "models/plan.hpp"
#include "models/scenario.hpp"
#include "sim/comparison.hpp"
#include "sim/study.hpp"
#include "tools/results/comparison_hdf5.hpp"
#include "tools/results/deadlock_output.hpp"
#include "tools/results/plan_output.hpp"

namespace knockon::cli {

// One variant as run: the scenario and plan must outlive its SimModel (it keeps references).
struct VariantRun {
    std::string name, description;
    Scenario scenario;
    PlanResult plan;
    PlanFigures figures;
    std::unique_ptr<SimModel> model;   // the study's model, kept for the results file
    StudyResult study;
    StudySummary summary;
    bool finished = false;   // its study ran to the end (not stopped by Ctrl-C)
};

std::vector<NamedSummary> named_summaries(const std::vector<const VariantRun*>& runs);
// Each variant after the first against the first, day by day (sim/comparison).
std::vector<StudyComparison> compare_variants(const std::vector<const VariantRun*>& runs,
                                              const std::vector<double>& thresholds);
// The variants as the comparison file takes them (pointers into `runs`).
std::vector<ComparedVariant> compared_variants(const std::vector<const VariantRun*>& runs);

// The tables: per-day figures of each variant, paired differences against the first, plan figures.
std::string compare_text(const std::vector<const VariantRun*>& runs, const std::vector<StudyComparison>& cmp,
                         std::uint64_t seed, unsigned threads, const std::vector<double>& thresholds,
                         bool allow_deadlock);
// "deadlock" first: the days that deadlocked over all variants, and per variant how many and the
// first one's replication and cause.
nlohmann::json compare_deadlock_json(const std::vector<const VariantRun*>& runs, bool allow_deadlock);
nlohmann::json compare_json(const std::vector<const VariantRun*>& runs, const std::vector<StudyComparison>& cmp,
                            std::uint64_t seed, unsigned threads, const std::vector<double>& thresholds,
                            const std::string& command_line);

// How the comparison was run, as its outputs say.
struct ComparisonRunInfo {
    std::uint64_t seed = 0;
    unsigned threads = 1;   // per process
    const std::vector<double>& thresholds;
    std::string command_line;
};

// Prints the comparison of `runs` (the tables, or one JSON document with --json), saying first
// which variants a Ctrl-C left out (`not_compared`), and returns the exit status: 130 for a
// comparison stopped by Ctrl-C, else 0 or that of days ended in deadlock (deadlock_status).
int print_comparison(const std::string& command, const std::vector<const VariantRun*>& runs,
                     const std::vector<StudyComparison>& cmp, const ComparisonRunInfo& info,
                     const boost::program_options::variables_map& vm, const std::vector<std::string>& not_compared = {});

}  // namespace knockon::cli
