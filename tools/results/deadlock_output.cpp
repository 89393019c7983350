#include "tools/results/deadlock_output.hpp"

#include <cmath>

#include "models/links.hpp"
#include "models/units.hpp"
#include "sim/deadlock_text.hpp"

namespace knockon {

namespace {

std::string days(std::size_t n) { return std::to_string(n) + (n == 1 ? " day" : " days"); }

nlohmann::json number_or_null(double v) { return std::isfinite(v) ? nlohmann::json(v) : nlohmann::json(nullptr); }

std::string name_of(const std::vector<std::string>& names, std::uint32_t i) {
    return i < names.size() ? names[i] : std::to_string(i);
}

// "the first, replication 3, at 06:13:44: <cause>"
std::string first_text(const DeadlockedDay& d) {
    std::string out = "the first, replication " + std::to_string(d.replication) + ", stopped at " +
                      format_time_of_day(d.report.time);
    if (!d.report.cause.empty()) out += ": " + d.report.cause;
    return out;
}

}  // namespace

std::string day_deadlock_notice(const DeadlockReport& d, std::size_t trains, std::size_t unfinished) {
    if (!d.deadlocked) return "";
    std::string out = "DEADLOCK at " + format_time_of_day(d.time) + ": the day stopped before its end; " +
                      std::to_string(unfinished) + " of " + std::to_string(trains) +
                      (trains == 1 ? " train" : " trains") + " never reached their last timing point.";
    if (!d.cause.empty()) out += " Cause: " + d.cause + ".";
    out += " The figures are of an incomplete day, only what happened before it stopped: no punctuality, "
           "mean or total delay is given for it.";
    return out;
}

std::string study_deadlock_notice(const StudySummary& s) {
    if (s.deadlocked == 0) return "";
    std::string out = "DEADLOCK on " + std::to_string(s.deadlocked) + " of " + std::to_string(s.replications) +
                      " simulated " + (s.replications == 1 ? "day" : "days");
    if (s.first_deadlock) out += "; " + first_text(*s.first_deadlock);
    out += ". ";
    if (s.complete == 0)
        out += "No day ran to the end, so there are no figures.";
    else
        out += "Every figure is of the " + std::to_string(s.complete) + " complete " +
               (s.complete == 1 ? "day" : "days") +
               "; the deadlocked days stay in the per-day table, flagged, and enter no mean, share, quantile "
               "or interval.";
    return out;
}

std::string comparison_deadlock_notice(const std::vector<NamedSummary>& variants) {
    std::string list;
    for (const auto& [name, s] : variants) {
        if (!s || s->deadlocked == 0) continue;
        list += (list.empty() ? "" : "; ") + name + ": " + std::to_string(s->deadlocked) + " of " +
                std::to_string(s->replications) + " days";
        if (s->first_deadlock) list += ", " + first_text(*s->first_deadlock);
    }
    if (list.empty()) return "";
    return "DEADLOCK on " + days(deadlocked_days(variants)) + " (" + list +
           "). Each variant's figures are of its complete days, and the paired differences of the days complete "
           "in both variants; no deadlocked day enters a mean, share or interval.";
}

std::size_t deadlocked_days(const std::vector<NamedSummary>& variants) {
    std::size_t n = 0;
    for (const auto& v : variants)
        if (v.second) n += v.second->deadlocked;
    return n;
}

namespace {

// A link wait's link: its kind and the earlier train it waits for; null for any other wait.
nlohmann::json link_json(const DeadlockWait& w, const std::vector<std::string>& train_ids) {
    if (w.waits_for != DeadlockWait::For::link) return nullptr;
    return {{"kind", to_string(w.link_kind)}, {"from", name_of(train_ids, w.link_from)}};
}

}  // namespace

nlohmann::json day_deadlock_json(const DeadlockReport& d, const std::vector<std::string>& train_ids,
                                 const std::vector<std::string>& section_names, std::size_t unfinished) {
    nlohmann::json j = {{"deadlocked", d.deadlocked},
                        {"time", d.time},
                        {"trains_not_finished", unfinished},
                        {"cause", d.cause},
                        {"description", d.description}};
    j["waiting"] = nlohmann::json::array();
    for (const DeadlockWait& w : d.waiting) {
        nlohmann::json blocks = nlohmann::json::array();
        for (const DeadlockBlock& b : w.blocks)
            blocks.push_back({{"section", name_of(section_names, b.section)},
                              {"by", block_name(b.by)},
                              {"train", b.by == DeadlockBlock::By::disruption ? nlohmann::json(nullptr)
                                                                                : nlohmann::json(name_of(train_ids, b.train))}});
        j["waiting"].push_back({{"train", name_of(train_ids, w.train)},
                                {"waits_for", wait_name(w.waits_for)},
                                {"chainage_m", number_or_null(w.chainage)},
                                {"station", w.station},
                                {"since", number_or_null(w.since)},
                                {"signal", w.signal},
                                {"route_set", number_or_null(w.route_set)},
                                {"read_from_m", number_or_null(w.read_from)},
                                {"blocks", blocks},
                                {"link", link_json(w, train_ids)},
                                {"text", describe_wait(w, train_ids, section_names)}});
    }
    return j;
}

nlohmann::json study_deadlock_json(const StudySummary& s) {
    nlohmann::json j = {{"deadlocked_days", s.deadlocked},
                        {"complete_days", s.complete},
                        {"replications", s.replications},
                        {"notice", study_deadlock_notice(s)},
                        {"first", nullptr}};
    if (s.first_deadlock) {
        const DeadlockedDay& d = *s.first_deadlock;
        j["first"] = {{"replication", d.replication},
                      {"time", d.report.time},
                      {"cause", d.report.cause},
                      {"description", d.report.description}};
    }
    return j;
}

nlohmann::ordered_json deadlock_first(const nlohmann::json& deadlock, const nlohmann::json& rest) {
    nlohmann::ordered_json out;
    out["deadlock"] = deadlock;
    for (const auto& item : rest.items())
        if (item.key() != "deadlock") out[item.key()] = item.value();
    return out;
}

}  // namespace knockon
