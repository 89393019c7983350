#include "tools/knockon/comparison_output.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <sstream>

#include "tools/knockon/interrupt.hpp"
#include "tools/knockon/options.hpp"

namespace knockon::cli {
namespace {


std::string fmt(const char* f, double a, double b = 0.0) {
    char buf[96];
    std::snprintf(buf, sizeof buf, f, a, b);
    return buf;
}
// "-" for a figure there is none of (no complete day to take it over).
std::string minutes(const Estimate& e) {
    return std::isfinite(e.mean) ? fmt("%.2f ± %.2f min", e.mean / 60.0, e.half_width / 60.0) : "-";
}
std::string signed_minutes(const Estimate& e) {
    return std::isfinite(e.mean) ? fmt("%+.2f ± %.2f min", e.mean / 60.0, e.half_width / 60.0) : "-";
}
std::string percent(const Estimate& e) {
    return std::isfinite(e.mean) ? fmt("%.1f ± %.1f %%", 100.0 * e.mean, 100.0 * e.half_width) : "-";
}
std::string signed_points(const Estimate& e) {
    return std::isfinite(e.mean) ? fmt("%+.2f ± %.2f pts", 100.0 * e.mean, 100.0 * e.half_width) : "-";
}

// A text table: first column labels, then one column per variant, left-aligned.
class TextColumns {
public:
    explicit TextColumns(std::size_t label_width) : label_width_(label_width) {}
    void row(const std::string& label, const std::vector<std::string>& cells) { rows_.push_back({label, cells}); }
    std::string str() const {
        std::vector<std::size_t> w;
        for (const auto& r : rows_)
            for (std::size_t i = 0; i < r.second.size(); ++i) {
                if (w.size() <= i) w.push_back(0);
                w[i] = std::max(w[i], display_width(r.second[i]));
            }
        std::string out;
        for (const auto& r : rows_) {
            std::string line = "  " + r.first;
            line += std::string(label_width_ > r.first.size() ? label_width_ - r.first.size() : 1, ' ');
            for (std::size_t i = 0; i < r.second.size(); ++i) {
                line += r.second[i];
                if (i + 1 < r.second.size()) line += std::string(w[i] - display_width(r.second[i]) + 3, ' ');
            }
            out += line + "\n";
        }
        return out;
    }

private:
    // Characters as seen on a terminal: UTF-8 continuation bytes (of ±, −) take no column.
    static std::size_t display_width(const std::string& s) {
        std::size_t n = 0;
        for (unsigned char c : s) n += (c & 0xC0) != 0x80;
        return n;
    }
    std::size_t label_width_;
    std::vector<std::pair<std::string, std::vector<std::string>>> rows_;
};

nlohmann::json est(const Estimate& e) {
    return {{"mean", e.mean}, {"ci95_half_width", e.half_width}, {"ci95_lower", e.lower}, {"ci95_upper", e.upper},
            {"n", e.n}};
}

nlohmann::json plan_json_figures(const PlanFigures& f) {
    return {{"headway_pairs", f.headway_pairs},
            {"mean_minimum_headway_s", f.mean_minimum_headway},
            {"peak_hour_consumption", f.peak_consumption},
            {"peak_hour_line_section", f.peak_section},
            {"day_consumption", f.day_consumption},
            {"day_line_section", f.day_section}};
}

}  // namespace

std::vector<NamedSummary> named_summaries(const std::vector<const VariantRun*>& runs) {
    std::vector<NamedSummary> out;
    for (const VariantRun* r : runs) out.push_back({r->name, &r->summary});
    return out;
}

std::vector<StudyComparison> compare_variants(const std::vector<const VariantRun*>& runs,
                                              const std::vector<double>& thresholds) {
    std::vector<StudyComparison> cmp;
    for (std::size_t v = 1; v < runs.size(); ++v)
        cmp.push_back(compare_studies(runs.front()->study, runs[v]->study, thresholds));
    return cmp;
}

std::vector<ComparedVariant> compared_variants(const std::vector<const VariantRun*>& runs) {
    std::vector<ComparedVariant> compared;
    for (const VariantRun* r : runs)
        compared.push_back({r->name, r->description, r->model.get(), &r->study, &r->summary, r->figures});
    return compared;
}

std::string compare_text(const std::vector<const VariantRun*>& runs, const std::vector<StudyComparison>& cmp,
                         std::uint64_t seed, unsigned threads, const std::vector<double>& thresholds,
                         bool allow_deadlock) {
    const VariantRun& first = *runs.front();
    std::ostringstream out;
    out << "knockon compare: " << first.scenario.name << " (" << first.scenario.source_file << ")\n";
    // Deadlocked days first, before any figure.
    const std::string notice = comparison_deadlock_notice(named_summaries(runs));
    if (!notice.empty())
        out << notice
            << (allow_deadlock ? " Accepted with --allow-deadlock." : " Exit status 3 (--allow-deadlock accepts it).")
            << "\n";
    out << "Caution: " << kSafetyCaution << "\n\n";
    out << first.study.replications.size() << " simulated days per variant (seed " << seed << ", " << threads
        << " thread" << (threads == 1 ? "" : "s") << ").  Every variant sees the same primary delays\n"
        << "(common random numbers), so the differences are the variants', not the dice's.\n\n";
    out << "Variants:\n";
    for (const VariantRun* r : runs)
        out << "  " << r->name << ": " << (r->description.empty() ? "(no description)" : r->description) << "\n";

    std::vector<std::string> names;
    for (const VariantRun* r : runs) names.push_back(r->name);
    const std::size_t lw = 30;

    out << "\nPer day (mean ± 95 % CI half-width, over each variant's complete days):\n";
    TextColumns per_day(lw);
    per_day.row("", names);
    auto row = [&](TextColumns& t, const std::string& label, auto cell) {
        std::vector<std::string> cells;
        for (const VariantRun* r : runs) cells.push_back(cell(*r));
        t.row(label, cells);
    };
    row(per_day, "primary delay injected", [](const VariantRun& r) { return minutes(r.summary.total_primary); });
    row(per_day, "knock-on delay", [](const VariantRun& r) { return minutes(r.summary.total_knock_on); });
    row(per_day, "mean arrival delay", [](const VariantRun& r) { return minutes(r.summary.mean_arrival_delay); });
    for (std::size_t i = 0; i < thresholds.size(); ++i)
        row(per_day, fmt("punctual within %g min", thresholds[i] / 60.0),
            [i](const VariantRun& r) { return percent(r.summary.punctuality[i]); });
    // Where a variant has single track: what the dispatcher changed (sim/crossing_changes.hpp).
    const bool single_track = std::any_of(runs.begin(), runs.end(), [](const VariantRun* r) {
        return r->model && !r->model->single_track().empty();
    });
    if (single_track) {
        const auto count = [](const Estimate& e) { return fmt("%.2f", e.mean) + fmt(" ± %.2f", e.half_width); };
        row(per_day, "crossings moved", [&](const VariantRun& r) { return count(r.summary.moved_crossings); });
        row(per_day, "orders changed", [&](const VariantRun& r) { return count(r.summary.changed_orders); });
    }
    row(per_day, "days ended in deadlock",
        [](const VariantRun& r) { return std::to_string(r.summary.deadlocked); });
    row(per_day, "complete days",
        [](const VariantRun& r) { return std::to_string(r.summary.complete); });
    out << per_day.str();

    if (runs.size() > 1) {
        out << "\nPaired differences against " << first.name
            << " (variant minus " << first.name
            << ", day by day over the days complete in both; mean ± 95 % CI half-width):\n";
        TextColumns diff(lw);
        std::vector<std::string> others(names.begin() + 1, names.end());
        diff.row("", others);
        auto drow = [&](const std::string& label, auto cell) {
            std::vector<std::string> cells;
            for (const StudyComparison& c : cmp) cells.push_back(cell(c));
            diff.row(label, cells);
        };
        drow("knock-on delay", [](const StudyComparison& c) { return signed_minutes(c.total_knock_on.difference); });
        drow("mean arrival delay",
             [](const StudyComparison& c) { return signed_minutes(c.mean_arrival_delay.difference); });
        for (std::size_t i = 0; i < thresholds.size(); ++i)
            drow(fmt("punctual within %g min", thresholds[i] / 60.0),
                 [i](const StudyComparison& c) { return signed_points(c.punctuality[i].difference); });
        drow("primary delay injected",
             [](const StudyComparison& c) { return signed_minutes(c.total_primary.difference); });
        drow("days paired", [](const StudyComparison& c) { return std::to_string(c.paired); });
        out << diff.str();
        out << "  (A difference whose interval excludes 0 is unlikely to be chance; primary delay differs\n"
               "  only where a variant changes the delays or the trains themselves.)\n";
    }

    out << "\nPlan (deterministic, from the timetable analysis):\n";
    TextColumns plan(lw);
    plan.row("", names);
    row(plan, "mean minimum headway", [](const VariantRun& r) {
        return fmt("%.1f s", r.figures.mean_minimum_headway) + " (" + std::to_string(r.figures.headway_pairs) +
               " pairs)";
    });
    row(plan, "peak-hour consumption (max)", [](const VariantRun& r) {
        return fmt("%.1f %%", 100.0 * r.figures.peak_consumption) + " " + r.figures.peak_section;
    });
    row(plan, "day consumption (max)", [](const VariantRun& r) {
        return fmt("%.1f %%", 100.0 * r.figures.day_consumption) + " " + r.figures.day_section;
    });
    out << plan.str();
    if (runs.size() > 1) {
        out << "Differences against " << first.name << ":\n";
        TextColumns pd(lw);
        std::vector<std::string> others(names.begin() + 1, names.end());
        pd.row("", others);
        auto prow = [&](const std::string& label, auto cell) {
            std::vector<std::string> cells;
            for (std::size_t i = 1; i < runs.size(); ++i) cells.push_back(cell(runs[i]->figures, first.figures));
            pd.row(label, cells);
        };
        prow("mean minimum headway", [](const PlanFigures& v, const PlanFigures& b) {
            return fmt("%+.1f s", v.mean_minimum_headway - b.mean_minimum_headway);
        });
        prow("peak-hour consumption (max)", [](const PlanFigures& v, const PlanFigures& b) {
            return fmt("%+.1f pts", 100.0 * (v.peak_consumption - b.peak_consumption));
        });
        prow("day consumption (max)", [](const PlanFigures& v, const PlanFigures& b) {
            return fmt("%+.1f pts", 100.0 * (v.day_consumption - b.day_consumption));
        });
        out << pd.str();
    }
    return out.str();
}

nlohmann::json compare_deadlock_json(const std::vector<const VariantRun*>& runs, bool allow_deadlock) {
    const std::vector<NamedSummary> named = named_summaries(runs);
    nlohmann::json j = {{"deadlocked_days", deadlocked_days(named)},
                        {"notice", comparison_deadlock_notice(named)},
                        {"accepted", allow_deadlock}};
    j["variants"] = nlohmann::json::array();
    for (const VariantRun* r : runs) {
        nlohmann::json v = study_deadlock_json(r->summary);
        v["name"] = r->name;
        j["variants"].push_back(std::move(v));
    }
    return j;
}

nlohmann::json compare_json(const std::vector<const VariantRun*>& runs, const std::vector<StudyComparison>& cmp,
                            std::uint64_t seed, unsigned threads, const std::vector<double>& thresholds,
                            const std::string& command_line) {
    nlohmann::json j;
    j["tool"] = {{"name", "knockon"}, {"version", KNOCKON_VERSION}};
    j["scenario_file"] = runs.front()->scenario.source_file;
    j["caution"] = kSafetyCaution;
    j["study"] = {{"replications", runs.front()->study.replications.size()},
                  {"seed", seed},
                  {"threads", threads},
                  {"common_random_numbers", true},
                  {"differences_against", runs.front()->name},
                  {"command_line", command_line}};
    j["variants"] = nlohmann::json::array();
    for (std::size_t v = 0; v < runs.size(); ++v) {
        const VariantRun& r = *runs[v];
        const StudySummary& s = r.summary;
        nlohmann::json per_day = {{"total_primary_s", est(s.total_primary)},
                                  {"total_knock_on_s", est(s.total_knock_on)},
                                  {"mean_arrival_delay_s", est(s.mean_arrival_delay)},
                                  {"deadlocked_days", s.deadlocked},
                                  {"complete_days", s.complete}};
        for (std::size_t i = 0; i < thresholds.size(); ++i)
            per_day["punctuality"].push_back({{"threshold_s", thresholds[i]}, {"share", est(s.punctuality[i])}});
        nlohmann::json jv = {{"name", r.name},
                             {"description", r.description},
                             {"scenario", scenario_facts(r.scenario)},
                             {"per_day", per_day},
                             {"plan", plan_json_figures(r.figures)},
                             {"difference", nullptr}};
        if (v > 0) {
            const StudyComparison& c = cmp[v - 1];
            const PlanFigures &f = r.figures, &b = runs.front()->figures;
            nlohmann::json d = {{"against", runs.front()->name},
                                {"paired_days", c.paired},
                                {"total_knock_on_s", est(c.total_knock_on.difference)},
                                {"mean_arrival_delay_s", est(c.mean_arrival_delay.difference)},
                                {"total_primary_s", est(c.total_primary.difference)},
                                {"mean_minimum_headway_s", f.mean_minimum_headway - b.mean_minimum_headway},
                                {"peak_hour_consumption", f.peak_consumption - b.peak_consumption},
                                {"day_consumption", f.day_consumption - b.day_consumption}};
            for (std::size_t i = 0; i < thresholds.size(); ++i)
                d["punctuality"].push_back(
                    {{"threshold_s", thresholds[i]}, {"share", est(c.punctuality[i].difference)}});
            jv["difference"] = d;
        }
        j["variants"].push_back(std::move(jv));
    }
    j["notes"] = {"Per-day figures are means over each variant's complete days (days that ended in deadlock are "
                  "left out) with 95 % confidence intervals; differences are variant minus the first variant, "
                  "replication by replication over the days complete in both, with the same primary delays "
                  "(common random numbers).",
                  "Times in seconds; shares 0..1; consumption is the largest over the line sections.",
                  kUic406Note};
    return j;
}

int print_comparison(const std::string& command, const std::vector<const VariantRun*>& runs,
                     const std::vector<StudyComparison>& cmp, const ComparisonRunInfo& info,
                     const boost::program_options::variables_map& vm, const std::vector<std::string>& not_compared) {
    if (vm.count("json")) {
        nlohmann::json j = compare_json(runs, cmp, info.seed, info.threads, info.thresholds, info.command_line);
        j["partial"] = !not_compared.empty();
        j["not_compared"] = not_compared;
        std::printf("%s\n", deadlock_first(compare_deadlock_json(runs, allow_deadlock(vm)), j).dump(1).c_str());
    } else {
        if (!not_compared.empty()) {
            std::string list;
            for (const std::string& n : not_compared) list += "\n  " + n;
            std::printf("PARTIAL: stopped by Ctrl-C; not compared:%s\n\n", list.c_str());
        }
        std::fputs(compare_text(runs, cmp, info.seed, info.threads, info.thresholds, allow_deadlock(vm)).c_str(), stdout);
    }
    if (!not_compared.empty()) return kInterruptedStatus;
    std::size_t days = 0;
    for (const VariantRun* r : runs) days += r->summary.replications;
    return deadlock_status(command, deadlocked_days(named_summaries(runs)), days, vm);
}

}  // namespace knockon::cli
