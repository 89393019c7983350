#include "tools/read/network_reader.hpp"

#include "models/network/network_paths.hpp"
#include "models/network/runs.hpp"
#include "tools/read/link_fields.hpp"

#include <map>
#include <set>
#include <utility>
#include <vector>

#include "models/network/checks.hpp"
#include "models/network/disruption_place.hpp"
#include "models/network/routes.hpp"
#include "tools/read/call_fields.hpp"
#include "tools/read/delay_fields.hpp"
#include "tools/read/scenario_reader.hpp"
#include "tools/read/train_type_fields.hpp"
#include "tools/read/variant_document.hpp"
#include "tools/read/yaml_fields.hpp"

namespace knockon {
namespace {

using net::Heading;
using net::kNone;
using net::ObjectKind;
using yamlio::ErrorList;
using yamlio::item;
using yamlio::MapFields;

// Where an object of the network stands in the file.
struct Source {
    YAML::Node node;
    std::string path;
};

class NetworkParser {
public:
    explicit NetworkParser(ErrorList& errors) : errors_(errors) {}

    NetworkFile parse(const YAML::Node& root) {
        // `variants` is checked and merged before this parse (yamlio::variant_document).
        MapFields top(errors_, root, "",
                      {"knockon", "name", "network", "train_types", "timetable", "corridors", "delays", "variants"});
        if (!top.ok()) return std::move(out_);
        if (auto v = top.text("knockon", true); v && *v != "2")
            top.error("knockon", "a network file has knockon: 2, not \"" + *v + "\"");
        if (auto n = top.text("name", false)) out_.name = *n;
        network_at_ = top.mark_of("network");
        if (top.require("network")) read_network(top.get("network"), top.path_of("network"));
        layout_errors_ = errors_.size();
        if (auto seq = top.sequence("train_types", false)) {
            auto list = yamlio::read_train_types(errors_, top, *seq, std::nullopt);
            out_.train_types = std::move(list.types);
            out_.sources.train_types = std::move(list.where);
        }
        if (top.has("timetable")) read_timetable(top.get("timetable"), top.path_of("timetable"));
        each(top, "corridors", false, [&](const MapFields& f) { corridor(f); }, {"id", "stations"});
        if (top.has("delays")) read_delays(top.get("delays"), top.path_of("delays"));
        if (top.has("network")) check();
        for (const ServiceSource& src : services_) {
            out_.sources.services.push_back(yamlio::location(errors_.file(), src.fields.node().Mark(), src.fields.path()));
            auto& calls = out_.sources.calls.emplace_back();
            for (const MapFields& c : src.calls)
                calls.push_back(yamlio::location(errors_.file(), c.node().Mark(), c.path()));
        }
        return std::move(out_);
    }

private:
    net::Network& net() { return out_.network; }

    void read_network(const YAML::Node& doc, const std::string& path) {
        MapFields m(errors_, doc, path, {"signalling", "segments", "nodes", "signals", "joints", "stations", "routes"});
        if (!m.ok()) return;
        if (m.has("signalling")) read_signalling(m.get("signalling"), m.path_of("signalling"));
        // Segments first: everything else refers to them by id.
        each(m, "segments", true, [&](const MapFields& f) { segment(f); },
             {"id", "length", "directions", "gradients", "speed_limits", "km_posts"});
        each(m, "nodes", true, [&](const MapFields& f) { node(f); },
             {"id", "kind", "ends", "fouling"});
        each(m, "signals", true, [&](const MapFields& f) { signal(f); },
             {"id", "segment", "at", "heading", "system", "sighting_distance", "overlap", "distant_distance"});
        each(m, "joints", false, [&](const MapFields& f) { joint(f); }, {"id", "segment", "at"});
        each(m, "stations", true, [&](const MapFields& f) { station(f); },
             {"id", "name", "tracks", "stopping_points", "platforms"});
        each(m, "routes", false, [&](const MapFields& f) { route_name(f); }, {"id", "from", "to", "via"});
    }

    // A signal named at `key`; records an error and returns kNone where there is none.
    std::size_t signal_ref(const MapFields& f, std::string_view key, bool required) {
        auto id = f.text(key, required);
        if (!id) return kNone;
        const std::size_t s = net().find_signal(*id);
        if (s == kNone) f.error(key, "no signal has the id \"" + *id + "\"");
        return s;
    }

    // A name for one of the routes the program finds: from a signal to the next (`to` left out:
    // to the buffer stop or boundary the route ends at), over the `via` segments.
    void route_name(const MapFields& f) {
        const std::size_t before = errors_.size();
        net::RouteName r;
        if (auto id = f.text("id", true)) r.name = *id;
        r.entry_signal = signal_ref(f, "from", true);
        r.exit_signal = signal_ref(f, "to", false);
        if (auto seq = f.sequence("via", false)) {
            const std::string path = f.path_of("via");
            for (std::size_t i = 0; i < seq->size(); ++i) {
                auto id = yamlio::scalar_text(errors_, (*seq)[i], item(path, i));
                if (!id) continue;
                const std::size_t s = net().find_segment(*id);
                if (s == kNone)
                    errors_.add((*seq)[i], item(path, i), "no segment has the id \"" + *id + "\"");
                else
                    r.via.push_back(s);
            }
        }
        remember(ObjectKind::route_name, f, before);
        net().route_names.push_back(std::move(r));
    }

    // Calls `read` with the fields of each map in the sequence at `key`.
    template <class Read>
    void each(const MapFields& m, std::string_view key, bool required, Read read,
              std::initializer_list<std::string_view> allowed) {
        auto seq = m.sequence(key, required);
        if (!seq) return;
        const std::string path = m.path_of(key);
        for (std::size_t i = 0; i < seq->size(); ++i) {
            MapFields f(errors_, (*seq)[i], item(path, i), allowed);
            if (f.ok()) read(f);
        }
    }

    void read_signalling(const YAML::Node& node, const std::string& path) {
        MapFields s(errors_, node, path, {"system", "defaults", "interlocking"});
        if (!s.ok()) return;
        if (auto sys = system(s)) system_ = *sys;
        if (s.has("defaults")) {
            MapFields d(errors_, s.get("defaults"), s.path_of("defaults"), {"sighting_distance", "overlap"});
            if (d.ok()) {
                if (auto v = yamlio::ranged(d, "sighting_distance", Input::sighting_distance, false)) sighting_ = *v;
                if (auto v = yamlio::ranged(d, "overlap", Input::overlap, false)) overlap_ = *v;
            }
        }
        if (s.has("interlocking")) {
            MapFields i(errors_, s.get("interlocking"), s.path_of("interlocking"), {"route_setup", "release", "sight_reaction"});
            if (!i.ok()) return;
            auto& times = net().interlocking;
            if (auto v = yamlio::ranged(i, "route_setup", Input::route_setup, false)) times.route_setup = *v;
            if (auto v = yamlio::ranged(i, "release", Input::release, false)) times.release = *v;
            if (auto v = yamlio::ranged(i, "sight_reaction", Input::sight_reaction, false)) times.sight_reaction = *v;
        }
    }

    std::optional<AspectSystem> system(const MapFields& f) {
        auto c = f.choice("system", {"two_aspect", "three_aspect", "four_aspect", "cab_fixed_block"}, false);
        if (!c) return std::nullopt;
        return *c == "two_aspect"     ? AspectSystem::two_aspect
               : *c == "three_aspect" ? AspectSystem::three_aspect
               : *c == "four_aspect"  ? AspectSystem::four_aspect
                                      : AspectSystem::cab_fixed_block;
    }

    // Where the object just read stands, and whether reading it found problems (the network's
    // checks then say nothing more of it: "names no segment" after "no segment has the id").
    void remember(ObjectKind k, const MapFields& f, std::size_t errors_before) {
        if (errors_.size() > errors_before) flawed_.insert({k, sources_[k].size()});
        sources_[k].push_back({f.node(), f.path()});
    }

    // A segment named at `key`; records an error and returns kNone where there is none.
    std::size_t segment_ref(const MapFields& f, std::string_view key) {
        auto id = f.text(key, true);
        if (!id) return kNone;
        const std::size_t s = net().find_segment(*id);
        if (s == kNone) f.error(key, "no segment has the id \"" + *id + "\"");
        return s;
    }

    // Offset bands ("from", "value") of a segment.
    std::vector<net::OffsetBand> bands(const MapFields& f, std::string_view key, Input which) {
        std::vector<net::OffsetBand> out;
        each(f, key, false, [&](const MapFields& b) {
            auto from = b.quantity("from", Quantity::length, true);
            auto value = yamlio::ranged(b, "value", which, true);
            if (from && value) out.push_back({*from, *value});
        }, {"from", "value"});
        return out;
    }

    void segment(const MapFields& f) {
        const std::size_t before = errors_.size();
        net::Segment s;
        if (auto id = f.text("id", true)) s.name = *id;
        if (auto len = yamlio::ranged(f, "length", Input::line_length, true)) s.length = *len;
        if (auto d = f.choice("directions", {"forward", "backward", "both"}, true)) {
            s.forward = *d != "backward";
            s.backward = *d != "forward";
        }
        s.gradient = bands(f, "gradients", Input::gradient);
        s.speed = bands(f, "speed_limits", Input::speed_limit);
        each(f, "km_posts", false, [&](const MapFields& p) {
            auto at = p.quantity("at", Quantity::length, true);
            auto km = p.quantity("km", Quantity::length, true);
            if (at && km) s.posts.push_back({*at, *km});
        }, {"at", "km"});
        remember(ObjectKind::segment, f, before);
        net().segments.push_back(std::move(s));
    }

    // "L.start" or "L.end".
    std::optional<net::EndRef> end_ref(const YAML::Node& n, const std::string& path) {
        auto text = yamlio::scalar_text(errors_, n, path);
        if (!text) return std::nullopt;
        const auto dot = text->rfind('.');
        const std::string end = dot == std::string::npos ? "" : text->substr(dot + 1);
        if (end != "start" && end != "end") {
            errors_.add(n, path, "a segment end is written <segment id>.start or <segment id>.end, not \"" + *text + "\"");
            return std::nullopt;
        }
        const std::size_t s = net().find_segment(text->substr(0, dot));
        if (s == kNone) {
            errors_.add(n, path, "no segment has the id \"" + text->substr(0, dot) + "\"");
            return std::nullopt;
        }
        return net::EndRef{s, end == "start" ? net::End::start : net::End::end};
    }

    void node(const MapFields& f) {
        const std::size_t before = errors_.size();
        net::Node nd;
        if (auto id = f.text("id", true)) nd.name = *id;
        if (auto k = f.choice("kind", {"link", "switch", "diamond", "buffer_stop", "boundary"}, true))
            nd.kind = *k == "link"          ? net::NodeKind::link
                      : *k == "switch"      ? net::NodeKind::switch_
                      : *k == "diamond"     ? net::NodeKind::diamond
                      : *k == "buffer_stop" ? net::NodeKind::buffer_stop
                                            : net::NodeKind::boundary;
        if (auto v = f.quantity("fouling", Quantity::length, false)) nd.fouling = *v;
        if (auto seq = f.sequence("ends", true)) {
            const std::string path = f.path_of("ends");
            for (std::size_t i = 0; i < seq->size(); ++i) {
                const YAML::Node e = (*seq)[i];
                std::optional<net::EndRef> at;
                double speed = net::kNoLimit;
                if (e.IsMap()) {   // {end: P2.start, speed: 40 km/h}: a leg with its own speed
                    MapFields m(errors_, e, item(path, i), {"end", "speed"});
                    if (!m.ok() || !m.require("end")) continue;
                    at = end_ref(m.get("end"), m.path_of("end"));
                    if (auto v = yamlio::ranged(m, "speed", Input::speed_limit, false)) speed = *v;
                } else {
                    at = end_ref(e, item(path, i));
                }
                if (at) nd.ends.push_back({*at, speed});
            }
        }
        remember(ObjectKind::node, f, before);
        net().nodes.push_back(std::move(nd));
    }

    std::optional<Heading> heading(const MapFields& f) {
        auto h = f.choice("heading", {"forward", "backward"}, true);
        if (!h) return std::nullopt;
        return *h == "forward" ? Heading::forward : Heading::backward;
    }

    void signal(const MapFields& f) {
        const std::size_t before = errors_.size();
        net::Signal s;
        if (auto id = f.text("id", true)) s.name = *id;
        s.at.segment = segment_ref(f, "segment");
        if (auto at = f.quantity("at", Quantity::length, true)) s.at.offset = *at;
        if (auto h = heading(f)) s.heading = *h;
        s.system = system(f).value_or(system_);
        s.sighting_distance = yamlio::ranged(f, "sighting_distance", Input::sighting_distance, false).value_or(sighting_);
        s.overlap = yamlio::ranged(f, "overlap", Input::overlap, false).value_or(overlap_);
        s.distant_distance = yamlio::ranged(f, "distant_distance", Input::distant_distance, false);
        remember(ObjectKind::signal, f, before);
        net().signals.push_back(std::move(s));
    }

    void joint(const MapFields& f) {
        const std::size_t before = errors_.size();
        net::Joint j;
        if (auto id = f.text("id", false)) j.name = *id;
        j.at.segment = segment_ref(f, "segment");
        if (auto at = f.quantity("at", Quantity::length, true)) j.at.offset = *at;
        remember(ObjectKind::joint, f, before);
        net().joints.push_back(std::move(j));
    }

    void station(const MapFields& f) {
        const std::size_t before = errors_.size();
        net::Station st;
        if (auto id = f.text("id", true)) st.id = *id;
        if (auto name = f.text("name", false)) st.name = *name;
        const std::size_t index = net().stations.size();
        remember(ObjectKind::station, f, before);
        net().stations.push_back(std::move(st));
        each(f, "tracks", true, [&](const MapFields& t) {
            const std::size_t before_tp = errors_.size();
            net::TimingPoint tp{index, {segment_ref(t, "segment"), 0.0}};
            if (auto at = t.quantity("at", Quantity::length, true)) tp.at.offset = *at;
            remember(ObjectKind::timing_point, t, before_tp);
            net().timing_points.push_back(tp);
        }, {"segment", "at"});
        each(f, "stopping_points", false, [&](const MapFields& p) {
            const std::size_t before_sp = errors_.size();
            net::StoppingPoint sp{index, {segment_ref(p, "segment"), 0.0}};
            if (auto at = p.quantity("at", Quantity::length, true)) sp.at.offset = *at;
            if (auto h = heading(p)) sp.heading = *h;
            if (auto l = yamlio::ranged(p, "max_train_length", Input::train_length, false)) sp.max_train_length = *l;
            remember(ObjectKind::stopping_point, p, before_sp);
            net().stopping_points.push_back(sp);
        }, {"segment", "at", "heading", "max_train_length"});
        each(f, "platforms", false, [&](const MapFields& p) {
            const std::size_t before_pl = errors_.size();
            net::Platform pl;
            if (auto id = p.text("id", false)) pl.name = *id;
            pl.station = index;
            pl.segment = segment_ref(p, "segment");
            if (auto v = p.quantity("from", Quantity::length, true)) pl.from = *v;
            if (auto v = p.quantity("to", Quantity::length, true)) pl.to = *v;
            remember(ObjectKind::platform, p, before_pl);
            net().platforms.push_back(pl);
        }, {"id", "segment", "from", "to"});
    }

    // ---------------------------------------------------------------- timetable

    void read_timetable(const YAML::Node& node, const std::string& path) {
        MapFields t(errors_, node, path, {"rounding", "services", "links"});
        if (!t.ok()) return;
        if (auto v = yamlio::ranged(t, "rounding", Input::rounding, false)) out_.timetable.rounding = *v;
        each(t, "services", true, [&](const MapFields& f) { service(f); },
             {"id", "type", "category", "draw_key", "enter", "leave", "repeat", "calls"});
    }

    // A boundary node's id at `key`: checked against the network with the rest of the timetable.
    std::string node_name(const MapFields& f, std::string_view key) {
        auto id = f.text(key, true);
        return id.value_or("");
    }

    void service(const MapFields& f) {
        const std::size_t before = errors_.size();
        net::NetworkService svc;
        ServiceSource src{f, {}};
        if (auto id = f.text("id", true)) svc.id = *id;
        if (auto type = f.text("type", true)) svc.train_type = *type;
        if (auto c = f.text("category", false)) svc.category = *c;
        if (auto k = f.text("draw_key", false)) svc.draw_key = *k;
        // enter: BOUNDARY, or {at: BOUNDARY, speed: 120 km/h}
        if (f.has("enter")) {
            if (f.get("enter").IsMap()) {
                MapFields e(errors_, f.get("enter"), f.path_of("enter"), {"at", "speed"});
                if (e.ok()) {
                    svc.enters_at = node_name(e, "at");
                    svc.entry_speed = yamlio::ranged(e, "speed", Input::entry_speed, false);
                }
            } else {
                svc.enters_at = node_name(f, "enter");
            }
        }
        if (f.has("leave")) svc.leaves_at = node_name(f, "leave");
        if (f.has("repeat")) {
            MapFields r(errors_, f.get("repeat"), f.path_of("repeat"), {"every", "until"});
            auto every = yamlio::ranged(r, "every", Input::repeat_every, true);
            auto until = r.time_of_day("until", true);
            if (every && until) svc.repeat = net::RepeatPattern{*every, *until};
        }
        if (auto calls = f.sequence("calls", true)) {
            const std::string path = f.path_of("calls");
            for (std::size_t j = 0; j < calls->size(); ++j) {
                MapFields c(errors_, (*calls)[j], item(path, j),
                            {"station", "arr", "dep", "pass", "track", "min_dwell", "via", "reverses", "min_turnaround"});
                if (!c.ok()) continue;
                net::NetworkCall call;
                yamlio::read_call(c, call.call);
                if (auto seq = c.sequence("via", false)) {
                    const std::string vpath = c.path_of("via");
                    for (std::size_t i = 0; i < seq->size(); ++i)
                        if (auto id = yamlio::scalar_text(errors_, (*seq)[i], item(vpath, i))) call.via.push_back(*id);
                }
                if (auto b = c.boolean("reverses", false)) call.reverses = *b;
                call.min_turnaround = yamlio::ranged(c, "min_turnaround", Input::min_dwell, false);
                svc.calls.push_back(std::move(call));
                src.calls.push_back(c);
            }
        }
        if (errors_.size() > before) flawed_services_.insert(services_.size());
        services_.push_back(std::move(src));
        out_.timetable.services.push_back(std::move(svc));
    }

    void corridor(const MapFields& f) {
        const std::size_t before = errors_.size();
        net::Corridor c;
        if (auto id = f.text("id", true)) c.name = *id;
        if (auto seq = f.sequence("stations", true)) {
            const std::string path = f.path_of("stations");
            for (std::size_t i = 0; i < seq->size(); ++i)
                if (auto id = yamlio::scalar_text(errors_, (*seq)[i], item(path, i))) c.stations.push_back(*id);
        }
        if (errors_.size() > before) flawed_corridors_.insert(corridors_.size());
        corridors_.push_back({f, {}});
        out_.timetable.corridors.push_back(std::move(c));
    }

    // Rules by category and station, as in a line scenario; disruptions placed by segment and
    // offsets along it, checked by the model's rule (disruption_place_problems).
    void read_delays(const YAML::Node& node, const std::string& path) {
        MapFields m(errors_, node, path, {"entry", "dwell", "running", "disruptions"});
        if (!m.ok()) return;
        auto station_problem = [&](const std::string& id) -> std::optional<std::string> {
            if (net().find_station(id) != kNone) return std::nullopt;
            return "no station has the id \"" + id + "\"";
        };
        yamlio::read_delay_rules(errors_, m, "entry", out_.delays.entry, station_problem);
        yamlio::read_delay_rules(errors_, m, "dwell", out_.delays.dwell, station_problem);
        yamlio::read_delay_rules(errors_, m, "running", out_.delays.running, station_problem);
        auto on_segment = [&](const MapFields& f, const std::string& segment, std::optional<double> from,
                              std::optional<double> to) {
            DisruptionRule rule;
            rule.segment = segment;
            // Without both ends only the segment's name can be checked.
            rule.from = from.value_or(0.0);
            rule.to = to.value_or(from ? *from : 0.0);
            bool ok = true;
            for (const net::DisruptionPlaceProblem& p : net::disruption_place_problems(net(), rule)) {
                if (p.field != "segment" && (!from || !to)) continue;
                f.error(p.field, p.message);
                ok = false;
            }
            return ok;
        };
        yamlio::read_disruptions(errors_, m, yamlio::DisruptionPlacing::network, out_.delays.disruptions, on_segment);
    }

    // The network's own checks, each put at the object it is about (but for objects the reader
    // has found wrong already); then, on a network with no problem, the sections and routes,
    // whose search can refuse a layout too (a loop of track no signal faces).
    void check() {
        const std::vector<net::NetworkProblem> problems = net::check_network(net());
        for (const net::NetworkProblem& p : problems)
            if (!flawed_.count({p.kind, p.index})) locate(p);
        // The graph needs a layout without problems; the timetable's problems of reading leave it be.
        if (layout_errors_ > 0 || !problems.empty()) return;
        try {
            const net::NetworkGraph graph(net());
            const net::DetectionSections sections(graph);
            out_.sections = sections.size();
            out_.routes = net::find_routes(graph, sections).size();
            for (const net::TimetableProblem& p : net::check_timetable(graph, out_.train_types, out_.timetable))
                locate(p);
        } catch (const net::NetworkError& e) {
            if (e.problems.empty()) errors_.add(network_at_, "network", e.what());
            for (const net::NetworkProblem& p : e.problems) locate(p);
        }
    }

    // A problem of the timetable at the field, list entry, call or service it is about; none for a
    // service or corridor the reader has found wrong already.
    void locate(const net::TimetableProblem& p) {
        const bool service = p.part == net::TimetablePart::service;
        if ((service ? flawed_services_ : flawed_corridors_).count(p.index)) return;
        const ServiceSource& src = service ? services_[p.index] : corridors_[p.index];
        const MapFields& at = p.call == kNone ? src.fields : src.calls[p.call];
        if (p.field.empty() || !at.has(p.field)) {
            errors_.add(at.node(), at.path(), p.message);
            return;
        }
        const YAML::Node value = at.get(p.field);
        if (p.item != kNone && value.IsSequence() && p.item < value.size())
            errors_.add(value[p.item], item(at.path_of(p.field), p.item), p.message);
        else
            errors_.add(value, at.path_of(p.field), p.message);
    }

    // A problem of the network at the value of the field it is about, where the file gives it,
    // else at its object.
    void locate(const net::NetworkProblem& p) {
        const Source& at = sources_[p.kind][p.index];
        const YAML::Node value = p.field.empty() ? YAML::Node(YAML::NodeType::Undefined) : at.node[p.field];
        if (!p.field.empty() && value.IsDefined())
            errors_.add(value.Mark(), yamlio::join(at.path, p.field), p.message);
        else
            errors_.add(at.node.Mark(), at.path, p.message);
    }

    // Where a service (or a corridor) and its calls stand in the file.
    struct ServiceSource {
        MapFields fields;
        std::vector<MapFields> calls;
    };

    ErrorList& errors_;
    NetworkFile out_;
    std::size_t layout_errors_ = 0;   // errors found in `network` itself
    std::vector<ServiceSource> services_, corridors_;
    std::set<std::size_t> flawed_services_, flawed_corridors_;
    std::map<ObjectKind, std::vector<Source>> sources_;
    std::set<std::pair<ObjectKind, std::size_t>> flawed_;
    YAML::Mark network_at_;
    AspectSystem system_ = AspectSystem::three_aspect;
    double sighting_ = 0.0, overlap_ = 0.0;
};

}  // namespace

bool is_network_text(const std::string& yaml_text) {
    try {
        const YAML::Node root = YAML::Load(yaml_text);
        return root.IsMap() && root["knockon"] && root["knockon"].IsScalar() && root["knockon"].Scalar() == "2";
    } catch (const YAML::Exception&) {
        return false;
    }
}

NetworkFile parse_network(const std::string& yaml_text, const std::string& file_name, const std::string& variant) {
    ErrorList errors(file_name);
    const YAML::Node root = yamlio::variant_document(yaml_text, variant, errors);
    NetworkFile file;
    try {
        file = NetworkParser(errors).parse(root);
    } catch (const YAML::Exception& e) {
        // Not expected: every access is checked first.  Reported, never a crash.
        errors.add(e.mark, "", std::string("could not read the file: ") + e.what());
    }
    if (!errors.empty()) throw ScenarioError(errors.messages());
    file.source_file = file_name;
    if (!yamlio::is_base_variant(variant)) file.name += " [variant " + variant + "]";
    return file;
}

NetworkFile read_network(const std::string& path, const std::string& variant) {
    return parse_network(read_scenario_text(path), path, variant);
}

Scenario parse_network_scenario(const std::string& yaml_text, const std::string& file_name,
                                const std::string& variant) {
    Scenario sc = network_scenario(parse_network(yaml_text, file_name, variant));
    // Links name the runs, so they are read once the runs are made, against the network's paths.
    ErrorList errors(file_name);
    const YAML::Node root = yamlio::variant_document(yaml_text, variant, errors);
    const YAML::Node tt = root["timetable"];
    if (tt && tt.IsMap() && tt["links"]) {
        const MapFields t(errors, tt, "timetable", {"rounding", "services", "links"});
        const NetworkPaths paths(sc);
        sc.sources.links.assign(sc.timetable.links.size(), std::string());   // the reversals': at their services
        const net::Network& n = sc.network->network;
        yamlio::read_links(errors, t, sc.timetable.services,
                           [&](const std::string& id) -> std::optional<std::string> {
                               if (n.find_station(id) != kNone) return std::nullopt;
                               return "no station has the id \"" + id + "\"";
                           },
                           &paths, sc.timetable.links, sc.sources.links);
    }
    if (!errors.empty()) throw ScenarioError(errors.messages());
    return sc;
}

Scenario network_scenario(NetworkFile file) {
    Scenario sc;
    sc.name = std::move(file.name);
    sc.source_file = std::move(file.source_file);
    sc.sources = std::move(file.sources);
    sc.train_types = std::move(file.train_types);
    sc.delays = std::move(file.delays);
    sc.timetable.rounding = file.timetable.rounding;
    {
        const net::NetworkGraph graph(file.network);
        net::NetworkRuns runs = net::network_runs(graph, file.timetable, sc.train_types);
        sc.timetable.services = std::move(runs.services);
        sc.timetable.links = std::move(runs.links);
        ScenarioNetwork n;
        n.corridors = net::corridors_of(file.timetable);
        n.runs = std::move(runs.runs);
        sc.network = std::move(n);
    }
    sc.network->network = std::move(file.network);
    return sc;
}

}  // namespace knockon
