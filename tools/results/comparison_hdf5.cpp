#include "tools/results/comparison_hdf5.hpp"

#include <algorithm>
#include <limits>
#include <optional>
#include <stdexcept>

#include "tools/results/deadlock_output.hpp"
#include "tools/results/hdf5_file.hpp"
#include "tools/results/study_hdf5.hpp"

namespace knockon {

namespace {

using h5::FieldKind;
using h5::RecordLayout;
using h5::RecordTable;

const double kNaN = std::numeric_limits<double>::quiet_NaN();

template <class Rows, class Get>
std::size_t longest(const Rows& rows, Get get) {
    std::size_t n = 0;
    for (const auto& r : rows) n = std::max(n, get(r).size());
    return n;
}

void write_variants(const h5::Group& g, const std::vector<ComparedVariant>& variants) {
    RecordTable t(g, "variants",
                  RecordLayout()
                      .add("index", FieldKind::u32)
                      .add_text("name", longest(variants, [](auto& v) -> auto& { return v.name; }))
                      .add_text("description", longest(variants, [](auto& v) -> auto& { return v.description; }))
                      .add("headway_pairs", FieldKind::u64)
                      .add("mean_minimum_headway", FieldKind::f64)
                      .add("peak_hour_consumption", FieldKind::f64)
                      .add_text("peak_hour_line_section",
                                longest(variants, [](auto& v) -> auto& { return v.plan.peak_section; }))
                      .add("day_consumption", FieldKind::f64)
                      .add_text("day_line_section",
                                longest(variants, [](auto& v) -> auto& { return v.plan.day_section; })));
    for (std::size_t i = 0; i < variants.size(); ++i) {
        const ComparedVariant& v = variants[i];
        t.begin()
            .u32(static_cast<std::uint32_t>(i))
            .text(v.name)
            .text(v.description)
            .u64(v.plan.headway_pairs)
            .f64(v.plan.mean_minimum_headway)
            .f64(v.plan.peak_consumption)
            .text(v.plan.peak_section)
            .f64(v.plan.day_consumption)
            .text(v.plan.day_section);
    }
    t.flush();
    describe(t,
             "index: 0-based order of the variants (0 = the reference), name: text, description: text, "
             "headway_pairs: count, mean_minimum_headway: s, peak_hour_consumption: share (0 to 1), "
             "peak_hour_line_section: text, day_consumption: share (0 to 1), day_line_section: text",
             "The variants compared, the reference first, each with the plan figures a signalling variant "
             "changes: mean minimum headway over all consecutive pairs of all line sections, and the largest "
             "peak-hour and day UIC 406 capacity consumption of any line section (and which one). Each "
             "variant's study figures are under /variants/<name>.");
}

void write_differences(const h5::Group& g, const std::vector<DifferenceRow>& rows) {
    RecordLayout layout;
    layout.add_text("variant", longest(rows, [](auto& r) -> auto& { return r.variant; }))
        .add_text("figure", longest(rows, [](auto& r) -> auto& { return r.figure; }))
        .add_text("unit", longest(rows, [](auto& r) -> auto& { return r.unit; }));
    add_estimate_fields(layout);
    RecordTable t(g, "differences", layout);
    for (const DifferenceRow& r : rows) {
        const Estimate& e = r.difference;
        t.begin().text(r.variant).text(r.figure).text(r.unit).f64(e.mean);
        if (r.paired())
            t.f64(e.half_width).f64(e.lower).f64(e.upper);
        else
            t.f64(kNaN).f64(kNaN).f64(kNaN);
        t.u64(e.n);
    }
    t.flush();
    describe(t, std::string("variant: text, figure: text, unit: text (s or share), ") + kEstimateUnits,
             "Each variant after the first minus the first (the reference): for the per-day figures the "
             "mean of the day-by-day differences (common random numbers) with its 95 % Student-t interval "
             "over the n days complete in both (not ended in deadlock); for the plan figures (plan_*, "
             "deterministic) the difference alone, interval NaN and n = 0.");
}

}  // namespace

std::vector<DifferenceRow> difference_rows(const std::vector<ComparedVariant>& variants,
                                           const std::vector<StudyComparison>& comparisons,
                                           const std::vector<double>& thresholds) {
    if (variants.empty() || comparisons.size() + 1 != variants.size())
        throw std::invalid_argument("difference_rows: one comparison per variant after the first is needed");
    std::vector<DifferenceRow> rows;
    const PlanFigures& ref = variants.front().plan;
    auto plan_row = [](double d) {
        Estimate e;
        e.mean = d;
        e.half_width = e.lower = e.upper = kNaN;
        e.n = 0;
        return e;
    };
    for (std::size_t v = 1; v < variants.size(); ++v) {
        const StudyComparison& c = comparisons[v - 1];
        const std::string& name = variants[v].name;
        rows.push_back({name, "total_knock_on", "s", c.total_knock_on.difference});
        rows.push_back({name, "mean_arrival_delay", "s", c.mean_arrival_delay.difference});
        rows.push_back({name, "total_primary", "s", c.total_primary.difference});
        for (std::size_t i = 0; i < thresholds.size() && i < c.punctuality.size(); ++i)
            rows.push_back({name, punctuality_field(thresholds[i]), "share", c.punctuality[i].difference});
        const PlanFigures& p = variants[v].plan;
        rows.push_back({name, "plan_mean_minimum_headway", "s", plan_row(p.mean_minimum_headway - ref.mean_minimum_headway)});
        rows.push_back({name, "plan_peak_hour_consumption", "share", plan_row(p.peak_consumption - ref.peak_consumption)});
        rows.push_back({name, "plan_day_consumption", "share", plan_row(p.day_consumption - ref.day_consumption)});
    }
    return rows;
}

struct ComparisonHdf5Writer::State {
    explicit State(const std::string& path) : file(path) {}
    h5::OutputFile file;
    bool finished = false;
};

ComparisonHdf5Writer::ComparisonHdf5Writer(const std::string& path, const Hdf5RunInfo& info)
    : state_(std::make_unique<State>(path)) {
    write_run_attributes(state_->file.root(), info, "comparison");
}

ComparisonHdf5Writer::~ComparisonHdf5Writer() = default;

void ComparisonHdf5Writer::finish(const std::vector<ComparedVariant>& variants,
                                  const std::vector<StudyComparison>& comparisons,
                                  const std::vector<double>& thresholds) {
    if (state_->finished) throw std::logic_error("ComparisonHdf5Writer: finished twice");
    if (variants.size() < 2) throw std::invalid_argument("ComparisonHdf5Writer: at least two variants are needed");
    const std::vector<DifferenceRow> rows = difference_rows(variants, comparisons, thresholds);
    {
        const h5::Group root = state_->file.root();
        const std::size_t days = variants.front().study->replications.size();
        root.attributes().set_u32("replications", static_cast<std::uint32_t>(days));
        std::vector<NamedSummary> named;
        for (const ComparedVariant& v : variants) named.push_back({v.name, v.summary});
        write_deadlock_attributes(root, deadlocked_days(named), comparison_deadlock_notice(named));
        {
            const h5::Group all = root.create_group("variants");
            for (const ComparedVariant& v : variants)
                write_study_tables(all.create_group(v.name), *v.model, *v.study, *v.summary);
        }
        const h5::Group g = root.create_group("comparison");
        g.attributes().set_text("differences_against", variants.front().name);
        g.attributes().set_u32("variants", static_cast<std::uint32_t>(variants.size()));
        g.attributes().set_f64_array("thresholds_s", thresholds);
        write_variants(g, variants);
        write_differences(g, rows);
    }  // every group and dataset closed before the file
    state_->file.commit();
    state_->finished = true;
}

}  // namespace knockon
