#include "tools/knockon/merge_comparison.hpp"

#include <memory>

#include "models/plan.hpp"
#include "sim/study.hpp"
#include "tools/results/comparison_hdf5.hpp"
#include "tools/results/hdf5_file.hpp"
#include "tools/results/results_file.hpp"
#include "tools/read/scenario_reader.hpp"
#include "tools/knockon/comparison_output.hpp"

namespace knockon::cli {

int merge_comparison(const std::vector<ShardFile>& shards, const po::variables_map& vm, const std::string& command_line) {
    const ShardFile& head = shards.front();   // shard 1: replication 0
    RunOptions run;
    run.step = head.step;
    // Each variant as compare makes it, from the text the shards ran (equal in all: same hash).
    std::vector<std::unique_ptr<VariantRun>> runs;
    for (const ShardDays& d : head.studies) {
        auto r = std::make_unique<VariantRun>();
        r->name = d.variant.name;
        r->description = d.variant.description;
        r->scenario = parse_scenario(head.run.scenario_text, head.scenario_file, r->name);
        r->plan = make_plan(r->scenario, run);
        r->figures = plan_figures(r->plan);
        r->model = std::make_unique<SimModel>(r->scenario, r->plan.trains);
        runs.push_back(std::move(r));
    }
    Hdf5RunInfo info;   // as compare writes it, but for the command line (provenance)
    info.scenario_file = head.scenario_file;
    info.scenario_name = runs.front()->scenario.name;
    info.command_line = command_line;
    info.seed = head.seed;
    info.step = head.step;
    ComparisonHdf5Writer out(vm["out"].as<std::string>(), info);

    // Variant by variant, shard by shard: the days of each variant come in replication order and
    // fold exactly as in one run; at most one shard's days of one variant are in memory.
    try {
        for (std::size_t v = 0; v < runs.size(); ++v) {
            VariantRun& r = *runs[v];
            const ShardDays& first = head.studies[v];
            r.study.figures = StudyFigures(head.run.thresholds, head.run.planned);
            r.study.train_ids = first.train_ids;
            r.study.section_names = first.section_names;
            r.study.timing_template = first.timing_template;
            for (const ShardFile& s : shards) {
                for (ReplicationFigures& d : read_shard_days(s, s.studies[v])) {
                    if (d.stats.replication != r.study.replications.size())
                        throw UsageError(s.path + ": variant " + r.name + ": replication " +
                                         std::to_string(d.stats.replication) + " where replication " +
                                         std::to_string(r.study.replications.size()) + " should come; the file is damaged");
                    fold_day(r.study, std::move(d));
                }
            }
            r.summary = summarize_study(*r.model, r.study, head.run.thresholds);
            r.finished = true;
        }
    } catch (const h5::Error& e) {
        throw UsageError(e.what());
    } catch (const ResultsFileError& e) {   // a number outside its rule (read_per_day_table)
        throw UsageError(e.what());
    }
    std::vector<const VariantRun*> flat;
    for (const auto& r : runs) flat.push_back(r.get());
    const std::vector<StudyComparison> cmp = compare_variants(flat, head.run.thresholds);
    out.finish(compared_variants(flat), cmp, head.run.thresholds);
    return print_comparison("merge", flat, cmp, {head.seed, 1, head.run.thresholds, command_line}, vm);
}

}  // namespace knockon::cli
