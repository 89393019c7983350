#include "tools/results/plan_output.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <map>

#include "models/units.hpp"

namespace knockon {

const char* const kSafetyCaution =
    "Planning estimates only: signal positions, braking distances and overlaps are for licensed "
    "signalling engineers to decide under local rules.";
const char* const kUic406Note =
    "Capacity consumption by the compression method of UIC Code 406; the recommended limits shown are "
    "as recalled from UIC Code 406 (2004), not checked against the leaflet.";

namespace {

using K = ColumnKind;

const std::string& train_id(const PlanResult& plan, std::size_t i) { return plan.trains[i].run.service->id; }

Table running_times(const PlanResult& plan) {
    Table t{"running_times", "Timing points (planned = fastest run, waiting at stops for the scheduled departure)",
            {{"train", K::text}, {"type", K::text}, {"station", K::text}, {"stops", K::text},
             {"scheduled_arrival", K::time_of_day}, {"scheduled_departure", K::time_of_day},
             {"planned_arrival", K::time_of_day}, {"planned_departure", K::time_of_day},
             {"technical_running_s", K::duration}, {"scheduled_running_s", K::duration},
             {"timetabled_running_s", K::duration}, {"reserve_s", K::duration}},
            {}};
    for (const TrainPlan& tp : plan.trains)
        for (const PlannedCall& c : tp.run.calls) {
            double reserve = c.technical_running > 0 ? c.timetabled_running - c.scheduled_running : kNoTime;
            t.rows.push_back({tp.run.service->id, tp.run.type->id, c.station, c.stops ? "stop" : "pass",
                              c.scheduled_arrival, c.scheduled_departure, c.planned_arrival, c.planned_departure,
                              c.technical_running, c.scheduled_running, c.timetabled_running, reserve});
        }
    return t;
}

Table trains(const PlanResult& plan) {
    Table t{"trains", "Trains",
            {{"train", K::text}, {"type", K::text}, {"category", K::text}, {"direction", K::text},
             {"from", K::text}, {"to", K::text}, {"departure", K::time_of_day}, {"arrival", K::time_of_day},
             {"length_m", K::number}, {"technical_s", K::duration}, {"scheduled_s", K::duration},
             {"timetabled_s", K::duration}},
            {}};
    for (const TrainPlan& tp : plan.trains) {
        const ServiceRun& r = tp.run;
        double tech = 0, sched = 0, table = 0;
        for (const PlannedCall& c : r.calls) {
            tech += c.technical_running;
            sched += c.scheduled_running;
            table += c.timetabled_running;
        }
        const PlannedCall &first = r.calls.front(), &last = r.calls.back();
        t.rows.push_back({r.service->id, r.type->id, r.service->category, to_string(r.path.direction),
                          r.service->enters_at_edge ? "(line end) " + first.station : first.station,
                          r.service->leaves_at_edge ? last.station + " (line end)" : last.station,
                          first.scheduled_departure,
                          std::isnan(last.scheduled_arrival) ? last.scheduled_departure : last.scheduled_arrival,
                          r.path.length, tech, sched, table});
    }
    return t;
}

Table blocking_routes(const PlanResult& plan) {
    Table t{"blocking_routes", "Blocking times per route",
            {{"train", K::text}, {"entry_signal", K::text}, {"exit_signal", K::text}, {"setup_s", K::duration},
             {"sight_reaction_s", K::duration}, {"approach_s", K::duration}, {"running_s", K::duration},
             {"clearing_s", K::duration}, {"release_s", K::duration}, {"blocked_from", K::time_of_day},
             {"blocked_to", K::time_of_day}, {"blocking_time_s", K::duration}},
            {}};
    for (const TrainPlan& tp : plan.trains)
        for (const RouteBlocking& r : tp.stairway.routes)
            t.rows.push_back({tp.run.service->id, r.entry_signal, r.exit_signal, r.setup, r.sight_reaction,
                              r.approach, r.running, r.clearing, r.release, r.start, r.end, r.end - r.start});
    return t;
}

Table blocking_sections(const PlanResult& plan) {
    Table t{"blocking_sections", "Blocking times per train-detection section",
            {{"train", K::text}, {"section", K::text}, {"blocked_from", K::time_of_day},
             {"blocked_to", K::time_of_day}, {"occupied_from", K::time_of_day}, {"occupied_to", K::time_of_day}},
            {}};
    for (const TrainPlan& tp : plan.trains)
        for (const SectionBlocking& b : tp.stairway.sections)
            t.rows.push_back({tp.run.service->id, b.section, b.start, b.end, b.occupied_from, b.occupied_to});
    return t;
}

Table headways(const PlanResult& plan) {
    Table t{"headways", "Headways of consecutive trains",
            {{"line_section", K::text}, {"direction", K::text}, {"leader", K::text}, {"follower", K::text},
             {"scheduled_headway_s", K::duration}, {"minimum_headway_s", K::duration}, {"buffer_s", K::duration},
             {"critical_section", K::text}},
            {}};
    for (const HeadwayPair& h : plan.headways)
        t.rows.push_back({h.line_section, to_string(h.direction), train_id(plan, h.leader), train_id(plan, h.follower),
                          h.scheduled_headway, h.minimum_headway, h.buffer, h.critical_section});
    return t;
}

// Trains of different corridors one after the other at a switch's or diamond's section
// (models/junction_headway): a network's table alone.
Table junction_headways(const PlanResult& plan) {
    Table t{"junction_headways",
            "Headways at junctions (consecutive trains of different corridors over a switch or diamond; "
            "scheduled headway from each head reaching the junction)",
            {{"junction", K::text}, {"leader", K::text}, {"follower", K::text},
             {"scheduled_headway_s", K::duration}, {"minimum_headway_s", K::duration}, {"buffer_s", K::duration},
             {"critical_section", K::text}},
            {}};
    for (const HeadwayPair& h : plan.junction_headways)
        t.rows.push_back({h.junction, train_id(plan, h.leader), train_id(plan, h.follower), h.scheduled_headway,
                          h.minimum_headway, h.buffer, h.critical_section});
    return t;
}

Table headway_matrix(const PlanResult& plan) {
    Table t{"headway_matrix", "Minimum headway by train type (largest over all pairs of those types)",
            {{"line_section", K::text}, {"leader_type", K::text}, {"follower_type", K::text},
             {"minimum_headway_s", K::duration}, {"critical_section", K::text}},
            {}};
    for (const HeadwayMatrixEntry& e : plan.headway_matrix)
        t.rows.push_back({e.line_section, e.leader_type, e.follower_type, e.minimum_headway, e.critical_section});
    return t;
}

Table conflicts(const PlanResult& plan) {
    Table t{"conflicts", "Conflicts (blocking times that overlap)",
            {{"section", K::text}, {"first", K::text}, {"second", K::text}, {"from", K::time_of_day},
             {"overlap_s", K::duration}, {"kind", K::text}},
            {}};
    for (const Conflict& c : plan.conflicts)
        t.rows.push_back({c.section, train_id(plan, c.first), train_id(plan, c.second), c.from, c.overlap,
                          conflict_kind(c)});
    return t;
}

Table links(const PlanResult& plan) {
    Table t{"links", "Links: turnarounds, connections and crew links (buffer = planned departure minus arrival plus minimum time)",
            {{"kind", K::text}, {"from", K::text}, {"at", K::text}, {"arrival", K::time_of_day}, {"to", K::text},
             {"departs_from", K::text}, {"departure", K::time_of_day}, {"minimum_s", K::duration},
             {"max_wait_s", K::duration}, {"buffer_s", K::duration}},
            {}};
    for (const LinkPlan& l : plan.links)
        t.rows.push_back({to_string(l.kind), train_id(plan, l.from), plan.trains[l.from].run.calls[l.from_call].station,
                          l.arrival, train_id(plan, l.to), plan.trains[l.to].run.calls[l.to_call].station, l.departure,
                          l.min_time, l.kind == LinkKind::connection ? l.max_wait : kNoTime, l.buffer()});
    return t;
}

Table single_track_stretches(const PlanResult& plan) {
    Table t{"single_track_stretches", "Single-track stretches (both directions on one track, between crossing places)",
            {{"stretch", K::text}, {"track", K::text}, {"from_m", K::number}, {"to_m", K::number},
             {"lower_place", K::text}, {"lower_kind", K::text}, {"upper_place", K::text}, {"upper_kind", K::text},
             {"sections", K::number}},
            {}};
    const SingleTrackLayout& l = plan.single_track;
    for (const SingleTrackStretch& st : l.stretches)
        t.rows.push_back({st.name, st.track, st.x_lo, st.x_hi, l.places[st.lower].name,
                          to_string(l.places[st.lower].kind), l.places[st.upper].name,
                          to_string(l.places[st.upper].kind), static_cast<double>(st.sections.size())});
    return t;
}

Table crossings(const PlanResult& plan) {
    Table t{"crossings",
            "Crossings: opposing trains one after the other on a single-track stretch (buffer = the waiting "
            "train's blocking of the stretch minus the opposing train's release of it)",
            {{"place", K::text}, {"place_kind", K::text}, {"meeting", K::text}, {"stretch", K::text},
             {"opposing", K::text},
             {"released", K::time_of_day}, {"waiting", K::text}, {"waiting_track", K::text},
             {"waiting_stops", K::text}, {"blocks", K::time_of_day}, {"buffer_s", K::duration},
             {"other_stretch", K::text}, {"other_buffer_s", K::duration}},
            {}};
    const SingleTrackLayout& l = plan.single_track;
    for (const Crossing& c : plan.crossings) {
        const CrossingPlace& p = l.places[c.place];
        t.rows.push_back({p.name, to_string(p.kind), c.proper ? "crossing" : "one after the other",
                          l.stretches[c.stretch].name, train_id(plan, c.opposing),
                          c.opposing_release, train_id(plan, c.waiting), c.waiting_track,
                          c.waiting_stops ? "stop" : "pass", c.waiting_blocks, c.buffer,
                          c.proper ? l.stretches[c.other_stretch].name : std::string(),
                          c.proper ? c.other_buffer : kNoTime});
    }
    return t;
}

Table single_track_capacity(const PlanResult& plan) {
    Table t{"single_track_capacity",
            "Capacity consumption of single-track stretches, both directions together (UIC 406 compression)",
            {{"stretch", K::text}, {"window", K::text}, {"from", K::time_of_day}, {"to", K::time_of_day},
             {"trains_up", K::number}, {"trains_down", K::number}, {"consumption_up", K::percent},
             {"consumption_down", K::percent}, {"occupation_s", K::duration}, {"consumption", K::percent},
             {"limit", K::percent}},
            {}};
    for (const StretchCapacity& f : plan.stretch_capacity)
        t.rows.push_back({plan.single_track.stretches[f.stretch].name, f.window, f.from, f.to,
                          static_cast<double>(f.trains_up), static_cast<double>(f.trains_down), f.consumption_up,
                          f.consumption_down, f.occupation, f.consumption, f.limit});
    return t;
}

Table crossings_too_short(const PlanResult& plan) {
    Table t{"crossings_too_short",
            "Trains too long for the crossing place they stand at (on the main track, beyond the turnouts)",
            {{"train", K::text}, {"place", K::text}, {"track", K::text}, {"length_m", K::number},
             {"head_m", K::number}, {"tail_m", K::number}, {"room_from_m", K::number}, {"room_to_m", K::number},
             {"opposing", K::text}},
            {}};
    for (const CrossingTooShort& c : plan.crossings_too_short) {
        const Crossing& x = plan.crossings[c.crossing];
        const std::size_t other = c.train == x.waiting ? x.opposing : x.waiting;
        t.rows.push_back({train_id(plan, c.train), plan.single_track.places[x.place].name, c.track,
                          plan.trains[c.train].run.type->length, c.head, c.tail, c.lo, c.hi, train_id(plan, other)});
    }
    return t;
}

Table spacing_warnings(const PlanResult& plan) {
    Table t{"spacing_warnings",
            "Signals whose warning is shorter than a train's stopping distance (worst train; the plan is "
            "optimistic there)",
            {{"signal", K::text}, {"train", K::text}, {"speed_kmh", K::number}, {"warning_m", K::number},
             {"stopping_distance_m", K::number}},
            {}};
    for (const SpacingWarning& w : plan.spacing_warnings)
        t.rows.push_back({w.signal, train_id(plan, w.train), w.speed * 3.6, w.available, w.needed});
    return t;
}

Table timetable_warnings(const PlanResult& plan) {
    Table t{"timetable_warnings",
            "Stretches where the timetable allows less than running time plus supplement (the train runs late "
            "there even undisturbed)",
            {{"train", K::text}, {"from", K::text}, {"to", K::text}, {"timetabled_s", K::duration},
             {"scheduled_s", K::duration}, {"technical_s", K::duration}, {"short_s", K::duration}},
            {}};
    for (const TightStretch& w : plan.tight_stretches) {
        const ServiceRun& r = plan.trains[w.train].run;
        t.rows.push_back({r.service->id, r.calls[w.from_call].station, r.calls[w.call].station, w.timetabled,
                          w.scheduled, w.technical, w.scheduled - w.timetabled});
    }
    return t;
}

Table capacity(const PlanResult& plan) {
    Table t{"capacity", "Capacity consumption (UIC 406 compression)",
            {{"line_section", K::text}, {"direction", K::text}, {"window", K::text}, {"from", K::time_of_day},
             {"to", K::time_of_day}, {"trains", K::number}, {"occupation_s", K::duration},
             {"consumption", K::percent}, {"limit", K::percent}},
            {}};
    for (const CapacityFigure& f : plan.capacity)
        t.rows.push_back({f.line_section, to_string(f.direction), f.window, f.from, f.to,
                          static_cast<double>(f.trains), f.occupation, f.consumption, f.limit});
    return t;
}

Table capacity_by_hour(const PlanResult& plan) {
    Table t{"capacity_by_hour",
            "Capacity consumption hour by hour (UIC 406 compression of each clock hour, against the peak-hour limit)",
            {{"line_section", K::text}, {"direction", K::text}, {"from", K::time_of_day}, {"to", K::time_of_day},
             {"trains", K::number}, {"occupation_s", K::duration}, {"consumption", K::percent},
             {"limit", K::percent}},
            {}};
    for (const CapacityFigure& f : plan.hourly_capacity)
        t.rows.push_back({f.line_section, to_string(f.direction), f.from, f.to, static_cast<double>(f.trains),
                          f.occupation, f.consumption, f.limit});
    return t;
}

}  // namespace

// A network's corridors: each station at its distance along the corridor (models/corridor_axis),
// the distance axis of the corridor's time-distance diagram, and how many trains run along it.
static Table corridor_table(const Scenario& scenario, const PlanResult& plan) {
    Table t{"corridors", "Corridors (distance along the trains' paths from the corridor's first station)",
            {{"corridor", K::text}, {"station", K::text}, {"name", K::text}, {"distance_m", K::number},
             {"trains", K::number}},
            {}};
    for (const CorridorAxis& axis : corridor_axes(scenario, plan))
        for (const CorridorStation& st : axis.stations)
            t.rows.push_back({axis.name, st.id, station_name(scenario, st.id), st.at,
                              static_cast<double>(axis.runs.size())});
    return t;
}

std::vector<CorridorAxis> corridor_axes(const Scenario& scenario, const PlanResult& plan) {
    std::vector<CorridorAxis> out;
    if (!scenario.network) return out;
    for (const net::Corridor& c : scenario.network->corridors) out.push_back(corridor_axis(c, plan.trains));
    return out;
}

std::string station_name(const Scenario& scenario, const std::string& id) {
    if (scenario.network) {
        for (const net::Station& st : scenario.network->network.stations)
            if (st.id == id) return st.name.empty() ? st.id : st.name;
    } else if (const Station* st = scenario.infrastructure.find_station(id)) {
        return st->name.empty() ? st->id : st->name;
    }
    return id;
}

std::optional<SignalPlace> signal_place(const Scenario& scenario, const std::string& id) {
    if (scenario.network) {
        const net::Network& n = scenario.network->network;
        for (const net::Signal& s : n.signals)
            if (s.name == id) {
                if (s.at.segment >= n.segments.size()) return SignalPlace{"-", net::to_string(s.heading), NAN};
                const net::Segment& seg = n.segments[s.at.segment];
                // km from the segment's kilometre posts, as a path's positions are shown
                return SignalPlace{seg.name, net::to_string(s.heading), seg.shown_at(s.at.offset)};
            }
        return std::nullopt;
    }
    for (const Signal& s : scenario.infrastructure.signals)
        if (s.id == id) return SignalPlace{s.track, to_string(s.direction), s.at};
    return std::nullopt;
}

std::string layout_summary(const Scenario& scenario) {
    char text[256];
    if (!scenario.network) {
        const Infrastructure& in = scenario.infrastructure;
        std::snprintf(text, sizeof text, "Line %.1f km, %zu stations, %zu signals", in.length / 1000.0,
                      in.stations.size(), in.signals.size());
        return text;
    }
    const net::Network& n = scenario.network->network;
    std::snprintf(text, sizeof text, "Network of %zu segments, %zu stations, %zu signals", n.segments.size(),
                  n.stations.size(), n.signals.size());
    std::string out = text;
    const auto& corridors = scenario.network->corridors;
    out += corridors.size() == 1 ? "; corridor" : "; corridors";
    for (std::size_t i = 0; i < corridors.size(); ++i) {
        out += (i ? ", " : " ") + corridors[i].name + " (";
        for (std::size_t k = 0; k < corridors[i].stations.size(); ++k) out += (k ? " " : "") + corridors[i].stations[k];
        out += ")";
    }
    return out;
}

std::vector<Table> plan_tables(const Scenario& scenario, const PlanResult& plan) {
    std::vector<Table> out{trains(plan),         running_times(plan),    blocking_routes(plan), blocking_sections(plan),
            headways(plan),       links(plan),            headway_matrix(plan),  conflicts(plan),       capacity(plan),
            capacity_by_hour(plan),
            spacing_warnings(plan), timetable_warnings(plan), single_track_stretches(plan),
            crossings(plan),      single_track_capacity(plan), crossings_too_short(plan)};
    if (scenario.network) {
        out.push_back(junction_headways(plan));
        out.push_back(corridor_table(scenario, plan));
    }
    return out;
}

namespace {

// The crossings table, one part per crossing place (loops first, by chainage; then the ends).
std::string crossings_text(const PlanResult& plan, const Table& all) {
    std::string out;
    const SingleTrackLayout& l = plan.single_track;
    for (int pass = 0; pass < 2; ++pass)
        for (std::size_t p = 0; p < l.places.size(); ++p) {
            const CrossingPlace& place = l.places[p];
            if ((place.kind == CrossingPlaceKind::loop) != (pass == 0)) continue;
            Table t = all;
            t.rows.clear();
            for (std::size_t i = 0; i < plan.crossings.size(); ++i)
                if (plan.crossings[i].place == p) t.rows.push_back(all.rows[i]);
            if (t.rows.empty()) continue;
            std::string tracks;
            for (const CrossingTrack& ct : place.tracks) tracks += (tracks.empty() ? "" : ", ") + ct.track;
            t.title = place.kind == CrossingPlaceKind::loop
                          ? "Crossings at " + place.name + " (tracks " + tracks + ")"
                          : "Opposing trains one after the other at " + place.name + " (" + to_string(place.kind) + ")";
            out += to_text(t) + "\n";
        }
    if (plan.crossings.empty()) out += "Crossings: none (no two opposing trains on any single-track stretch)\n\n";
    return out;
}

}  // namespace

std::string tight_stretch_text(const PlanResult& plan, const TightStretch& w) {
    const ServiceRun& r = plan.trains[w.train].run;
    char buf[400];
    std::snprintf(buf, sizeof buf,
                  "service %s from %s to %s: the timetable allows %.1f s, less than running time plus supplement "
                  "(%.1f s: technical %.1f s, supplement %.1f s), %.1f s short; the train runs late there even "
                  "undisturbed",
                  r.service->id.c_str(), r.calls[w.from_call].station.c_str(), r.calls[w.call].station.c_str(),
                  w.timetabled, w.scheduled, w.technical, w.scheduled - w.technical, w.scheduled - w.timetabled);
    return buf;
}

std::string spacing_warning_text(const PlanResult& plan, const SpacingWarning& w) {
    char buf[500];
    std::snprintf(buf, sizeof buf,
                  "signal %s: its aspect system gives %.1f m of warning, less than the stopping distance of service "
                  "%s from %.0f km/h on the steepest fall within it (%.1f m, tests/REFERENCES.md B6); the plan is "
                  "optimistic there and the simulated driver brakes earlier (a planning check: spacing is for "
                  "licensed signalling engineers under local rules)",
                  w.signal.c_str(), w.available, plan.trains[w.train].run.service->id.c_str(), w.speed * 3.6, w.needed);
    return buf;
}

nlohmann::json table_json(const Table& t) {
    nlohmann::json rows = nlohmann::json::array();
    for (const auto& row : t.rows) {
        nlohmann::json rec = nlohmann::json::object();
        for (std::size_t i = 0; i < row.size(); ++i) {
            const std::string& key = t.columns[i].name;
            if (auto s = std::get_if<std::string>(&row[i]))
                rec[key] = *s;
            else if (std::isnan(std::get<double>(row[i])))
                rec[key] = nullptr;
            else
                rec[key] = std::get<double>(row[i]);
        }
        rows.push_back(std::move(rec));
    }
    return rows;
}

nlohmann::json scenario_facts(const Scenario& s) {
    if (s.network) {
        const net::Network& n = s.network->network;
        nlohmann::json corridors = nlohmann::json::array();
        for (const net::Corridor& c : s.network->corridors) corridors.push_back({{"id", c.name}, {"stations", c.stations}});
        return {{"name", s.name},
                {"file", s.source_file},
                {"layout", "network"},
                {"segments", n.segments.size()},
                {"line_type", to_string(s.line_type)},
                {"stations", n.stations.size()},
                {"signals", n.signals.size()},
                {"corridors", corridors},
                {"train_types", s.train_types.size()},
                {"trains", s.timetable.services.size()}};
    }
    const Infrastructure& in = s.infrastructure;
    return {{"name", s.name},
            {"file", s.source_file},
            {"line_length_m", in.length},
            {"line_type", to_string(s.line_type)},
            {"stations", in.stations.size()},
            {"signals", in.signals.size()},
            {"train_types", s.train_types.size()},
            {"trains", s.timetable.services.size()}};
}

nlohmann::json plan_json(const Scenario& scenario, const PlanResult& plan) {
    nlohmann::json doc;
    doc["tool"] = {{"name", "knockon"}, {"version", KNOCKON_VERSION}};
    doc["scenario"] = scenario_facts(scenario);
    doc["caution"] = kSafetyCaution;
    doc["notes"] = {kUic406Note,
                    "Times are seconds after midnight; durations in seconds; lengths in metres; "
                    "consumption and limit are shares (0.62 = 62 %)."};
    for (const Table& t : plan_tables(scenario, plan)) doc[t.name] = table_json(t);
    return doc;
}

std::string plan_text(const Scenario& scenario, const PlanResult& plan) {
    std::string out = "knockon plan: " + scenario.name + " (" + scenario.source_file + ")\n" + layout_summary(scenario) +
                      (scenario.network ? "; " : ", ") + std::to_string(scenario.train_types.size()) + " train types, " +
                      std::to_string(plan.trains.size()) + " trains.\n";
    out += std::string("Caution: ") + kSafetyCaution + "\n\n";

    std::vector<Table> tables = plan_tables(scenario, plan);
    auto find = [&](const std::string& name) -> Table& {
        return *std::find_if(tables.begin(), tables.end(), [&](const Table& t) { return t.name == name; });
    };
    // A timetable the trains cannot keep is the first thing to know: every figure after it
    // stands on planned times that differ from the timetable's.
    if (!plan.tight_stretches.empty()) {
        Table tw = find("timetable_warnings");
        tw.title = "WARNING: on " + std::to_string(tw.rows.size()) +
                   " stretch(es) the timetable allows less than running time plus supplement; those trains run "
                   "late there even undisturbed";
        out += to_text(tw, 50) + "\n";
    }
    out += to_text(find("trains")) + "\n";

    // The thinnest buffers first: what a planner looks at.
    Table hw = find("headways");
    // Opposing pairs on single-track stretches: the crossing buffer, at the crossing place.
    for (const Crossing& c : plan.crossings)
        hw.rows.push_back({plan.single_track.stretches[c.stretch].name, std::string("opposing"),
                           train_id(plan, c.opposing), train_id(plan, c.waiting), kNoTime, kNoTime, c.buffer,
                           "crossing at " + plan.single_track.places[c.place].name});
    // Trains of different corridors at a junction: where they meet.
    for (const HeadwayPair& h : plan.junction_headways)
        hw.rows.push_back({headway_place(h), std::string("junction"), train_id(plan, h.leader),
                           train_id(plan, h.follower), h.scheduled_headway, h.minimum_headway, h.buffer,
                           h.critical_section});
    // Links: the time between the earlier train's arrival and the later one's departure against
    // the minimum time, at the station the later train leaves.
    for (const LinkPlan& l : plan.links) {
        const std::string& at = plan.trains[l.to].run.calls[l.to_call].station;
        hw.rows.push_back({at, std::string(to_string(l.kind)), train_id(plan, l.from), train_id(plan, l.to),
                           l.departure - l.arrival, l.min_time, l.buffer(), std::string(to_string(l.kind)) + " at " + at});
    }
    std::stable_sort(hw.rows.begin(), hw.rows.end(), [](const auto& a, const auto& b) {
        return std::get<double>(a[6]) < std::get<double>(b[6]);
    });
    const std::string kinds = plan.junction_headways.empty() ? "same direction and opposing"
                                                             : "same direction, opposing and at junctions";
    hw.title = plan.links.empty()
                   ? "Thinnest buffers between consecutive trains, " + kinds + " (all pairs: --csv or --json)"
                   : "Thinnest buffers between consecutive trains, " + kinds + ", and of links (all: --csv or --json)";
    out += to_text(hw, 15) + "\n";

    Table cf = find("conflicts");
    cf.title = "Conflicts: " + std::to_string(cf.rows.size()) +
               (plan.links.empty() ? " overlapping blocking times" : " overlapping blocking times or links not kept");
    out += to_text(cf, 20) + "\n";
    if (!plan.crossings_too_short.empty()) {
        Table ts = find("crossings_too_short");
        ts.title = "Conflicts: " + std::to_string(ts.rows.size()) +
                   " train(s) too long for the crossing place they stand at; the crossing cannot work there";
        out += to_text(ts, 20) + "\n";
    }
    if (!plan.single_track.empty()) {
        out += to_text(find("single_track_stretches")) + "\n";
        out += crossings_text(plan, find("crossings"));
        out += to_text(find("single_track_capacity")) + "\n";
    }
    if (!plan.links.empty()) out += to_text(find("links")) + "\n";
    if (scenario.network) {
        if (!plan.junction_headways.empty()) out += to_text(find("junction_headways")) + "\n";
        out += to_text(find("corridors")) + "\n";
    }
    out += to_text(find("headway_matrix")) + "\n";
    out += to_text(find("capacity")) + "\n";
    if (!plan.spacing_warnings.empty()) {
        Table sw = find("spacing_warnings");
        sw.title = "Warning: " + std::to_string(sw.rows.size()) +
                   " signal(s) give less warning than a train needs to stop (REFERENCES B6 spacing rule); " +
                   "blocking times there assume the warning suffices";
        out += to_text(sw, 20) + "\n";
    }
    out += std::string("Note: ") + kUic406Note + "\n";
    return out;
}

}  // namespace knockon
