#include "tools/knockon/study_output.hpp"

#include <algorithm>
#include <cstdio>
#include <sstream>

#include "tools/results/attribution_output.hpp"
#include "tools/results/deadlock_output.hpp"
#include "tools/results/plan_output.hpp"

namespace knockon::cli {
namespace {

std::string fmt(const char* f, double a, double b) {
    char buf[96];
    std::snprintf(buf, sizeof buf, f, a, b);
    return buf;
}
// "12.3 ± 0.4 min"
std::string minutes(const Estimate& e) { return fmt("%.2f ± %.2f min", e.mean / 60.0, e.half_width / 60.0); }
std::string percent(const Estimate& e) {
    return fmt("%.1f %% (95 %% CI %.1f", 100.0 * e.mean, 100.0 * e.lower) + fmt("-%.1f %%)", 100.0 * e.upper, 0);
}

nlohmann::json est(const Estimate& e) {
    return {{"mean", e.mean}, {"ci95_half_width", e.half_width}, {"ci95_lower", e.lower}, {"ci95_upper", e.upper}, {"n", e.n}};
}

}  // namespace

std::string study_text(const Scenario& sc, const SimModel& model, const StudyResult& study, const StudySummary& s,
                       const StudyRunInfo& info) {
    std::ostringstream out;
    out << "knockon study: " << sc.name << " (" << sc.source_file << ")\n";
    // Deadlocked days first, before any figure.
    // (A study stopped by Ctrl-C exits 130 all the same.)
    if (s.deadlocked > 0)
        out << study_deadlock_notice(s)
            << (info.allow_deadlock ? " Accepted with --allow-deadlock."
                : study.partial     ? ""
                                    : " Exit status 3 (--allow-deadlock accepts it).")
            << "\n";
    out << "Caution: " << kSafetyCaution << "\n\n";
    out << s.replications << " simulated days (seed " << info.seed << ", ";
    if (info.processes > 1) out << info.processes << " processes of ";
    out << info.threads << " thread" << (info.threads == 1 ? "" : "s") << ")" << (study.partial ? ", PARTIAL: stopped before the planned number" : "")
        << "; " << s.deadlocked << " ended in deadlock";
    if (s.deadlocked > 0) out << "; the figures below are of the " << s.complete << " complete days";
    out << ".\n";
    if (s.complete == 0) {
        out << "No day ran to the end: there are no figures to give.\n";
        return out.str();
    }
    out << "Per day (mean ± 95 % CI half-width):\n";
    out << "  primary delay injected   " << minutes(s.total_primary) << "\n";
    out << "  knock-on delay           " << minutes(s.total_knock_on) << "\n";
    out << fmt("  knock-on / primary       %.2f\n", s.knock_on_ratio, 0);
    out << "  mean arrival delay       " << minutes(s.mean_arrival_delay) << "\n";
    if (s.connections > 0)
        out << fmt("  missed connections       %.2f", s.missed_connections.mean, 0)
            << fmt(" ± %.2f", s.missed_connections.half_width, 0) << " of " << s.connections << "\n";
    for (std::size_t i = 0; i < s.thresholds.size(); ++i)
        out << fmt("  punctual within %g min  ", s.thresholds[i] / 60.0, 0) << percent(s.punctuality[i])
            << " (delay below the threshold)\n";
    if (!model.single_track().empty()) {
        out << fmt("  crossings moved          %.2f ± %.2f (single track: crossed at another place than planned)\n",
                   s.moved_crossings.mean, s.moved_crossings.half_width);
        out << fmt("  orders changed           %.2f ± %.2f (single track: one direction, in another order)\n",
                   s.changed_orders.mean, s.changed_orders.half_width);
    }

    std::vector<TrainStats> trains = s.trains;
    std::stable_sort(trains.begin(), trains.end(),
                     [](const TrainStats& a, const TrainStats& b) { return a.knock_on.mean > b.knock_on.mean; });
    out << "\nTrains with most knock-on delay (mean per day: knock-on; primary; final delay):\n";
    for (std::size_t i = 0; i < std::min<std::size_t>(10, trains.size()); ++i) {
        const TrainStats& t = trains[i];
        if (t.knock_on.mean <= 0.0) break;
        out << "  " << study.train_ids[t.train] << ": " << minutes(t.knock_on) << "; " << minutes(t.primary) << "; "
            << minutes(t.final_delay) << "\n";
    }
    out << study_attribution_text(model, s.attribution, study.train_ids, study.timing_template, study.section_names);
    out << "\nSignals where trains stood longest (mean per day):\n";
    for (std::size_t i = 0; i < std::min<std::size_t>(10, s.signals.size()); ++i)
        out << "  " << s.signals[i].signal << ": " << minutes(s.signals[i].held) << "\n";
    if (s.signals.empty()) out << "  (none)\n";

    out << "\nThinnest buffers as run (planned buffer; as-run mean ± CI; 10 % of days below):\n";
    for (std::size_t i = 0; i < std::min<std::size_t>(8, s.buffers.size()); ++i) {
        const BufferStats& b = s.buffers[i];
        const SimModel::BufferPair& bp = model.buffer_pairs()[b.pair];
        out << "  " << study.train_ids[bp.leader] << " -> " << study.train_ids[bp.follower] << " ("
            << bp.line_section << ", " << study.section_names[bp.section] << "): "
            << fmt("%.0f s; %.0f", b.planned, b.as_run.mean) << fmt(" ± %.0f s; %.0f s\n", b.as_run.half_width, b.p10);
    }

    // Least punctual timing points at the first threshold.
    std::vector<const TimingPointStats*> tps;
    for (const TimingPointStats& tp : s.timing_points)
        if (!tp.punctuality.empty()) tps.push_back(&tp);
    std::stable_sort(tps.begin(), tps.end(), [](const TimingPointStats* a, const TimingPointStats* b) {
        return a->punctuality[0].mean < b->punctuality[0].mean;
    });
    if (!s.thresholds.empty()) {
        out << fmt("\nLeast punctual timing points (within %g min; arrival delay mean, p90, p95, max):\n",
                   s.thresholds[0] / 60.0, 0);
        for (std::size_t i = 0; i < std::min<std::size_t>(10, tps.size()); ++i) {
            const TimingPointStats& tp = *tps[i];
            out << "  " << study.train_ids[tp.train] << " at " << tp.station << ": " << percent(tp.punctuality[0])
                << "; " << fmt("%.1f, %.1f", tp.delay.mean / 60.0, tp.delay_quantiles.p90 / 60.0)
                << fmt(", %.1f, %.1f min\n", tp.delay_quantiles.p95 / 60.0, tp.delay_quantiles.max / 60.0);
        }
    }
    return out.str();
}

nlohmann::ordered_json study_json(const Scenario& sc, const SimModel& model, const StudyResult& study,
                                  const StudySummary& s, const StudyRunInfo& info) {
    nlohmann::json j;
    j["tool"] = {{"name", "knockon"}, {"version", KNOCKON_VERSION}};
    j["scenario"] = scenario_facts(sc);
    j["caution"] = kSafetyCaution;
    j["study"] = {{"replications", s.replications}, {"seed", info.seed}, {"threads", info.threads},
                  {"processes", info.processes},
                  {"partial", study.partial}, {"deadlocked_days", s.deadlocked}, {"complete_days", s.complete},
                  {"command_line", info.command_line}};
    j["per_day"] = {{"total_primary_s", est(s.total_primary)}, {"total_knock_on_s", est(s.total_knock_on)},
                    {"knock_on_ratio", s.knock_on_ratio}, {"mean_arrival_delay_s", est(s.mean_arrival_delay)},
                    {"moved_crossings", est(s.moved_crossings)}, {"changed_orders", est(s.changed_orders)},
                    {"connections", s.connections}, {"missed_connections", est(s.missed_connections)}};
    for (std::size_t i = 0; i < s.thresholds.size(); ++i)
        j["per_day"]["punctuality"].push_back({{"threshold_s", s.thresholds[i]}, {"share", est(s.punctuality[i])},
                                               {"rule", "delay strictly below the threshold"}});
    j["trains"] = nlohmann::json::array();
    for (const TrainStats& t : s.trains)
        j["trains"].push_back({{"train", study.train_ids[t.train]}, {"primary_s", est(t.primary)},
                               {"knock_on_s", est(t.knock_on)}, {"final_delay_s", est(t.final_delay)}});
    j["timing_points"] = nlohmann::json::array();
    for (const TimingPointStats& tp : s.timing_points) {
        nlohmann::json r = {{"train", study.train_ids[tp.train]}, {"station", tp.station}, {"stops", tp.stops},
                            {"reached", tp.reached}, {"arrival_delay_s", est(tp.delay)},
                            {"knock_on_s", est(tp.knock_on)},
                            {"p50_s", tp.delay_quantiles.p50}, {"p90_s", tp.delay_quantiles.p90},
                            {"p95_s", tp.delay_quantiles.p95}, {"max_s", tp.delay_quantiles.max}};
        for (std::size_t i = 0; i < tp.punctuality.size(); ++i)
            r["punctuality"].push_back({{"threshold_s", s.thresholds[i]}, {"share", est(tp.punctuality[i])}});
        j["timing_points"].push_back(std::move(r));
    }
    j["signals"] = nlohmann::json::array();
    for (const SignalStats& g : s.signals) j["signals"].push_back({{"signal", g.signal}, {"held_s", est(g.held)}});
    j["buffers"] = nlohmann::json::array();
    for (const BufferStats& b : s.buffers) {
        const SimModel::BufferPair& bp = model.buffer_pairs()[b.pair];
        j["buffers"].push_back({{"leader", study.train_ids[bp.leader]}, {"follower", study.train_ids[bp.follower]},
                                {"line_section", bp.line_section}, {"section", study.section_names[bp.section]},
                                {"planned_s", b.planned}, {"as_run_s", est(b.as_run)}, {"p10_s", b.p10}});
    }
    j["sections"] = nlohmann::json::array();
    for (std::size_t k = 0; k < s.section_blocked_share.size(); ++k)
        j["sections"].push_back({{"section", study.section_names[k]}, {"blocked_share", est(s.section_blocked_share[k])}});
    j["attribution"] = study_attribution_json(model, s.attribution, study.train_ids, study.timing_template,
                                              study.section_names);
    nlohmann::json deadlock = study_deadlock_json(s);
    deadlock["accepted"] = info.allow_deadlock;   // --allow-deadlock
    return deadlock_first(deadlock, j);
}

}  // namespace knockon::cli
