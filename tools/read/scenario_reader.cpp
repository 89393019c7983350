#include "tools/read/scenario_reader.hpp"

#include "tools/read/link_fields.hpp"

#include <algorithm>
#include <cctype>
#include <array>
#include <cerrno>
#include <cmath>
#include <cstdint>
#include <cstdio>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <map>
#include <memory>
#include <optional>
#include <set>
#include <sstream>
#include <tuple>
#include <utility>

#include <yaml-cpp/yaml.h>

#include "models/infrastructure_checks.hpp"
#include "models/input_ranges.hpp"
#include "models/line_timetable_checks.hpp"
#include "models/line_paths.hpp"
#include "models/repeat_runs.hpp"
#include "models/links.hpp"
#include "models/path.hpp"
#include "models/train_type_checks.hpp"
#include "models/unread_fields.hpp"
#include "models/units.hpp"
#include "tools/read/call_fields.hpp"
#include "tools/read/delay_fields.hpp"
#include "tools/read/train_type_fields.hpp"
#include "tools/read/variant_document.hpp"
#include "tools/read/yaml_fields.hpp"
#include "tools/read/yaml_merge.hpp"

namespace knockon {

namespace {

using yamlio::ErrorList;
using yamlio::item;
using yamlio::km;
using yamlio::line_of;
using yamlio::load_document;
using yamlio::MapFields;

// Chainages written in km and in m are snapped to one grid by parse_quantity; this tolerance only
// absorbs rounding in sums.
constexpr double kEps = kChainageTolerance;

// A service as read, with what is needed to point back into the file.
struct ServiceSource {
    Service service;
    MapFields fields;
    std::vector<MapFields> calls;
    std::optional<double> every;  // repeat pattern
    std::optional<double> until;
    bool ok = true;               // everything parsed and checked
};

class ScenarioParser {
public:
    explicit ScenarioParser(ErrorList& errors) : errors_(errors) {}

    Scenario parse(const YAML::Node& root) {
        MapFields top(errors_, root, "",
                      {"knockon", "name", "line_type", "infrastructure", "train_types", "timetable",
                       "delays", "dispatching", "variants"});
        // `variants` is checked and merged before this parse (see parse_scenario below).
        if (!top.ok()) return std::move(sc_);
        if (auto v = top.text("knockon", true)) {
            bool supported = false;
            try {
                supported = parse_number(*v) == 1.0;
            } catch (const UnitError&) {
            }
            if (!supported)
                top.error("knockon", "format version \"" + *v +
                                         "\" is not supported; this program reads knockon: 1");
        }
        if (auto n = top.text("name", false)) sc_.name = *n;
        if (auto lt = top.choice("line_type", {"suburban", "high_speed", "mixed"}, false)) {
            sc_.line_type = *lt == "suburban"     ? LineType::suburban
                            : *lt == "high_speed" ? LineType::high_speed
                                                  : LineType::mixed;
        }
        if (top.require("infrastructure"))
            read_infrastructure(top.get("infrastructure"), top.path_of("infrastructure"));
        if (auto tt = top.sequence("train_types", true)) read_train_types(top, *tt);
        if (top.require("timetable")) read_timetable(top.get("timetable"), top.path_of("timetable"));
        if (top.has("delays")) read_delays(top.get("delays"), top.path_of("delays"));
        if (top.has("dispatching")) read_dispatching(top.get("dispatching"), top.path_of("dispatching"));
        return std::move(sc_);
    }

    // The dispatcher's weights per service category (sim/dispatch.hpp); read after the timetable,
    // so that a category no service has is named.
    void read_dispatching(const YAML::Node& node, const std::string& path) {
        MapFields m(errors_, node, path, {"weights"});
        if (!m.ok() || !m.has("weights")) return;
        const YAML::Node weights = m.get("weights");
        const std::string wpath = m.path_of("weights");
        if (!weights.IsMap()) {
            m.error("weights", "must be a map of service category to weight, e.g. {stopping: 2, freight: 1}");
            return;
        }
        std::vector<std::string> known;
        for (const Service& svc : sc_.timetable.services)
            if (!svc.category.empty() && std::find(known.begin(), known.end(), svc.category) == known.end())
                known.push_back(svc.category);
        for (const auto& kv : weights) {
            if (!kv.first.IsScalar()) {
                errors_.add(kv.first, wpath, "a category must be a name");
                continue;
            }
            const std::string category = kv.first.Scalar();
            const std::string here = wpath + "." + category;
            auto w = ranged_cell(kv.second, here, Input::dispatch_weight);
            if (!w) continue;
            if (std::find(known.begin(), known.end(), category) == known.end()) {
                errors_.add(kv.first, here,
                            "no service has category \"" + category + "\"; " + known_list(known));
                continue;
            }
            for (Service& svc : sc_.timetable.services)
                if (svc.category == category) svc.dispatch_weight = *w;
        }
    }

private:
    // ---------------------------------------------------------------- infrastructure

    void read_infrastructure(const YAML::Node& node, const std::string& path) {
        MapFields m(errors_, node, path,
                    {"length", "gradients", "speed_limits", "tracks", "stations", "signalling",
                     "signals", "joints"});
        if (!m.ok()) return;
        auto& inf = sc_.infrastructure;
        if (auto len = ranged(m, "length", Input::line_length, true)) {
            length_ = *len;
            inf.length = *len;
        }
        // Level throughout unless told otherwise; line speed has no sensible default.
        if (m.has("gradients"))
            inf.gradients = read_bands(m, "gradients", Input::gradient);
        else if (length_)
            inf.gradients = {{0.0, *length_, 0.0}};
        inf.speed_limits = read_bands(m, "speed_limits", Input::speed_limit);
        read_tracks(m);
        read_stations(m);
        if (m.require("signalling")) read_signalling(m.get("signalling"), m.path_of("signalling"));
        read_signals(m);
        read_joints(m);
        // The model's checks (models/infrastructure_checks), located at the fields they name.
        infra_check_ = check_infrastructure(inf, unread_, length_.has_value());
        for (const LineProblem& p : infra_check_.problems) locate(p);
    }

    // The entry a problem of the infrastructure is about, as read.
    const MapFields& source_of(LineObject kind, std::size_t index) const {
        switch (kind) {
            case LineObject::station: return station_src_[index];
            case LineObject::signal: return signal_src_[index];
            case LineObject::joint: return joint_src_[index];
            default: return track_src_[index];
        }
    }

    // A problem at the field it names of `src` (the entry as a whole when it names none), with
    // where the object it clashes with stands.
    void locate(const LineProblem& p, const MapFields& src) {
        std::string message = p.message;
        if (p.other != LineProblem::kNone) {
            const MapFields& o = source_of(p.kind, p.other);
            const std::string line =
                std::to_string(line_of(p.other_field.empty() ? o.node() : o.get(p.other_field)));
            message.insert(p.other_at, p.other_field == "id" ? " (first at line " + line + ")" : " (line " + line + ")");
        }
        if (p.field.empty())
            errors_.add(src.node(), src.path(), message);
        else
            src.error(p.field, message);
    }
    void locate(const LineProblem& p) { locate(p, source_of(p.kind, p.index)); }

    // Checks a chainage lies on the line [0, length] (models/infrastructure_checks); reports at
    // `key` of `f`.
    bool on_line(const MapFields& f, std::string_view key, double x) {
        if (auto problem = off_line(x, length_)) {
            f.error(key, *problem);
            return false;
        }
        return true;
    }

    // Bands: each value holds from its `from` to the next band's from, the last to the line end.
    std::vector<ChainageBand> read_bands(const MapFields& m, std::string_view key, Input which) {
        std::vector<ChainageBand> out;
        auto seq = m.sequence(key, true);
        if (!seq) return out;
        const std::string path = m.path_of(key);
        if (seq->size() == 0) {
            m.error(key, "at least one band is needed, the first from 0 km");
            return out;
        }
        std::optional<double> prev;
        for (std::size_t i = 0; i < seq->size(); ++i) {
            MapFields b(errors_, std::as_const(*seq)[i], item(path, i), {"from", "value"});
            if (!b.ok()) continue;
            auto from = b.quantity("from", Quantity::length, true);
            auto value = ranged(b, "value", which, true);
            bool ok = from && value;
            if (from) {
                if (i == 0 && std::abs(*from) > kEps) {
                    b.error("from", "the first band must start at 0 km, not " + km(*from));
                    ok = false;
                } else if (prev && *from <= *prev + kEps) {
                    b.error("from", "bands must be in increasing order of from: " + km(*from) +
                                        " follows " + km(*prev));
                    ok = false;
                } else if (length_ && *from >= *length_ - kEps) {
                    b.error("from", "the band starts at or beyond the line end (" +
                                        km(*length_) + ")");
                    ok = false;
                }
                if (!prev || *from > *prev) prev = from;
            }
            if (ok) out.push_back({*from, 0.0, *value});
        }
        for (std::size_t k = 0; k < out.size(); ++k)
            out[k].to = k + 1 < out.size() ? out[k + 1].from : length_.value_or(out[k].from);
        return out;
    }

    // Tracks as written; what they must be as a model (on the line, loops within a main track,
    // one id each) is checked with the rest of the infrastructure.
    void read_tracks(const MapFields& m) {
        auto seq = m.sequence("tracks", true);
        if (!seq) return;
        auto& tracks = sc_.infrastructure.tracks;
        const std::string path = m.path_of("tracks");
        tracks_ = {*seq, path};
        if (seq->size() == 0) m.error("tracks", "at least one track is needed");
        for (std::size_t i = 0; i < seq->size(); ++i) {
            MapFields t(errors_, std::as_const(*seq)[i], item(path, i),
                        {"id", "from", "to", "directions", "parent", "speed_limit"});
            if (!t.ok()) continue;
            auto id = t.text("id", true);
            auto from = t.quantity("from", Quantity::length, true);
            auto to = t.quantity("to", Quantity::length, true);
            auto dirs = t.choice("directions", {"up", "down", "both"}, true);
            auto parent = t.text("parent", false);
            auto limit = ranged(t, "speed_limit", Input::speed_limit, false);
            const std::size_t k = tracks.size();
            if (!id) unread_.add(LineObject::track, k, "id");
            if (!from) unread_.add(LineObject::track, k, "from");
            if (!to) unread_.add(LineObject::track, k, "to");
            if (!dirs) unread_.add(LineObject::track, k, "directions");
            if (!parent && t.has("parent")) unread_.add(LineObject::track, k, "parent");
            if (!limit && t.has("speed_limit")) unread_.add(LineObject::track, k, "speed_limit");
            Track tr;
            tr.id = id.value_or("");
            tr.from = from.value_or(0.0);
            tr.to = to.value_or(0.0);
            tr.up = dirs && *dirs != "down";
            tr.down = dirs && *dirs != "up";
            if (parent) tr.parent = *parent;
            if (limit) tr.speed_limit = *limit;
            tracks.push_back(tr);
            track_src_.push_back(t);
        }
    }

    // The track `key` of `f` names: reports unknown ids; nullptr also when that track has
    // problems of its own (no further checks against it then).
    const Track* track_ref(const MapFields& f, std::string_view key, const std::string& id) {
        const auto k = infra_check_.track_index(id);
        if (!k) {
            f.error(key, unknown_name("track", id, infra_check_.track_ids));
            return nullptr;
        }
        if (!infra_check_.track_usable[*k]) return nullptr;
        return &sc_.infrastructure.tracks[*k];
    }

    // Stations as written; on the line and one id each is checked with the rest of the
    // infrastructure.
    void read_stations(const MapFields& m) {
        auto seq = m.sequence("stations", true);
        if (!seq) return;
        auto& stations = sc_.infrastructure.stations;
        const std::string path = m.path_of("stations");
        if (seq->size() == 0) m.error("stations", "at least one station is needed");
        for (std::size_t i = 0; i < seq->size(); ++i) {
            MapFields s(errors_, std::as_const(*seq)[i], item(path, i), {"id", "name", "at"});
            if (!s.ok()) continue;
            auto id = s.text("id", true);
            auto name = s.text("name", false);
            auto at = s.quantity("at", Quantity::length, true);
            if (!id) unread_.add(LineObject::station, stations.size(), "id");
            if (!at) unread_.add(LineObject::station, stations.size(), "at");
            if (!name && s.has("name")) unread_.add(LineObject::station, stations.size(), "name");
            Station st;
            st.id = id.value_or("");
            st.name = name.value_or(st.id);
            st.at = at.value_or(0.0);
            stations.push_back(st);
            station_src_.push_back(s);
        }
    }

    void read_signalling(const YAML::Node& node, const std::string& path) {
        MapFields s(errors_, node, path, {"areas", "defaults", "interlocking"});
        if (!s.ok()) return;
        read_areas(s);
        if (s.has("defaults")) {
            MapFields d(errors_, s.get("defaults"), s.path_of("defaults"),
                        {"sighting_distance", "overlap", "distant_distance"});
            default_sighting_ = ranged(d, "sighting_distance", Input::sighting_distance, false);
            default_overlap_ = ranged(d, "overlap", Input::overlap, false);
            default_distant_ = ranged(d, "distant_distance", Input::distant_distance, false);
            // A default that is given but wrong is reported once, not again at every signal.
            defaults_given_ = {d.has("sighting_distance"), d.has("overlap"), d.has("distant_distance")};
        }
        // Omitted interlocking times keep the InterlockingTimes defaults: route setup 6 s (the
        // low end for relay/electronic interlockings, tests/REFERENCES.md B2), sight and reaction 12 s
        // (tests/REFERENCES.md B3), release 3 s (common practice, no source).
        if (s.has("interlocking")) {
            MapFields t(errors_, s.get("interlocking"), s.path_of("interlocking"),
                        {"route_setup", "release", "sight_reaction"});
            auto& times = sc_.infrastructure.interlocking;
            if (auto v = ranged(t, "route_setup", Input::route_setup, false)) times.route_setup = *v;
            if (auto v = ranged(t, "release", Input::release, false)) times.release = *v;
            if (auto v = ranged(t, "sight_reaction", Input::sight_reaction, false)) times.sight_reaction = *v;
        }
    }

    // The quantity of `key`, within its plausible range (models/input_ranges); nothing, with the
    // error recorded, when it is outside.
    std::optional<double> ranged(const MapFields& f, std::string_view key, Input which, bool required) {
        return yamlio::ranged(f, key, which, required);
    }

    // The same for a table cell.
    std::optional<double> ranged_cell(const YAML::Node& n, const std::string& path, Input which) {
        return yamlio::ranged_cell(errors_, n, path, which);
    }

    // Areas as written; that they lie on the line and cover it in order is the model's rule
    // (check_signalling_areas), checked here already: a signal's aspect system is looked up in
    // them as the signals are read.
    void read_areas(const MapFields& s) {
        auto seq = s.sequence("areas", true);
        if (!seq) return;
        const std::string path = s.path_of("areas");
        std::vector<SignallingArea> areas;
        std::vector<MapFields> where;
        UnreadFields unread;
        bool complete = true;
        for (std::size_t i = 0; i < seq->size(); ++i) {
            MapFields a(errors_, std::as_const(*seq)[i], item(path, i), {"from", "to", "system"});
            if (!a.ok()) {
                complete = false;
                continue;
            }
            auto from = a.quantity("from", Quantity::length, true);
            auto to = a.quantity("to", Quantity::length, true);
            auto sys = a.choice("system",
                                {"two_aspect", "three_aspect", "four_aspect", "cab_fixed_block"}, true);
            const std::size_t k = areas.size();
            if (!from) unread.add(LineObject::area, k, "from");
            if (!to) unread.add(LineObject::area, k, "to");
            if (!sys) unread.add(LineObject::area, k, "system");
            SignallingArea area;
            area.from = from.value_or(0.0);
            area.to = to.value_or(0.0);
            area.system = !sys || *sys == "three_aspect" ? AspectSystem::three_aspect
                          : *sys == "two_aspect"         ? AspectSystem::two_aspect
                          : *sys == "four_aspect"        ? AspectSystem::four_aspect
                                                         : AspectSystem::cab_fixed_block;
            areas.push_back(area);
            where.push_back(a);
        }
        // An empty list is the model's problem; entries none of which could be read are reported.
        if (areas.empty() && seq->size() > 0) return;
        const AreasCheck check = check_signalling_areas(areas, length_, unread, complete);
        for (const LineProblem& p : check.problems) {
            if (p.kind == LineObject::area_list)
                s.error("areas", p.message);
            else
                locate(p, where[p.index]);
        }
        sc_.infrastructure.areas = std::move(areas);
        areas_ok_ = check.covers;
    }

    // Signals as written; where they may stand (on a track carrying their direction, 1 m from
    // the next of their direction, one id each) is checked with the rest of the infrastructure.
    void read_signals(const MapFields& m) {
        auto seq = m.sequence("signals", true);
        if (!seq) return;
        auto& inf = sc_.infrastructure;
        const std::string path = m.path_of("signals");
        if (seq->size() == 0) m.error("signals", "at least one main signal is needed");
        for (std::size_t i = 0; i < seq->size(); ++i) {
            MapFields f(errors_, std::as_const(*seq)[i], item(path, i),
                        {"id", "track", "at", "direction", "sighting_distance", "overlap",
                         "distant_distance"});
            if (!f.ok()) continue;
            Signal sig;
            const std::size_t k = inf.signals.size();
            auto id = f.text("id", true);
            auto track = f.text("track", true);
            auto at = f.quantity("at", Quantity::length, true);
            auto dir = f.choice("direction", {"up", "down"}, true);
            if (id) {
                sc_.sources.signals[*id] = yamlio::location(errors_.file(), f.node().Mark(), f.path());
                sig.id = *id;
            } else {
                unread_.add(LineObject::signal, k, "id");
            }
            if (dir) sig.direction = *dir == "up" ? Direction::up : Direction::down;
            else unread_.add(LineObject::signal, k, "direction");
            if (at) sig.at = *at;
            else unread_.add(LineObject::signal, k, "at");
            if (track) sig.track = *track;
            else unread_.add(LineObject::signal, k, "track");
            sig.sighting_distance =
                signal_value(f, "sighting_distance", default_sighting_, defaults_given_[0], true)
                    .value_or(0.0);
            sig.overlap = signal_value(f, "overlap", default_overlap_, defaults_given_[1], true)
                              .value_or(0.0);
            // Only a signal in a two-aspect area needs a distant; elsewhere it is optional.
            const bool needs_distant =
                at && areas_ok_ && inf.aspect_system_at(*at) == AspectSystem::two_aspect;
            sig.distant_distance =
                signal_value(f, "distant_distance", default_distant_, defaults_given_[2], needs_distant);
            inf.signals.push_back(sig);
            signal_src_.push_back(f);
        }
    }

    // A per-signal length, else the signalling default; reports a needed value that neither gives.
    std::optional<double> signal_value(const MapFields& f, std::string_view key,
                                       const std::optional<double>& fallback, bool fallback_given,
                                       bool needed) {
        if (f.has(key)) {
            const Input which = key == "overlap"             ? Input::overlap
                                : key == "sighting_distance" ? Input::sighting_distance
                                                             : Input::distant_distance;
            return ranged(f, key, which, true);
        }
        if (fallback) return fallback;
        if (needed && !fallback_given)
            errors_.add(f.node(), f.path_of(key),
                        "not given here, and signalling.defaults gives no " + std::string(key));
        return std::nullopt;
    }

    void read_joints(const MapFields& m) {
        auto seq = m.sequence("joints", false);
        if (!seq) return;
        const std::string path = m.path_of("joints");
        for (std::size_t i = 0; i < seq->size(); ++i) {
            MapFields f(errors_, std::as_const(*seq)[i], item(path, i), {"track", "at"});
            if (!f.ok()) continue;
            auto track = f.text("track", true);
            auto at = f.quantity("at", Quantity::length, true);
            if (!track || !at) continue;
            sc_.infrastructure.extra_joints.emplace_back(*track, *at);
            joint_src_.push_back(f);
        }
    }

    // ---------------------------------------------------------------- rolling stock

    void read_train_types(const MapFields& top, const YAML::Node& seq) {
        yamlio::TrainTypeList list = yamlio::read_train_types(errors_, top, seq, length_);
        sc_.train_types = std::move(list.types);
        sc_.sources.train_types = std::move(list.where);
        train_type_lines_ = std::move(list.lines);
        train_type_ids_ = std::move(list.ids);
    }

    // ---------------------------------------------------------------- timetable

    void read_timetable(const YAML::Node& node, const std::string& path) {
        MapFields t(errors_, node, path, {"rounding", "services", "links"});
        if (!t.ok()) return;
        if (auto v = ranged(t, "rounding", Input::rounding, false)) sc_.timetable.rounding = *v;
        auto seq = t.sequence("services", true);
        if (!seq) return;
        if (seq->size() == 0) t.error("services", "at least one service is needed");
        std::vector<ServiceSource> sources;
        SourceMap& where = sc_.sources;
        where.services.assign(seq->size(), std::string());
        where.calls.assign(seq->size(), {});
        for (std::size_t i = 0; i < seq->size(); ++i) {
            if (auto s = read_service(std::as_const(*seq)[i], item(t.path_of("services"), i))) {
                // Every run of the entry keeps its index, so that planning can say where it stands.
                s->service.entry = i;
                where.services[i] = yamlio::location(errors_.file(), s->fields.node().Mark(), s->fields.path());
                for (const MapFields& c : s->calls)
                    where.calls[i].push_back(yamlio::location(errors_.file(), c.node().Mark(), c.path()));
                sources.push_back(std::move(*s));
            }
        }
        expand(sources);
        if (t.has("links")) read_links(t);
    }

    // Links between the expanded services (models/links): `from` and one of `forms` (a
    // turnaround), `feeds` (a connection at `at`) or `crew_to` (a crew link), each with its
    // minimum time.  What needs the paths (the platform track of a turnaround) is checked only on
    // a timetable without other errors, as the paths are laid.
    // The line read into a network to lay paths on; nullptr, with the error reported at the
    // tracks, where the network cannot take the line.
    const LinePaths* line_paths() {
        if (!line_paths_ && !line_refused_) {
            try {
                line_paths_ = std::make_unique<LinePaths>(sc_.infrastructure);
            } catch (const PathError& e) {
                line_refused_ = true;
                errors_.add(tracks_.first, tracks_.second, e.what());
            }
        }
        return line_paths_.get();
    }

    void read_links(const MapFields& t) {
        const bool paths_laid = errors_.empty();
        yamlio::read_links(errors_, t, sc_.timetable.services,
                           [&](const std::string& id) -> std::optional<std::string> {
                               if (infra_check_.station_index(id)) return std::nullopt;
                               return unknown_name("station", id, infra_check_.station_ids);
                           },
                           paths_laid ? line_paths() : nullptr, sc_.timetable.links, sc_.sources.links);
    }

    std::optional<ServiceSource> read_service(const YAML::Node& node, const std::string& path) {
        MapFields f(errors_, node, path,
                    {"id", "type", "category", "direction", "enter", "leave", "repeat", "draw_key",
                     "calls"});
        if (!f.ok()) return std::nullopt;
        ServiceSource src{Service{}, f, {}, std::nullopt, std::nullopt, true};
        Service& svc = src.service;
        auto id = f.text("id", true);
        auto type = f.text("type", true);
        auto category = f.text("category", false);
        auto dir = f.choice("direction", {"up", "down"}, true);
        if (!id || !type || !dir) src.ok = false;
        bool calls_ok = dir.has_value();  // what the checks on times and call order need
        if (id) svc.id = *id;
        // What the draws are keyed by (models/timetable.hpp DrawIdentity); runs of a repeat
        // pattern get their occurrence in expand().
        if (auto key = f.text("draw_key", false)) {
            svc.draw.name = *key;
        } else if (f.has("draw_key")) {
            src.ok = false;
        } else if (id) {
            svc.draw.name = *id;
        }
        if (type) {
            svc.train_type = *type;
            if (train_type_lines_.count(*type) == 0) {
                f.error("type", "unknown train type \"" + *type + "\"; " + known_list(train_type_ids_));
                src.ok = false;
            }
        }
        if (category) svc.category = *category;
        if (dir) svc.direction = *dir == "up" ? Direction::up : Direction::down;

        if (f.has("enter")) {
            const YAML::Node e = f.get("enter");
            if (e.IsMap()) {
                MapFields em(errors_, e, f.path_of("enter"), {"speed"});
                svc.enters_at_edge = true;
                if (em.has("speed")) {
                    if (auto v = ranged(em, "speed", Input::entry_speed, false))
                        svc.entry_speed = *v;
                    else
                        src.ok = calls_ok = false;
                }
            } else if (auto b = f.boolean("enter", false)) {
                svc.enters_at_edge = *b;
            } else {
                src.ok = calls_ok = false;
            }
        }
        if (auto b = f.boolean("leave", false))
            svc.leaves_at_edge = *b;
        else if (f.has("leave"))
            src.ok = calls_ok = false;
        if (f.has("repeat")) {
            MapFields r(errors_, f.get("repeat"), f.path_of("repeat"), {"every", "until"});
            src.every = ranged(r, "every", Input::repeat_every, true);
            src.until = r.time_of_day("until", true);
            if (!src.every || !src.until) src.ok = false;
        }
        auto calls = f.sequence("calls", true);
        if (!calls) {
            src.ok = calls_ok = false;
            return src;
        }
        if (calls->size() == 0) src.ok = calls_ok = false;   // the model's checks say so
        for (std::size_t j = 0; j < calls->size(); ++j) {
            MapFields c(errors_, std::as_const(*calls)[j], item(f.path_of("calls"), j),
                        {"station", "arr", "dep", "pass", "track", "min_dwell"});
            if (!c.ok()) {
                src.ok = calls_ok = false;
                continue;
            }
            Call call;
            if (!yamlio::read_call(c, call)) src.ok = calls_ok = false;
            svc.calls.push_back(call);
            src.calls.push_back(c);
        }
        // Calls that read cleanly are checked against the line either way; the rules on times
        // and on the first and last call only when nothing is missing, else they would misfire.
        check_service(src, calls_ok);
        return src;
    }

    // The model's checks of one read service (models/line_timetable_checks), located at its
    // calls and fields; `complete` false when a call or a field they need could not be read.
    void check_service(ServiceSource& src, bool complete) {
        const Service& svc = src.service;
        UnreadFields unread;
        for (std::size_t j = 0; j < svc.calls.size(); ++j)
            if (svc.calls[j].station.empty()) unread.add(LineObject::service, 0, "station", j);  // reported already
        const ServiceCheck check =
            check_line_service(sc_.infrastructure, infra_check_, sc_.train_types, svc, 0, complete, unread);
        for (const LineProblem& p : check.problems)
            locate(p, p.call == LineProblem::kNone ? src.fields : src.calls[p.call]);
        if (!check.clean) src.ok = false;
    }

    // Two trains with one draw identity would share their primary delays.  Ids are unique, so this
    // only happens through a draw_key or two repeat patterns of one id (one from 06:00, one from
    // 06:30: each has a run 0 of "S1"); reported once per pair of services as written.
    void check_draw_identities(const std::vector<ServiceSource>& sources, const std::vector<std::size_t>& origin) {
        const auto& out = sc_.timetable.services;
        std::map<std::pair<std::string, long>, std::size_t> seen;   // (name, occurrence or -1) -> source
        std::set<std::pair<std::size_t, std::size_t>> reported;
        for (std::size_t k = 0; k < out.size(); ++k) {
            const DrawIdentity& d = out[k].draw;
            const long occurrence = d.occurrence ? static_cast<long>(*d.occurrence) : -1;
            auto [pos, fresh] = seen.emplace(std::make_pair(d.name, occurrence), origin[k]);
            if (fresh || !reported.emplace(pos->second, origin[k]).second) continue;
            const ServiceSource& src = sources[origin[k]];
            const std::string other = sources[pos->second].fields.path();
            const bool keyed = src.fields.has("draw_key");
            src.fields.error(keyed ? "draw_key" : "id",
                             "primary delays are drawn by the key \"" + d.name + "\"" +
                                 (d.occurrence ? " run " + std::to_string(*d.occurrence) : std::string()) +
                                 " here and in " + other +
                                 " too, so the two would share their delays; give one of them a draw_key of its own");
        }
    }

    // Repeat patterns into one Service per run, then unique ids, then the paths.
    void expand(std::vector<ServiceSource>& sources) {
        auto& out = sc_.timetable.services;
        std::vector<std::size_t> origin;  // index into sources for each expanded service
        for (std::size_t i = 0; i < sources.size(); ++i) {
            ServiceSource& src = sources[i];
            if (!src.ok) continue;
            if (!src.every) {
                out.push_back(src.service);
                origin.push_back(i);
                continue;
            }
            const double t0 = src.service.calls.front().departure.value_or(0.0);
            if (*src.until < t0) {
                const YAML::Node repeat = src.fields.get("repeat");
                errors_.add(repeat["until"].Mark(), src.fields.path_of("repeat.until"),
                            "until " + format_time_of_day(*src.until) +
                                " is before the first call's time " + format_time_of_day(t0));
                continue;
            }
            const double runs_d = repeat_count(t0, *src.every, *src.until);
            if (runs_d > kMaxRunsPerPattern) {
                const YAML::Node repeat = src.fields.get("repeat");
                errors_.add(repeat["every"].Mark(), src.fields.path_of("repeat.every"),
                            "the pattern gives " + std::to_string(static_cast<long long>(runs_d)) +
                                " runs; more than " + std::to_string(kMaxRunsPerPattern) +
                                " is taken for a mistake");
                continue;
            }
            const long runs = static_cast<long>(runs_d);
            for (long k = 0; k < runs; ++k) {
                Service copy = src.service;
                const double shift = static_cast<double>(k) * *src.every;
                for (Call& c : copy.calls) {
                    if (c.arrival) *c.arrival += shift;
                    if (c.departure) *c.departure += shift;
                }
                copy.id = run_id(src.service.id, t0 + shift);
                copy.draw.occurrence = static_cast<std::uint32_t>(k);
                out.push_back(std::move(copy));
                origin.push_back(i);
            }
        }
        std::map<std::string, std::size_t> seen;  // id -> source
        bool ids_unique = true;
        for (std::size_t k = 0; k < out.size(); ++k) {
            auto [pos, fresh] = seen.emplace(out[k].id, origin[k]);
            if (!fresh) {
                ids_unique = false;
                sources[origin[k]].fields.error(
                    "id", "service id \"" + out[k].id + "\" is used twice (also by " +
                              sources[pos->second].fields.path() + ")");
            }
        }
        if (ids_unique) check_draw_identities(sources, origin);
        // Paths are laid only on a scenario without other errors: the path builder trusts
        // the infrastructure it is given.
        if (!errors_.empty()) return;
        std::vector<bool> reported(sources.size(), false);
        for (std::size_t k = 0; k < out.size(); ++k) {
            if (reported[origin[k]]) continue;  // runs of one pattern share their path
            std::string problem;
            try {
                if (const LinePaths* paths = line_paths()) (void)paths->lay(out[k]);
            } catch (const PathError& e) {
                problem = e.what();
            } catch (const std::exception& e) {
                problem = std::string("internal error while laying the path: ") + e.what();
            }
            if (!problem.empty()) {
                const MapFields& f = sources[origin[k]].fields;
                errors_.add(f.node(), f.path(), "service " + out[k].id + ": " + problem);
                reported[origin[k]] = true;
            }
        }
    }

    // ---------------------------------------------------------------- primary delays

    void read_delays(const YAML::Node& node, const std::string& path) {
        MapFields m(errors_, node, path, {"entry", "dwell", "running", "disruptions"});
        if (!m.ok()) return;
        auto station_problem = [&](const std::string& id) -> std::optional<std::string> {
            if (infra_check_.station_index(id)) return std::nullopt;
            return unknown_name("station", id, infra_check_.station_ids);
        };
        yamlio::read_delay_rules(errors_, m, "entry", sc_.delays.entry, station_problem);
        yamlio::read_delay_rules(errors_, m, "dwell", sc_.delays.dwell, station_problem);
        yamlio::read_delay_rules(errors_, m, "running", sc_.delays.running, station_problem);
        read_disruptions(m);
    }

    // A line places a disruption on one of its tracks by chainage (the shared reader does the rest).
    void read_disruptions(const MapFields& m) {
        auto on_track = [&](const MapFields& f, const std::string& track, std::optional<double> from,
                            std::optional<double> to) {
            const Track* tr = track_ref(f, "track", track);
            bool ok = tr != nullptr;
            for (std::string_view key : {"from", "to"}) {
                const auto& x = key == "from" ? from : to;
                if (!tr || !x) continue;
                if (auto problem = off_track(std::string(key), *x, *tr)) {
                    f.error(key, *problem);
                    ok = false;
                }
            }
            return ok;
        };
        yamlio::read_disruptions(errors_, m, yamlio::DisruptionPlacing::line, sc_.delays.disruptions, on_track);
    }

    ErrorList& errors_;
    Scenario sc_;
    // The line read into a network to lay paths on, once it is complete (line_paths()).
    std::unique_ptr<LinePaths> line_paths_;
    bool line_refused_ = false;
    std::pair<YAML::Node, std::string> tracks_;   // where the tracks stand, for a line the network refuses
    std::optional<double> length_;  // the line length, once known to be valid

    // Where each object of the infrastructure was read, parallel to its vector there.
    std::vector<MapFields> track_src_, station_src_, signal_src_, joint_src_;
    UnreadFields unread_;              // fields of them that could not be read
    InfrastructureCheck infra_check_;  // the model's verdict on them (usable tracks and stations)

    std::optional<double> default_sighting_, default_overlap_, default_distant_;
    std::array<bool, 3> defaults_given_{false, false, false};
    bool areas_ok_ = false;

    std::map<std::string, int> train_type_lines_;
    std::vector<std::string> train_type_ids_;
};

}  // namespace

// ---------------------------------------------------------------- variants
//
// A variant is an overlay of the document under `variants: {NAME: {...}}`, merged onto the base
// document (yamlio::merge_into: maps key by key, other values replaced) before the usual parse.
// The merge reuses the parsed nodes, so marks still point where the text was written.

namespace {

constexpr const char* kBaseVariant = "base";

struct VariantSource {
    std::string name, description;
    YAML::Node overlay;   // a map, `description` included
};

struct VariantsSection {
    bool present = false;
    YAML::Mark key_mark;   // of the `variants` key
    std::vector<VariantSource> list;   // in file order, every one that is a map (problems or not)
};

// Letters, digits, _ and -: names that survive a shell and `--variants a,b`.
bool plain_name(const std::string& s) {
    if (s.empty()) return false;
    for (char c : s)
        if (!(std::isalnum(static_cast<unsigned char>(c)) || c == '_' || c == '-')) return false;
    return true;
}

std::string kind_of(const YAML::Node& n) {
    if (n.IsSequence()) return "a list";
    if (n.IsMap()) return "a map";
    if (n.IsNull()) return "nothing";
    return "a single value";
}

// Checks the shape of `variants:` (a map of plain names to maps, each with an optional text
// `description` and no `variants` of its own); everything inside an overlay is checked later,
// by the parse of the merged document.
VariantsSection read_variants_section(const YAML::Node& root, ErrorList& errors) {
    VariantsSection out;
    if (!root.IsMap()) return out;
    YAML::Node section;
    for (auto it = root.begin(); it != root.end(); ++it) {
        if (it->first.IsScalar() && it->first.Scalar() == "variants") {
            out.present = true;
            out.key_mark = it->first.Mark();
            section = it->second;
            break;   // a second `variants` key is reported as a duplicate by the parse
        }
    }
    if (!out.present) return out;
    if (!section.IsMap()) {
        errors.add(section, "variants", "expected a map of variant names to overlays, found " + kind_of(section));
        return out;
    }
    std::map<std::string, int> seen;   // name -> line of first use
    for (auto it = section.begin(); it != section.end(); ++it) {
        const YAML::Node key = it->first;
        const YAML::Node value = it->second;
        if (!key.IsScalar()) {
            errors.add(key, "variants", "variant names must be plain words");
            continue;
        }
        const std::string name = key.Scalar();
        const std::string path = yamlio::join("variants", name);
        if (!plain_name(name))
            errors.add(key, path, "variant name \"" + name + "\" may hold only letters, digits, _ and -");
        else if (name == kBaseVariant)
            errors.add(key, path, "the name base stands for the scenario without any overlay; choose another");
        auto [pos, inserted] = seen.emplace(name, line_of(key));
        if (!inserted)
            errors.add(key, path, "variant \"" + name + "\" is defined twice (first at line " +
                                      std::to_string(pos->second) + ")");
        if (!value.IsMap()) {
            errors.add(value, path,
                       "expected a map (an overlay of the scenario, e.g. {infrastructure: {...}}), found " +
                           kind_of(value));
            continue;
        }
        VariantSource v{name, "", value};
        for (auto f = value.begin(); f != value.end(); ++f) {
            if (!f->first.IsScalar()) continue;   // reported by the parse of the merged document
            const std::string k = f->first.Scalar();
            if (k == "variants") {
                errors.add(f->second, yamlio::join(path, k), "a variant cannot hold variants of its own");
            } else if (k == "description") {
                if (auto d = yamlio::scalar_text(errors, f->second, yamlio::join(path, k))) v.description = *d;
            }
        }
        // Kept even with problems, so that reading this variant reports them rather than "no variant".
        out.list.push_back(std::move(v));
    }
    return out;
}

// The overlay without `description` (which describes, and is no part of the scenario) and a
// nested `variants` (already reported): a new map holding the overlay's own key and value
// nodes, so their marks are kept.
YAML::Node overlay_body(const YAML::Node& overlay) {
    YAML::Node body(YAML::NodeType::Map);
    for (auto it = overlay.begin(); it != overlay.end(); ++it) {
        const bool skip = it->first.IsScalar() && (it->first.Scalar() == "description" || it->first.Scalar() == "variants");
        if (!skip) body.force_insert(it->first, it->second);
    }
    return body;
}

std::string read_text_file(const std::string& path) {
    std::error_code ec;
    if (std::filesystem::is_directory(path, ec))
        throw ScenarioError({path + ": is a directory, not a scenario file"});
    std::ifstream in(path, std::ios::binary);
    if (!in) throw ScenarioError({path + ": cannot open the file: " + std::strerror(errno)});
    std::ostringstream text;
    text << in.rdbuf();
    if (in.bad()) throw ScenarioError({path + ": cannot read the file"});
    return text.str();
}

}  // namespace

namespace yamlio {

bool is_base_variant(const std::string& variant) { return variant.empty() || variant == kBaseVariant; }

YAML::Node variant_document(const std::string& yaml_text, const std::string& variant, ErrorList& errors) {
    YAML::Node root = load_document(yaml_text, errors);
    const VariantsSection variants = read_variants_section(root, errors);
    if (is_base_variant(variant)) return root;
    const VariantSource* chosen = nullptr;
    std::vector<std::string> names;
    for (const VariantSource& v : variants.list) {
        names.push_back(v.name);
        if (v.name == variant && !chosen) chosen = &v;
    }
    if (!chosen) {
        if (!variants.present)
            errors.add(root.Mark(), "variants", "the scenario has no variants, so there is no variant \"" + variant + "\"");
        else
            errors.add(variants.key_mark, "variants", "no variant named \"" + variant + "\"; " + known_list(names));
        throw ScenarioError(errors.messages());
    }
    yamlio::merge_into(root, overlay_body(chosen->overlay));
    return root;
}

}  // namespace yamlio

Scenario parse_line_scenario(const std::string& yaml_text, const std::string& file_name, const std::string& variant) {
    ErrorList errors(file_name);
    YAML::Node root = yamlio::variant_document(yaml_text, variant, errors);
    const bool base = yamlio::is_base_variant(variant);
    Scenario sc;
    try {
        sc = ScenarioParser(errors).parse(root);
    } catch (const YAML::Exception& e) {
        // Not expected: every access is checked first.  Reported, never a crash.
        errors.add(e.mark, "", std::string("could not read the file: ") + e.what());
    }
    if (!errors.empty()) throw ScenarioError(errors.messages());
    sc.source_file = file_name;
    if (!base) sc.name += " [variant " + variant + "]";
    return sc;
}

std::string read_scenario_text(const std::string& path) { return read_text_file(path); }


std::vector<VariantInfo> read_variants(const std::string& path) {
    ErrorList errors(path);
    YAML::Node root = load_document(read_text_file(path), errors);
    const VariantsSection section = read_variants_section(root, errors);
    if (!errors.empty()) throw ScenarioError(errors.messages());
    std::vector<VariantInfo> out;
    for (const VariantSource& v : section.list) out.push_back({v.name, v.description});
    return out;
}

std::vector<std::string> variant_names(const std::string& path) {
    std::vector<std::string> out;
    for (const VariantInfo& v : read_variants(path)) out.push_back(v.name);
    return out;
}

}  // namespace knockon
