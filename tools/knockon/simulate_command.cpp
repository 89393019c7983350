#include <atomic>
#include <chrono>
#include <cstdio>
#include <memory>
#include <optional>
#include <sstream>
#include <unistd.h>

#include <nlohmann/json.hpp>

#include "models/plan.hpp"
#include "models/units.hpp"
#include "sim/attribution.hpp"
#include "sim/day_summary.hpp"
#include "sim/delay_draws.hpp"
#include "sim/shards.hpp"
#include "sim/simulation.hpp"
#include "sim/study.hpp"
#include "tools/results/attribution_output.hpp"
#include "tools/results/deadlock_output.hpp"
#include "tools/results/output_file.hpp"
#include "tools/results/plan_output.hpp"
#include "tools/read/scenario_hash.hpp"
#include "tools/read/scenario_reader.hpp"
#include "tools/results/shard_hdf5.hpp"
#include "tools/results/sim_hdf5.hpp"
#include "tools/results/study_hdf5.hpp"
#include "tools/knockon/delay_option.hpp"
#include "tools/knockon/interrupt.hpp"
#include "tools/knockon/options.hpp"
#include "tools/knockon/rank_study.hpp"
#include "tools/knockon/ranks.hpp"
#include "tools/knockon/study_output.hpp"

namespace knockon::cli {
namespace {

std::string minutes(double s) {
    char buf[32];
    std::snprintf(buf, sizeof buf, "%.1f min", s / 60.0);
    return buf;
}

// "left QLM at 06:00:00, 0.0 min late": where an unfinished train got to.
std::string last_reached(const SimResult& r, const TrainDelay& td) {
    if (td.last_reached < 0) return "not yet on the line";
    const TimingRecord& t = r.timing[static_cast<std::size_t>(td.last_reached)];
    const bool left = !std::isnan(t.departure);
    const double at = left ? t.departure : t.arrival;
    const double delay = left ? t.departure_delay : t.arrival_delay;
    std::string out = std::string(!t.stops ? "passed " : left ? "left " : "reached ") + t.station + " at " +
                      format_time_of_day(at);
    if (!std::isnan(delay)) out += ", " + minutes(std::max(0.0, delay)) + " late";
    return out;
}

// Where the day crossed or ordered trains on single track otherwise than planned (nothing on a
// line without single track).
std::string crossing_changes_text(const SimResult& r) {
    if (r.crossing_changes.empty()) return {};
    std::ostringstream out;
    out << "\nSingle track, crossings and orders other than planned: " << r.crossing_changes.size()
        << " (change: delay on leaving the later place minus on reaching the earlier; + lost, - gained)\n";
    auto change = [](double v) {
        if (std::isnan(v)) return std::string("n/a");
        char buf[32];
        std::snprintf(buf, sizeof buf, "%+.1f min", v / 60.0);
        return std::string(buf);
    };
    auto place = [](const std::string& p) { return p.empty() ? std::string("none") : p; };
    for (const CrossingChange& c : r.crossing_changes)
        out << "  " << format_time_of_day(c.when) << "  " << to_string(c.kind) << ": " << r.train_ids[c.first] << " / "
            << r.train_ids[c.second] << ", planned at " << place(c.planned_place) << ", ran at "
            << place(c.actual_place) << "; " << r.train_ids[c.first] << " " << change(c.first_change) << ", "
            << r.train_ids[c.second] << " " << change(c.second_change) << "\n";
    return out.str();
}

std::string summary_text(const Scenario& sc, const SimResult& r, const DaySummary& d, const DayAttribution& a) {
    std::ostringstream out;
    out << "knockon simulate: " << sc.name << " (" << sc.source_file << ")\n";
    // A deadlock first, before any figure: the day is incomplete.
    if (!d.complete) out << day_deadlock_notice(r.deadlock, d.trains, d.trains - d.finished) << "\n";
    out << "Caution: " << kSafetyCaution << "\n\n";
    out << d.trains << " trains, " << d.finished << " reached their last timing point; " << r.events
        << " events, " << r.block_passages << " block passages.\n";
    if (!d.complete) {
        out << "DEADLOCK at " << format_time_of_day(r.deadlock.time) << ": the trains left waiting:\n";
        std::istringstream lines(r.deadlock.description);
        for (std::string line; std::getline(lines, line);) out << "  " << line << "\n";
        out << "\nWhat the INCOMPLETE day did before it stopped (no punctuality, mean or total delay: "
            << d.trains - d.finished << " of " << d.trains << " trains never reached their last timing point):\n";
        out << "Arrivals and passes recorded: " << d.arrivals << ".\n";
        out << "Time standing at signals, stands ended before the deadlock: " << minutes(d.total_held) << ".\n";
        out << "\nTrains that never reached their last timing point (where they got to):\n";
        for (const TrainDelay& td : d.trains_by_delay)
            if (!td.finished) out << "  " << r.train_ids[td.train] << ": " << last_reached(r, td) << "\n";
        return out.str();
    }
    out << "Arrivals and passes recorded: " << d.arrivals << "; mean delay " << minutes(d.mean_arrival_delay) << ".\n";
    for (std::size_t i = 0; i < d.thresholds.size(); ++i) {
        char buf[96];
        std::snprintf(buf, sizeof buf, "Punctuality within %g min (delay < %.0f s): %.1f %%\n", d.thresholds[i] / 60.0,
                      d.thresholds[i], 100.0 * d.punctuality[i]);
        out << buf;
    }
    out << "Total delay at last timing points: " << minutes(d.total_final_delay) << "; time standing at signals: "
        << minutes(d.total_held) << ".\n";
    if (!r.links.empty())
        out << "Links: " << r.links.size() << " (turnarounds, connections, crew links); " << d.missed_connections
            << " of " << d.connections << " connection(s) missed; trains waited " << minutes(d.total_link_wait)
            << " for links beyond being ready themselves.\n";
    std::size_t shown = 0;
    for (const TrainDelay& td : d.trains_by_delay) {
        if (td.final_delay < 1.0 || shown == 10) break;
        if (!shown++) out << "\nMost delayed trains (final delay, largest delay, held at signals):\n";
        out << "  " << r.train_ids[td.train] << ": " << minutes(td.final_delay) << ", " << minutes(td.max_delay) << ", "
            << minutes(td.held) << "\n";
    }
    if (!shown) out << "No train ends late.\n";
    out << day_attribution_text(r, a);
    out << crossing_changes_text(r);
    return out.str();
}

nlohmann::ordered_json summary_json(const Scenario& sc, const SimResult& r, const DaySummary& d, const DayAttribution& a) {
    nlohmann::json j;
    j["tool"] = {{"name", "knockon"}, {"version", KNOCKON_VERSION}};
    j["scenario"] = scenario_facts(sc);
    j["caution"] = kSafetyCaution;
    j["events"] = r.events;
    j["block_passages"] = r.block_passages;
    auto num = [](double v) { return std::isnan(v) ? nlohmann::json(nullptr) : nlohmann::json(v); };
    // An incomplete day (deadlock) has no punctuality, mean or total delay: null, with `complete`
    // false and the trains that never reached their last timing point counted.
    j["summary"] = {{"complete", d.complete}, {"trains", d.trains}, {"finished", d.finished},
                    {"trains_not_finished", d.trains - d.finished}, {"arrivals", d.arrivals},
                    {"mean_arrival_delay_s", num(d.mean_arrival_delay)},
                    {"total_final_delay_s", num(d.total_final_delay)}, {"total_held_s", d.total_held},
                    {"connections", d.connections}, {"missed_connections", d.missed_connections},
                    {"total_link_wait_s", d.total_link_wait}};
    for (std::size_t i = 0; i < d.thresholds.size(); ++i)
        j["summary"]["punctuality"].push_back({{"threshold_s", d.thresholds[i]}, {"share", num(d.punctuality[i])},
                                               {"rule", "delay strictly below the threshold"}});
    for (const TimingRecord& t : r.timing)
        j["timing"].push_back({{"train", r.train_ids[t.train]}, {"station", t.station}, {"stops", t.stops},
                               {"scheduled_arrival", num(t.scheduled_arrival)},
                               {"scheduled_departure", num(t.scheduled_departure)}, {"arrival", num(t.arrival)},
                               {"departure", num(t.departure)}, {"arrival_delay", num(t.arrival_delay)},
                               {"departure_delay", num(t.departure_delay)}, {"knock_on", t.knock_on}});
    for (const RouteRecord& rr : r.routes)
        j["routes"].push_back({{"train", r.train_ids[rr.train]}, {"entry_signal", rr.entry_signal},
                               {"exit_signal", rr.exit_signal}, {"requested", num(rr.requested)},
                               {"granted", num(rr.granted)}, {"cleared", num(rr.cleared)}});
    // Holds at signals and waits at stops, each with what held it (sim_result.hpp HoldCause).
    auto cause = [&](const HoldCause& c) {
        nlohmann::json k = {{"kind", to_string(c.kind)}};
        if (c.train != HoldCause::kNone) k["train"] = r.train_ids[c.train];
        if (c.section != HoldCause::kNone) k["section"] = r.section_names[c.section];
        if (!c.signal.empty()) k["signal"] = c.signal;
        if (c.link != HoldCause::kNone) k["link"] = c.link;
        return k;
    };
    j["holds"] = nlohmann::json::array();
    for (const HoldRecord& h : r.holds)
        j["holds"].push_back({{"train", r.train_ids[h.train]}, {"signal", h.signal}, {"from", h.from}, {"to", h.to},
                              {"cause", cause(h.cause)}});
    j["waits"] = nlohmann::json::array();
    for (const HoldRecord& h : r.waits)
        j["waits"].push_back({{"train", r.train_ids[h.train]}, {"station", h.station}, {"from", h.from}, {"to", h.to},
                              {"cause", cause(h.cause)}});
    j["links"] = nlohmann::json::array();
    for (const LinkRecord& l : r.links)
        j["links"].push_back({{"from", r.train_ids[l.from]}, {"to", r.train_ids[l.to]}, {"connection", l.connection},
                              {"arrival", num(l.arrival)}, {"departure", num(l.departure)}, {"waited_s", l.waited},
                              {"missed", l.missed}});
    j["crossing_changes"] = nlohmann::json::array();
    for (const CrossingChange& c : r.crossing_changes)
        j["crossing_changes"].push_back({{"kind", to_string(c.kind)},
                                         {"first", r.train_ids[c.first]},
                                         {"second", r.train_ids[c.second]},
                                         {"planned_place", c.planned_place},
                                         {"actual_place", c.actual_place},
                                         {"time", c.when},
                                         {"first_change_s", num(c.first_change)},
                                         {"second_change_s", num(c.second_change)}});
    j["attribution"] = day_attribution_json(r, a);
    nlohmann::json deadlock = day_deadlock_json(r.deadlock, r.train_ids, r.section_names, d.trains - d.finished);
    deadlock["notice"] = day_deadlock_notice(r.deadlock, d.trains, d.trains - d.finished);
    return deadlock_first(deadlock, j);
}

// The variant a results file records: "base" for the scenario as written.
std::string variant_name(const po::variables_map& vm) {
    return vm.count("variant") ? vm["variant"].as<std::string>() : std::string("base");
}

int run_study_command(const po::variables_map& vm, const Scenario& scenario, const std::string& scenario_text,
                      const ServicePaths& paths, const std::vector<TrainPlan>& plan, const SimOptions& so,
                      const std::string& command_line) {
    StudyOptions opt;
    opt.replications = static_cast<std::uint32_t>(count_option(vm, "replications", 1, 10'000'000));
    opt.threads = static_cast<unsigned>(count_option(vm, "threads", 1, 256));
    if (vm.count("until-ci")) {
        const double x = vm["until-ci"].as<double>();
        if (!(x > 0.0)) throw UsageError("--until-ci must be a positive number of minutes");
        opt.until_ci = 60.0 * x;
    }
    TraceSelection traces;
    if (vm.count("traces")) {
        const std::string text = vm["traces"].as<std::string>();
        const auto parsed = parse_trace_selection(text);
        if (!parsed) throw UsageError("--traces must be none, all or sample:K (K a whole number, at least 1), not '" + text + "'");
        if (!vm.count("out")) throw UsageError("--traces needs --out: the traced days are written to the HDF5 file");
        traces = *parsed;
    }
    opt.sim = so;
    opt.thresholds = punctuality_thresholds(vm);
    // --shard K/N: this process runs one contiguous block of the planned replications.
    const std::uint32_t planned = opt.replications;
    const std::optional<ShardChoice> shard = shard_option(vm);
    // Under mpirun every rank runs its block of the days and rank 0 gathers them (rank_study).
    const bool spread = spread_over_ranks();
    if (spread && vm.count("until-ci"))
        throw UsageError("--until-ci cannot be spread over processes: when to stop depends on every earlier day");
    ShardRun shard_run;
    ReplicationRange block;
    if (shard) {
        block = shard_block(vm, *shard, planned, "a study's");
        opt.first = block.first;
        opt.replications = block.size();
        shard_run = cli::shard_run(vm, *shard, planned, block, scenario_text, opt.thresholds);
        shard_run.sample = so.sample_interval;
        shard_run.traces = traces.text();
    }
    const std::uint64_t seed = count_option(vm, "seed", 0, UINT64_MAX);
    if (scenario.delays.empty())
        std::fprintf(stderr, "knockon simulate: note: the scenario has no `delays:` section, so every day is the same\n");
    const DelayDrawer drawer(scenario, plan);
    opt.draw = [&](std::uint32_t k) { return drawer.draw(seed, k); };

    // Progress on stderr only when it is a terminal, a few times a second at most.
    const bool tty = ::isatty(2);
    const auto t0 = std::chrono::steady_clock::now();
    opt.progress = [&](std::uint32_t done, std::uint32_t planned) {
        if (!tty) return;
        const double el = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
        const double rate = el > 0 ? done / el : 0.0;
        const double eta = rate > 0 ? (planned - done) / rate : 0.0;
        std::fprintf(stderr, "\r%u/%u days  %.1f/s  ETA %.0f s   ", done, planned, rate, eta);
        if (done == planned) std::fprintf(stderr, "\n");
    };
    // Lives until the file is done: it still ends whole.  Not under mpirun, where a signal ends
    // every rank at once and leaves no file (a partial study would need every rank's days).
    std::optional<InterruptGuard> interrupt;
    if (!spread) interrupt.emplace();
    opt.stop = interrupt ? interrupt->stop_flag() : nullptr;
    const auto interrupted = [&interrupt] { return interrupt && interrupt->interrupted(); };

    // --out: the file is open under a temporary name while the days run, the traced ones are written
    // as they are handed over (in replication order, on this thread), /study at the end; it appears
    // at --out only when complete, and is removed if anything fails first.
    std::unique_ptr<StudyHdf5Writer> out;
    std::unique_ptr<ShardHdf5Writer> shard_out;
    if (vm.count("out") && rank() == 0) {   // only rank 0 writes
        Hdf5RunInfo h5info;
        h5info.scenario_file = scenario.source_file;
        h5info.scenario_name = scenario.name;
        h5info.command_line = command_line_without_threads(command_line);
        h5info.seed = seed;
        h5info.variant = variant_name(vm);
        h5info.step = so.run.step;
        h5info.scenario_hash = scenario_hash(scenario_text, h5info.variant);
        const std::string path = vm["out"].as<std::string>();
        if (shard) {
            shard_out = std::make_unique<ShardHdf5Writer>(path, h5info, shard_run);
            opt.on_day = [&shard_out](const ReplicationFigures& day) { shard_out->add_day(day); };
        } else {
            out = std::make_unique<StudyHdf5Writer>(path, h5info, traces);
        }
        if (traces.mode != TraceSelection::Mode::none) {
            // Which days are traced depends on the whole study's planned days, not a shard's.
            opt.trace = [traces, planned](std::uint32_t k) { return traces.traced(k, planned); };
            // A traced day's attribution needs its primary delays: drawn again (the same draws).
            opt.on_trace = [&out, &shard_out, &drawer, seed](std::uint32_t k, const SimResult& day) {
                const DayAttribution a = attribute_knock_on(day, drawer.draw(seed, k));
                if (shard_out) shard_out->write_trace(k, day, &a);
                else out->write_trace(k, day, &a);
            };
        }
    }
    SimModel model(paths, plan);
    const auto fingerprint = [&] { return study_fingerprint(scenario_hash(scenario_text, variant_name(vm)), command_line); };
    std::optional<StudyResult> gathered =
        spread ? run_study_on_ranks(model, opt, fingerprint(), "simulate") : run_study(model, opt);
    if (!gathered) return 0;   // another rank than 0: its days went to rank 0, which reports
    StudyResult& study = *gathered;
    if (tty) std::fprintf(stderr, "\n");
    StudySummary summary = summarize_study(model, study, opt.thresholds);
    if (shard_out) {
        shard_out->finish(study);
        std::fputs(shard_done_text("simulate", *shard, block, planned, vm["out"].as<std::string>(), study.partial).c_str(),
                   stdout);
        if (interrupted()) return kInterruptedStatus;
        return deadlock_status("simulate", summary.deadlocked, summary.replications, vm);
    }
    if (out) out->finish(model, study, summary);
    StudyRunInfo info{seed, opt.threads, command_line, allow_deadlock(vm), static_cast<unsigned>(rank_count())};
    if (vm.count("json"))
        std::printf("%s\n", study_json(scenario, model, study, summary, info).dump(1).c_str());
    else
        std::fputs(study_text(scenario, model, study, summary, info).c_str(), stdout);
    if (interrupted()) return kInterruptedStatus;
    return deadlock_status("simulate", summary.deadlocked, summary.replications, vm);
}

}  // namespace

int simulate(const std::vector<std::string>& args) {
    std::string command_line = "knockon simulate";
    for (const std::string& a : args) command_line += " " + a;
    po::options_description options("simulate options");
    options.add_options()("json", "print one JSON document instead of the summary")(
        "out", po::value<std::string>(),
        "write the results to this HDF5 file (a study: per-day figures, statistics and traced days)")(
        "delay", po::value<std::vector<std::string>>()->composing(),
        "inject a delay: TRAIN:entry:MINUTES, TRAIN:dwell@STATION:MINUTES or TRAIN:run@STATION:MINUTES (repeatable)")(
        "sample", po::value<double>()->default_value(0.0), "record trajectories every this many seconds (0: none)")(
        "step", po::value<double>()->default_value(2.0), "distance step of the motion integration [m]")(
        "variant", po::value<std::string>(), "apply this variant of the scenario file (base: none)")(
        "replications", po::value<std::string>(), "run a Monte Carlo study of this many days with drawn primary delays")(
        "seed", po::value<std::string>()->default_value("1"), "random seed of the study")(
        "threads", po::value<std::string>()->default_value("1"), "threads for the study, per process under mpirun (results do not depend on it)")(
        "until-ci", po::value<double>(),
        "go on until the 95 % CI half-width of the mean knock-on per day (over the complete days, at least "
        "10) is below this many minutes (--replications is then the cap)")(
        "traces", po::value<std::string>(),
        "with --replications and --out: days whose full records go into the file: none (default), all, or "
        "sample:K (K days spread evenly)")(
        "shard", po::value<std::string>(),
        "with --replications and --out: run shard K/N of the study, one contiguous block of the days, into a "
        "shard file for knockon merge");
    add_order_option(options);
    add_deadlock_option(options);
    add_punctuality_option(options);
    po::variables_map vm;
    if (!parse_command_line("simulate", args, options, vm)) return 0;
    SimOptions so;
    so.sample_interval = sample_option(vm);
    so.run.step = step_option(vm);
    // Checked before any work: thresholds that would share a results field are refused.
    const std::vector<double> thresholds = punctuality_thresholds(vm);

    if (vm.count("out")) check_output_path(vm["out"].as<std::string>(), {vm["scenario"].as<std::string>()});

    const std::string variant = vm.count("variant") ? vm["variant"].as<std::string>() : std::string();
    const std::string scenario_path = vm["scenario"].as<std::string>();
    const std::string scenario_text = read_scenario_text(scenario_path);
    Scenario scenario = parse_scenario(scenario_text, scenario_path, variant);
    so.route_order = route_order_option(vm, scenario);
    // Paths laid once, for the plan and the simulation's model.
    const std::unique_ptr<ServicePaths> paths = scenario_paths(scenario);
    std::vector<TrainPlan> plan = plan_trains(scenario, *paths, so.run);
    check_sample_count(plan, so.sample_interval);
    if (vm.count("replications")) {
        if (vm.count("delay")) throw UsageError("--delay is for a single day; a study draws its delays from the scenario");
        return run_study_command(vm, scenario, scenario_text, *paths, plan, so, command_line);
    }
    if (vm.count("shard")) throw UsageError("--shard needs --replications: it runs a share of a study's days");
    if (spread_over_ranks())
        throw UsageError("one day runs in one process: under mpirun only a study (--replications) is spread over "
                         "the processes");
    if (vm.count("until-ci")) throw UsageError("--until-ci needs --replications (the cap)");
    if (vm.count("traces")) throw UsageError("--traces needs --replications: a single day's --out has all its records");
    InjectedDelays delays = parse_delays(
        vm.count("delay") ? vm["delay"].as<std::vector<std::string>>() : std::vector<std::string>{}, plan);
    SimModel model(*paths, plan);
    SimResult result = simulate_day(model, delays, so);
    DaySummary summary = summarize_day(result, thresholds);
    const DayAttribution attribution = attribute_knock_on(result, delays);
    if (vm.count("out")) {
        Hdf5RunInfo info;
        info.scenario_file = scenario.source_file;
        info.scenario_name = scenario.name;
        info.command_line = command_line;
        info.program_version = KNOCKON_VERSION;
        info.variant = variant_name(vm);
        info.step = so.run.step;
        info.scenario_hash = scenario_hash(scenario_text, info.variant);
        write_sim_hdf5(vm["out"].as<std::string>(), result, info, &attribution);
    }

    if (vm.count("json"))
        std::printf("%s\n", summary_json(scenario, result, summary, attribution).dump(1).c_str());
    else
        std::fputs(summary_text(scenario, result, summary, attribution).c_str(), stdout);
    return deadlock_status("simulate", result.deadlock.deadlocked ? 1 : 0, 1, vm);
}

}  // namespace knockon::cli
