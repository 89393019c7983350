// knockon merge: the shard files of one study (simulate --shard K/N --out) folded into the study
// file one run would have written, or those of one comparison (compare --shard K/N --out) into its
// comparison file (tools/knockon/merge_comparison).  The shards are checked against each other
// before anything is written: a shard of another kind, scenario, variant, seed or option, a
// stopped shard, one given twice or one missing is refused (exit 2) with the file and what differs.
#include <cstdio>
#include <iostream>
#include <map>
#include <sstream>

#include "models/plan.hpp"
#include "sim/shards.hpp"
#include "sim/study.hpp"
#include "tools/results/hdf5_file.hpp"
#include "tools/read/scenario_hash.hpp"
#include "tools/read/scenario_reader.hpp"
#include "tools/results/shard_hdf5.hpp"
#include "tools/results/study_hdf5.hpp"
#include "tools/knockon/options.hpp"
#include "tools/results/output_file.hpp"
#include "tools/results/results_file.hpp"
#include "tools/knockon/merge_comparison.hpp"
#include "tools/knockon/study_output.hpp"

namespace knockon::cli {
namespace {

std::string numbers(const std::vector<double>& v) {
    std::ostringstream s;
    for (std::size_t i = 0; i < v.size(); ++i) s << (i ? "," : "") << v[i];
    return s.str();
}

std::string kind_text(const ShardFile& s) {
    return s.comparison() ? "a comparison shard (compare --shard)" : "a study shard (simulate --shard)";
}

std::string variant_list(const ShardFile& s) {
    std::string list;
    for (const ShardDays& d : s.studies) list += (list.empty() ? "" : ",") + d.variant.name;
    return list;
}

// A shard must agree with the first one given on everything its days depend on.
void check_same(const ShardFile& a, const ShardFile& first) {
    if (a.kind != first.kind)
        throw UsageError(a.path + ": is " + kind_text(a) + ", but " + first.path + " is " + kind_text(first) +
                         "; merge the shards of one study or of one comparison");
    const auto differs = [&](const std::string& what, const std::string& here, const std::string& there) {
        if (here != there)
            throw UsageError(a.path + ": " + what + " differs: " + here + " here, " + there + " in " + first.path +
                             "; shards of one study must share it");
    };
    differs("scenario (hash of its text and variant)", a.scenario_hash, first.scenario_hash);
    differs("variant", a.variant, first.variant);
    differs("variants compared", variant_list(a), variant_list(first));
    differs("seed", std::to_string(a.seed), std::to_string(first.seed));
    differs("number of shards", std::to_string(a.run.shards), std::to_string(first.run.shards));
    differs("replications", std::to_string(a.run.planned), std::to_string(first.run.planned));
    differs("--step", std::to_string(a.step), std::to_string(first.step));
    differs("--order", a.run.order, first.run.order);
    differs("--sample", std::to_string(a.run.sample), std::to_string(first.run.sample));
    differs("--punctuality thresholds [s]", numbers(a.run.thresholds), numbers(first.run.thresholds));
    differs("--traces", a.run.traces, first.run.traces);
    differs("program version", a.program_version, first.program_version);
}

// The shard on its own: whole, and the block of days its number says.
void check_whole(const ShardFile& s) {
    if (s.program_version != KNOCKON_VERSION)
        throw UsageError(s.path + ": written by knockon " + s.program_version + ", this is " + KNOCKON_VERSION +
                         "; run the shards and the merge with one version");
    for (const ShardDays& d : s.studies)
        if (d.partial || d.days != s.run.end - s.run.first)
            throw UsageError(s.path + ": shard " + std::to_string(s.run.shard) +
                             (d.variant.name.empty() ? std::string() : " (variant " + d.variant.name + ")") +
                             " was stopped before its last replication; run it again");
    const ReplicationRange r = shard_range(s.run.shard, s.run.shards, s.run.planned);
    if (r.first != s.run.first || r.end != s.run.end)
        throw UsageError(s.path + ": holds replications " + std::to_string(s.run.first) + " to " +
                         std::to_string(s.run.end) + " (exclusive), but shard " + std::to_string(s.run.shard) + " of " +
                         std::to_string(s.run.shards) + " is " + std::to_string(r.first) + " to " + std::to_string(r.end));
    if (scenario_hash(s.run.scenario_text, s.variant) != s.scenario_hash)
        throw UsageError(s.path + ": the scenario text it holds does not match its scenario_hash; the file is damaged");
}

// The shards in shard order, each exactly once.
std::vector<ShardFile> order_shards(std::vector<ShardFile> shards) {
    std::map<std::uint32_t, std::size_t> by_number;
    for (std::size_t i = 0; i < shards.size(); ++i) {
        const auto [it, added] = by_number.emplace(shards[i].run.shard, i);
        if (!added)
            throw UsageError(shards[i].path + ": shard " + std::to_string(shards[i].run.shard) + " of " +
                             std::to_string(shards[i].run.shards) + " is given twice (also " +
                             shards[it->second].path + ")");
    }
    const std::uint32_t count = shards.front().run.shards;
    std::string missing;
    for (std::uint32_t k = 1; k <= count; ++k)
        if (!by_number.count(k)) missing += (missing.empty() ? "" : ", ") + std::to_string(k);
    if (!missing.empty())
        throw UsageError(shards.front().path + ": its " + (shards.front().comparison() ? "comparison" : "study") +
                         " has " + std::to_string(count) +
                         " shards; missing: shard " + missing + " (files given: " + std::to_string(shards.size()) + ")");
    std::vector<ShardFile> out;
    for (const auto& [k, i] : by_number) out.push_back(std::move(shards[i]));
    return out;
}

}  // namespace

int merge(const std::vector<std::string>& args) {
    std::string command_line = "knockon merge";
    for (const std::string& a : args) command_line += " " + a;
    po::options_description options("merge options");
    options.add_options()("help,h", "show this help")("out,o", po::value<std::string>(),
                                                         "the study or comparison file to write (HDF5)")(
        "json", "print one JSON document instead of the summary");
    add_deadlock_option(options);
    po::options_description hidden;
    hidden.add_options()("parts", po::value<std::vector<std::string>>(), "shard files");
    po::options_description all;
    all.add(options).add(hidden);
    po::positional_options_description pos;
    pos.add("parts", -1);
    po::variables_map vm;
    try {
        po::store(po::command_line_parser(args).options(all).positional(pos).run(), vm);
        po::notify(vm);
    } catch (const po::error& e) {
        throw UsageError(e.what());
    }
    if (vm.count("help")) {
        std::cout << "usage: knockon merge PART.h5... -o STUDY.h5 [options]\n"
                     "Folds the shard files of one study (simulate --shard K/N --out PART.h5) into the study file\n"
                     "one run of all the replications would have written; those of one comparison (compare --shard\n"
                     "K/N --out PART.h5) into its comparison file.\n"
                  << options;
        return 0;
    }
    if (!vm.count("parts")) throw UsageError("shard files are required: knockon merge PART.h5... -o STUDY.h5");
    if (!vm.count("out")) throw UsageError("-o OUT.h5 is required: the merged study or comparison file");
    const std::vector<std::string> parts = vm["parts"].as<std::vector<std::string>>();
    check_output_path(vm["out"].as<std::string>(), parts);

    // Every check before anything is written.
    std::vector<ShardFile> shards;
    for (const std::string& p : parts) {
        try {
            shards.push_back(read_shard_file(p));
        } catch (const h5::Error& e) {
            throw UsageError(e.what());
        }
    }
    for (const ShardFile& s : shards) {
        check_same(s, shards.front());
        check_whole(s);
    }
    shards = order_shards(std::move(shards));
    if (shards.front().comparison()) return merge_comparison(shards, vm, command_line);
    const ShardFile& head = shards.front();   // shard 1: replication 0, its names and template
    const ShardDays& head_days = head.studies.front();

    // The model the shards ran on, from the text they ran (equal in all: same hash).
    const Scenario scenario = parse_scenario(head.run.scenario_text, head.scenario_file, head.variant);
    RunOptions run;
    run.step = head.step;
    const std::unique_ptr<ServicePaths> paths = scenario_paths(scenario);
    const std::vector<TrainPlan> plan = plan_trains(scenario, *paths, run);
    const SimModel model(*paths, plan);

    StudyResult study;
    study.figures = StudyFigures(head.run.thresholds, head.run.planned);
    study.train_ids = head_days.train_ids;
    study.section_names = head_days.section_names;
    study.timing_template = head_days.timing_template;
    Hdf5RunInfo info;
    info.scenario_file = head.scenario_file;
    info.scenario_name = head.scenario_name;
    info.command_line = command_line;
    info.seed = head.seed;
    info.variant = head.variant;
    info.step = head.step;
    info.scenario_hash = head.scenario_hash;
    TraceSelection traces = *parse_trace_selection(head.run.traces);
    StudyHdf5Writer out(vm["out"].as<std::string>(), info, traces);
    try {
        // Shard by shard, so at most one shard's days are in memory; in shard order, so the days
        // come in replication order and fold exactly as in one run.
        for (const ShardFile& s : shards) {
            std::vector<ReplicationFigures> days = read_shard_days(s, s.studies.front());
            for (ReplicationFigures& d : days) {
                if (d.stats.replication != study.replications.size())
                    throw UsageError(s.path + ": replication " + std::to_string(d.stats.replication) +
                                     " where replication " + std::to_string(study.replications.size()) +
                                     " should come; the file is damaged");
                fold_day(study, std::move(d));
            }
            for (std::uint32_t k : s.traced) out.copy_trace(s.path, k);
        }
    } catch (const h5::Error& e) {
        throw UsageError(e.what());
    } catch (const ResultsFileError& e) {   // a number outside its rule (read_per_day_table)
        throw UsageError(e.what());
    }
    const StudySummary summary = summarize_study(model, study, head.run.thresholds);
    out.finish(model, study, summary);
    const StudyRunInfo run_info{head.seed, 1, command_line, allow_deadlock(vm)};
    if (vm.count("json"))
        std::printf("%s\n", study_json(scenario, model, study, summary, run_info).dump(1).c_str());
    else
        std::fputs(study_text(scenario, model, study, summary, run_info).c_str(), stdout);
    return deadlock_status("merge", summary.deadlocked, summary.replications, vm);
}

}  // namespace knockon::cli
