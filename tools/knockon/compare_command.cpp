// knockon compare: Monte Carlo comparison of scenario variants with common random numbers.
//
// Every variant is read, planned and studied with the same seed, so replication k of each sees
// the same primary delays; the figures are then compared day by day against the first variant
// (sim/comparison).  The plan figures (headways, capacity consumption) are deterministic and are
// compared as they are.
#include <chrono>
#include <algorithm>
#include <cmath>
#include <cstdio>
#include <memory>
#include <optional>
#include <set>
#include <sstream>
#include <unistd.h>

#include <nlohmann/json.hpp>

#include "models/plan.hpp"
#include "sim/comparison.hpp"
#include "sim/delay_draws.hpp"
#include "sim/simulation.hpp"
#include "sim/study.hpp"
#include "tools/results/comparison_hdf5.hpp"
#include "tools/results/deadlock_output.hpp"
#include "tools/results/output_file.hpp"
#include "tools/results/plan_output.hpp"
#include "tools/read/scenario_hash.hpp"
#include "tools/read/scenario_reader.hpp"
#include "tools/results/shard_hdf5.hpp"
#include "tools/results/study_hdf5.hpp"
#include "tools/knockon/comparison_output.hpp"
#include "tools/knockon/interrupt.hpp"
#include "tools/knockon/options.hpp"
#include "tools/knockon/rank_study.hpp"
#include "tools/knockon/ranks.hpp"

namespace knockon::cli {
namespace {

std::vector<std::string> split_names(const std::string& list) {
    std::vector<std::string> out;
    std::string cur;
    auto flush = [&] {
        const auto a = cur.find_first_not_of(" \t");
        const auto b = cur.find_last_not_of(" \t");
        if (a == std::string::npos) throw UsageError("--variants: empty name in '" + list + "'");
        out.push_back(cur.substr(a, b - a + 1));
        cur.clear();
    };
    for (char c : list) {
        if (c == ',')
            flush();
        else
            cur += c;
    }
    flush();
    return out;
}

}  // namespace

int compare(const std::vector<std::string>& args) {
    std::string command_line = "knockon compare";
    for (const std::string& a : args) command_line += " " + a;
    po::options_description options("compare options");
    options.add_options()(
        "variants", po::value<std::string>(),
        "comma-separated variants to compare, the first being the reference, e.g. base,four_aspect "
        "(default: base and every variant of the file)")(
        "replications", po::value<std::string>()->default_value("100"), "simulated days per variant")(
        "seed", po::value<std::string>()->default_value("1"), "random seed, the same for every variant")(
        "threads", po::value<std::string>()->default_value("1"), "threads, per process under mpirun (results do not depend on it)")(
        "step", po::value<double>()->default_value(2.0), "distance step of the motion integration [m]")(
        "json", "print one JSON document instead of tables")(
        "out", po::value<std::string>(),
        "also write the results to this HDF5 file (kind comparison: each variant's study figures and "
        "the paired differences)")(
        "shard", po::value<std::string>(),
        "with --out: run shard K/N of the comparison, one contiguous block of the days of every variant, into a "
        "shard file for knockon merge");
    add_order_option(options);
    add_deadlock_option(options);
    add_punctuality_option(options);
    po::variables_map vm;
    if (!parse_command_line("compare", args, options, vm)) return 0;
    const std::string file = vm["scenario"].as<std::string>();

    StudyOptions opt;
    opt.replications = static_cast<std::uint32_t>(count_option(vm, "replications", 1, 10'000'000));
    opt.threads = static_cast<unsigned>(count_option(vm, "threads", 1, 256));
    opt.thresholds = punctuality_thresholds(vm);
    opt.sim.run.step = step_option(vm);
    const std::uint64_t seed = count_option(vm, "seed", 0, UINT64_MAX);
    if (vm.count("out")) check_output_path(vm["out"].as<std::string>(), {file});
    // --shard K/N: every variant runs the same contiguous block of the planned replications.
    const std::uint32_t planned = opt.replications;
    const std::optional<ShardChoice> shard = shard_option(vm);
    ReplicationRange block{0, planned};
    if (shard) block = shard_block(vm, *shard, planned, "a comparison's");

    // Read once: every variant is made of this text, and the shard and every MPI process check it.
    const std::string scenario_text = read_scenario_text(file);
    std::vector<VariantInfo> known = read_variants(file);
    std::vector<std::string> names;
    if (vm.count("variants")) {
        names = split_names(vm["variants"].as<std::string>());
    } else {
        if (known.empty()) throw UsageError(file + ": the scenario defines no variants; nothing to compare");
        names.push_back("base");
        for (const VariantInfo& v : known) names.push_back(v.name);
    }
    std::set<std::string> seen;
    for (const std::string& n : names)
        if (!seen.insert(n == "" ? "base" : n).second) throw UsageError("--variants: '" + n + "' is named twice");
    if (names.size() < 2) throw UsageError("--variants: name at least two variants to compare, e.g. base," +
                                           (known.empty() ? std::string("NAME") : known.front().name));

    // Read and plan every variant first, so that bad input stops the command before any study.
    std::vector<std::unique_ptr<VariantRun>> runs;
    for (const std::string& n : names) {
        auto r = std::make_unique<VariantRun>();
        r->name = n;
        r->scenario = parse_scenario(scenario_text, file, n);
        for (const VariantInfo& v : known)
            if (v.name == n) r->description = v.description;
        if (n == "base") r->description = "the scenario as written, without overlay";
        r->plan = make_plan(r->scenario, opt.sim.run);
        r->figures = plan_figures(r->plan);
        runs.push_back(std::move(r));
    }
    // (auto: by the first variant's single track; every variant runs under the same order)
    opt.sim.route_order = route_order_option(vm, runs.front()->scenario);
    if (runs.front()->scenario.delays.empty())
        std::fprintf(stderr, "knockon compare: note: %s has no `delays:` section, so every day is the same\n",
                     file.c_str());

    // Ctrl-C stops the running study after its batch; a comparison pairs whole studies, so only
    // the variants that finished are compared (and no file is written: it would not be the one
    // asked for).  In place before the results file exists, so that its first Ctrl-C is this one.
    // Under mpirun every variant's days are spread over the ranks (rank_study), and a signal ends
    // every rank at once with no file instead.
    const bool spread = spread_over_ranks();
    std::optional<InterruptGuard> interrupt;
    if (!spread) interrupt.emplace();
    opt.stop = interrupt ? interrupt->stop_flag() : nullptr;
    const auto interrupted = [&interrupt] { return interrupt && interrupt->interrupted(); };

    // --out: created now under a temporary name, so a bad path fails before the studies run; it
    // appears at its path only once complete.
    std::unique_ptr<ComparisonHdf5Writer> out;
    std::unique_ptr<ComparisonShardHdf5Writer> shard_out;
    if (vm.count("out") && rank() == 0) {   // only rank 0 writes
        Hdf5RunInfo info;
        info.scenario_file = file;
        info.scenario_name = runs.front()->scenario.name;
        info.command_line = command_line_without_threads(command_line);
        info.seed = seed;
        info.step = opt.sim.run.step;
        if (shard) {
            info.scenario_hash = scenario_hash(scenario_text, "");
            ShardRun run = shard_run(vm, *shard, planned, block, scenario_text, opt.thresholds);
            run.traces = TraceSelection().text();   // a comparison keeps no traced days
            std::vector<ShardVariant> variants;
            for (const auto& r : runs) variants.push_back({r->name, r->description});
            shard_out = std::make_unique<ComparisonShardHdf5Writer>(vm["out"].as<std::string>(), info, run, variants);
        } else {
            out = std::make_unique<ComparisonHdf5Writer>(vm["out"].as<std::string>(), info);
        }
    }

    std::vector<std::string> not_compared;
    const bool tty = ::isatty(2);
    for (std::size_t v = 0; v < runs.size(); ++v) {
        VariantRun& r = *runs[v];
        if (interrupted()) {
            not_compared.push_back(r.name + " (not run)");
            continue;
        }
        StudyOptions o = opt;
        o.first = block.first;
        o.replications = block.size();
        // The same seed for every variant: replication k draws the same primary delays everywhere.
        const DelayDrawer drawer(r.scenario, r.plan.trains);
        o.draw = [&drawer, seed](std::uint32_t k) { return drawer.draw(seed, k); };
        const auto t0 = std::chrono::steady_clock::now();
        o.progress = [&, v](std::uint32_t done, std::uint32_t planned) {
            if (!tty) return;
            const double el = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
            std::fprintf(stderr, "\r%s (%zu/%zu): %u/%u days  %.1f/s   ", r.name.c_str(), v + 1, runs.size(), done,
                         planned, el > 0 ? done / el : 0.0);
            if (done == planned) std::fprintf(stderr, "\n");
        };
        r.model = std::make_unique<SimModel>(r.scenario, r.plan.trains);
        if (shard_out) {
            shard_out->begin_variant();
            o.on_day = [&shard_out](const ReplicationFigures& day) { shard_out->add_day(day); };
        }
        if (spread) {
            std::optional<StudyResult> gathered =
                run_study_on_ranks(*r.model, o, study_fingerprint(scenario_hash(scenario_text, r.name), command_line), "compare");
            if (!gathered) continue;   // another rank than 0: its days went to rank 0
            r.study = std::move(*gathered);
        } else {
            r.study = run_study(*r.model, o);
        }
        if (r.study.partial) {
            not_compared.push_back(r.name + " (stopped after " + std::to_string(r.study.replications.size()) +
                                   " of " + std::to_string(o.replications) + " days)");
            continue;
        }
        r.summary = summarize_study(*r.model, r.study, o.thresholds);
        r.finished = true;
        if (shard_out) shard_out->end_variant(r.study);
    }

    if (shard) {   // a shard's days are in its file; the figures come from the merge
        if (!not_compared.empty()) {
            std::string list;
            for (const std::string& n : not_compared) list += (list.empty() ? "" : ", ") + n;
            std::fprintf(stderr, "knockon compare: stopped by Ctrl-C (%s); no shard file written: run the shard again\n",
                         list.c_str());
            return kInterruptedStatus;   // shard_out removes its temporary file
        }
        shard_out->finish();
        std::fputs(shard_done_text("compare", *shard, block, planned, vm["out"].as<std::string>(), false).c_str(), stdout);
        std::size_t deadlocked = 0, days = 0;
        for (const auto& r : runs) {
            deadlocked += r->summary.deadlocked;
            days += r->summary.replications;
        }
        return deadlock_status("compare", deadlocked, days, vm);
    }

    if (rank() != 0) return 0;   // rank 0 compares and reports
    std::vector<const VariantRun*> flat;
    for (const auto& r : runs)
        if (r->finished) flat.push_back(r.get());
    if (!not_compared.empty()) {
        std::string list;
        for (const std::string& n : not_compared) list += (list.empty() ? "" : ", ") + n;
        std::fprintf(stderr, "knockon compare: stopped by Ctrl-C; not compared: %s%s\n", list.c_str(),
                     out ? "; no results file written" : "");
        out.reset();   // removes its temporary file
        if (flat.size() < 2) {
            std::fprintf(stderr, "knockon compare: fewer than two variants finished: nothing to compare\n");
            return kInterruptedStatus;
        }
    }
    const std::vector<StudyComparison> cmp = compare_variants(flat, opt.thresholds);
    if (out) out->finish(compared_variants(flat), cmp, opt.thresholds);

    return print_comparison("compare", flat, cmp, {seed, opt.threads, opt.thresholds, command_line}, vm, not_compared);
}

}  // namespace knockon::cli
