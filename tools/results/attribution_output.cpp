#include "tools/results/attribution_output.hpp"

#include <algorithm>
#include <cstdio>
#include <sstream>

#include "models/links.hpp"

namespace knockon {

const char* const kAttributionRule =
    "each knock-on second goes to what held the train (a wait: its recorded cause; time lost on a run: the routes "
    "held for it then, by how long each was held); a holding train's share passes on to the sources of its own "
    "delay at its last timing point, in proportion, up to that delay; beyond it the timetable itself (a planned "
    "conflict) takes the rest";

namespace {

std::string mins(double seconds) {
    char buf[48];
    std::snprintf(buf, sizeof buf, "%.1f min", seconds / 60.0);
    return buf;
}

std::string mins_ci(const Estimate& e) {
    char buf[64];
    std::snprintf(buf, sizeof buf, "%.2f ± %.2f min", e.mean / 60.0, e.half_width / 60.0);
    return buf;
}

nlohmann::ordered_json est(const Estimate& e) {
    return {{"mean", e.mean}, {"ci95_half_width", e.half_width}, {"ci95_lower", e.lower}, {"ci95_upper", e.upper}, {"n", e.n}};
}

std::string link_name(std::size_t from, std::size_t to, const char* kind, const std::vector<std::string>& train_ids) {
    return train_ids[from] + " -> " + train_ids[to] + " (" + kind + ")";
}

std::string pad(std::string s, std::size_t width) {
    // Widths count characters, not bytes: UTF-8 continuation bytes take no column.
    std::size_t columns = 0;
    for (unsigned char c : s) columns += (c & 0xC0) != 0x80;
    if (columns < width) s.append(width - columns, ' ');
    return s;
}

nlohmann::ordered_json source_json(const DelaySource& s, const std::vector<std::string>& train_ids,
                                   const std::vector<TimingRecord>& timing, const std::vector<std::string>& section_names) {
    nlohmann::ordered_json j = {{"kind", to_string(s.kind)}};
    if (s.train != DelaySource::kNone) j["train"] = train_ids[s.train];
    if (s.record != DelaySource::kNone) j["place"] = timing[s.record].station;
    if (s.section != DelaySource::kNone) j["section"] = section_names[s.section];
    return j;
}

}  // namespace

std::string describe_source(const std::string& kind, const std::string& train, const std::string& place,
                            const std::string& section) {
    if (kind == "entry") return train + " late start or entry at " + place;
    if (kind == "dwell") return train + " long dwell at " + place;
    if (kind == "running") return train + " slow run from " + place;
    if (kind == "disruption") return "section " + section + " out of use";
    if (kind == "dispatch") return "the dispatcher";
    if (kind == "timetable") return "the timetable itself (holder on time)";
    return "not recorded";
}

std::string describe_source(const DelaySource& s, const std::vector<std::string>& train_ids,
                            const std::vector<TimingRecord>& timing, const std::vector<std::string>& section_names) {
    return describe_source(to_string(s.kind), s.train != DelaySource::kNone ? train_ids[s.train] : std::string(),
                           s.record != DelaySource::kNone ? timing[s.record].station : std::string(),
                           s.section != DelaySource::kNone ? section_names[s.section] : std::string());
}

const char* cause_label(std::size_t kind) {
    switch (static_cast<HoldCause::Kind>(kind)) {
        case HoldCause::Kind::train: return "other trains' occupation or routes";
        case HoldCause::Kind::link: return "links (turnarounds, connections, crew)";
        case HoldCause::Kind::disruption: return "sections out of use";
        case HoldCause::Kind::dispatch: return "the dispatcher";
        case HoldCause::Kind::none: return "not recorded";
    }
    return "not recorded";
}

std::string day_attribution_text(const SimResult& day, const DayAttribution& a, std::size_t top) {
    std::ostringstream out;
    double total = 0.0;
    for (const TimingRecord& r : day.timing) total += r.knock_on;
    out << "\nWhere knock-on comes from (" << mins(total) << " in all; README \"Where knock-on comes from\"):\n";
    if (total <= 0.0) {
        out << "  (no knock-on)\n";
        return out.str();
    }
    out << "  " << pad("source of the delay", 52) << "knock-on caused   share\n";
    std::vector<std::size_t> order;
    for (std::size_t i = 0; i < a.damage.size(); ++i)
        if (a.damage[i] > 0.0) order.push_back(i);
    std::stable_sort(order.begin(), order.end(), [&](std::size_t x, std::size_t y) { return a.damage[x] > a.damage[y]; });
    for (std::size_t k = 0; k < std::min(top, order.size()); ++k) {
        const std::size_t i = order[k];
        char share[32];
        std::snprintf(share, sizeof share, "%5.1f %%", 100.0 * a.damage[i] / total);
        out << "  " << pad(describe_source(delay_source(a.index, i, day.timing), day.train_ids, day.timing, day.section_names), 52)
            << pad(mins(a.damage[i]), 18) << share << "\n";
    }
    if (order.size() > top) out << "  (" << order.size() - top << " more in the JSON and HDF5 results)\n";
    out << "  By what held the trains:";
    const char* sep = " ";
    for (std::size_t c = 0; c < a.by_cause.size(); ++c) {
        if (a.by_cause[c] <= 0.0) continue;
        out << sep << cause_label(c) << " " << mins(a.by_cause[c]);
        sep = "; ";
    }
    out << ".\n";
    return out.str();
}

nlohmann::ordered_json day_attribution_json(const SimResult& day, const DayAttribution& a) {
    nlohmann::ordered_json j;
    j["rule"] = kAttributionRule;
    double total = 0.0;
    for (const TimingRecord& r : day.timing) total += r.knock_on;
    j["knock_on_s"] = total;
    nlohmann::ordered_json by_cause;
    for (std::size_t c = 0; c < a.by_cause.size(); ++c) by_cause[to_string(static_cast<HoldCause::Kind>(c))] = a.by_cause[c];
    j["by_cause_s"] = by_cause;
    j["sources"] = nlohmann::json::array();
    for (std::size_t i = 0; i < a.damage.size(); ++i) {
        if (a.damage[i] <= 0.0) continue;
        nlohmann::ordered_json s = source_json(delay_source(a.index, i, day.timing), day.train_ids, day.timing, day.section_names);
        s["id"] = i;
        s["damage_s"] = a.damage[i];
        j["sources"].push_back(std::move(s));
    }
    // The delay trees: each edge from the direct cause to the train and place it reached, with the
    // source (by "id" above) whose knock-on it carried.
    j["edges"] = nlohmann::json::array();
    for (const DelayEdge& e : a.edges) {
        nlohmann::ordered_json x = {{"source", e.source}, {"cause", to_string(e.cause.kind)}};
        if (e.cause.train != HoldCause::kNone) x["from_train"] = day.train_ids[e.cause.train];
        if (e.cause.section != HoldCause::kNone) x["section"] = day.section_names[e.cause.section];
        if (e.cause.link != HoldCause::kNone) x["link"] = e.cause.link;
        x["to_train"] = day.train_ids[day.timing[e.record].train];
        x["place"] = day.timing[e.record].station;
        x["seconds"] = e.seconds;
        j["edges"].push_back(std::move(x));
    }
    j["sections"] = nlohmann::json::array();
    for (std::size_t k = 0; k < a.through_section.size(); ++k)
        if (a.through_section[k] > 0.0)
            j["sections"].push_back({{"section", day.section_names[k]}, {"knock_on_s", a.through_section[k]}});
    j["links"] = nlohmann::json::array();
    for (std::size_t l = 0; l < a.through_link.size() && l < day.links.size(); ++l)
        j["links"].push_back({{"link", l}, {"from", day.train_ids[day.links[l].from]}, {"to", day.train_ids[day.links[l].to]},
                              {"knock_on_s", a.through_link[l]}});
    return j;
}

std::string study_attribution_text(const SimModel& model, const AttributionSummary& s,
                                   const std::vector<std::string>& train_ids, const std::vector<TimingRecord>& timing,
                                   const std::vector<std::string>& section_names, std::size_t top) {
    std::ostringstream out;
    out << "\nWhere knock-on comes from (mean per day ± 95 % CI; README \"Where knock-on comes from\"):\n";
    if (s.sources.empty()) {
        out << "  (no knock-on)\n";
        return out.str();
    }
    for (std::size_t k = 0; k < std::min(top, s.sources.size()); ++k) {
        const SourceDamage& d = s.sources[k];
        out << "  " << pad(describe_source(delay_source(s.layout.sources(), d.source, timing), train_ids, timing, section_names), 52)
            << mins_ci(d.damage) << "\n";
    }
    if (s.sources.size() > top) out << "  (" << s.sources.size() - top << " more in the JSON and HDF5 results)\n";
    out << "  By what held the trains:\n";
    for (std::size_t c = 0; c < s.by_cause.size(); ++c)
        if (s.by_cause[c].mean > 0.0) out << "    " << pad(cause_label(c), 50) << mins_ci(s.by_cause[c]) << "\n";
    std::vector<PlaceKnockOn> places = s.places;
    std::stable_sort(places.begin(), places.end(),
                     [](const PlaceKnockOn& a, const PlaceKnockOn& b) { return a.received.mean > b.received.mean; });
    out << "  Places (knock-on received there; caused by the primary delays drawn there):\n";
    for (std::size_t k = 0; k < std::min<std::size_t>(top, places.size()); ++k) {
        if (places[k].received.mean <= 0.0 && places[k].caused.mean <= 0.0) break;
        out << "    " << pad(places[k].place, 20) << pad(mins_ci(places[k].received), 22) << "; " << mins_ci(places[k].caused) << "\n";
    }
    out << "  Buffers to widen first (knock-on the leader passed to the follower directly):\n";
    for (std::size_t k = 0; k < std::min<std::size_t>(5, s.buffers.size()); ++k) {
        const SimModel::BufferPair& bp = model.buffer_pairs()[s.buffers[k].index];
        out << "    " << pad(train_ids[bp.leader] + " -> " + train_ids[bp.follower] + " (" + bp.line_section + ")", 50)
            << mins_ci(s.buffers[k].knock_on) << "\n";
    }
    for (std::size_t k = 0; k < std::min<std::size_t>(5, s.links.size()); ++k) {
        const LinkPlan& l = model.links()[s.links[k].index];
        out << "    " << pad(link_name(l.from, l.to, to_string(l.kind), train_ids), 50) << mins_ci(s.links[k].knock_on) << "\n";
    }
    if (s.buffers.empty() && s.links.empty()) out << "    (none)\n";
    out << "  Sections the knock-on passed through most:\n";
    for (std::size_t k = 0; k < std::min<std::size_t>(5, s.sections.size()); ++k)
        out << "    " << pad(section_names[s.sections[k].index], 50) << mins_ci(s.sections[k].knock_on) << "\n";
    if (s.sections.empty()) out << "    (none)\n";
    return out.str();
}

nlohmann::ordered_json study_attribution_json(const SimModel& model, const AttributionSummary& s,
                                              const std::vector<std::string>& train_ids,
                                              const std::vector<TimingRecord>& timing,
                                              const std::vector<std::string>& section_names) {
    nlohmann::ordered_json j;
    j["rule"] = kAttributionRule;
    nlohmann::ordered_json by_cause;
    for (std::size_t c = 0; c < s.by_cause.size(); ++c) by_cause[to_string(static_cast<HoldCause::Kind>(c))] = est(s.by_cause[c]);
    j["by_cause_s"] = by_cause;
    j["sources"] = nlohmann::json::array();
    for (const SourceDamage& d : s.sources) {
        nlohmann::ordered_json x =
            source_json(delay_source(s.layout.sources(), d.source, timing), train_ids, timing, section_names);
        x["damage_s"] = est(d.damage);
        j["sources"].push_back(std::move(x));
    }
    j["places"] = nlohmann::json::array();
    for (const PlaceKnockOn& p : s.places)
        j["places"].push_back({{"place", p.place}, {"received_s", est(p.received)}, {"caused_s", est(p.caused)}});
    j["sections"] = nlohmann::json::array();
    for (const ThroughStats& t : s.sections)
        j["sections"].push_back({{"section", section_names[t.index]}, {"knock_on_s", est(t.knock_on)}});
    j["links"] = nlohmann::json::array();
    for (const ThroughStats& t : s.links) {
        const LinkPlan& l = model.links()[t.index];
        j["links"].push_back({{"link", t.index}, {"kind", to_string(l.kind)}, {"from", train_ids[l.from]},
                              {"to", train_ids[l.to]}, {"knock_on_s", est(t.knock_on)}});
    }
    j["buffers"] = nlohmann::json::array();
    for (const ThroughStats& t : s.buffers) {
        const SimModel::BufferPair& bp = model.buffer_pairs()[t.index];
        j["buffers"].push_back({{"leader", train_ids[bp.leader]}, {"follower", train_ids[bp.follower]},
                                {"line_section", bp.line_section}, {"section", section_names[bp.section]},
                                {"planned_s", bp.planned_buffer}, {"knock_on_s", est(t.knock_on)}});
    }
    return j;
}

}  // namespace knockon
