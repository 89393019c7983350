#include "models/network/checks.hpp"

#include <cmath>
#include <map>
#include <set>

#include "models/units.hpp"

namespace knockon::net {

const char* to_string(ObjectKind k) {
    switch (k) {
        case ObjectKind::segment: return "segment";
        case ObjectKind::node: return "node";
        case ObjectKind::signal: return "signal";
        case ObjectKind::joint: return "joint";
        case ObjectKind::station: return "station";
        case ObjectKind::timing_point: return "timing point";
        case ObjectKind::stopping_point: return "stopping point";
        case ObjectKind::platform: return "platform";
        case ObjectKind::route_name: return "route name";
    }
    return "?";
}

namespace {

std::string joined(const std::vector<NetworkProblem>& problems) {
    std::string text;
    for (const NetworkProblem& p : problems) text += (text.empty() ? "" : "\n") + p.message;
    return text;
}

// Ends a node needs, by kind (a switch: at least).
std::size_t ends_needed(NodeKind k) {
    switch (k) {
        case NodeKind::link: return 2;
        case NodeKind::switch_: return 3;
        case NodeKind::diamond: return 4;
        case NodeKind::buffer_stop:
        case NodeKind::boundary: return 1;
    }
    return 0;
}

class Checker {
public:
    explicit Checker(const Network& n) : n_(n) {}

    std::vector<NetworkProblem> run() {
        for (std::size_t i = 0; i < n_.segments.size(); ++i) segment(i);
        for (std::size_t i = 0; i < n_.nodes.size(); ++i) node(i);
        ends_joined();
        for (std::size_t i = 0; i < n_.signals.size(); ++i) signal(i);
        for (std::size_t i = 0; i < n_.joints.size(); ++i) {
            const std::string who = "joint" + quoted(n_.joints[i].name);
            if (location(ObjectKind::joint, i, who, n_.joints[i].at)) clear_of_nodes(ObjectKind::joint, i, who, n_.joints[i].at);
        }
        for (std::size_t i = 0; i < n_.stations.size(); ++i) station(i);
        for (std::size_t i = 0; i < n_.timing_points.size(); ++i) {
            const TimingPoint& t = n_.timing_points[i];
            const std::string who = "timing point of " + station_name(t.station);
            if (known_station(ObjectKind::timing_point, i, t.station)) location(ObjectKind::timing_point, i, who, t.at);
        }
        for (std::size_t i = 0; i < n_.stopping_points.size(); ++i) stopping_point(i);
        for (std::size_t i = 0; i < n_.platforms.size(); ++i) platform(i);
        for (std::size_t i = 0; i < n_.route_names.size(); ++i) route_name(i);
        return std::move(out_);
    }

private:
    void add(ObjectKind k, std::size_t i, const char* field, std::string message) {
        out_.push_back({k, i, field, std::move(message)});
    }

    static std::string quoted(const std::string& name) { return name.empty() ? "" : " '" + name + "'"; }

    std::string station_name(std::size_t s) const {
        return s < n_.stations.size() ? "station '" + n_.stations[s].id + "'" : "an unknown station";
    }

    bool known_station(ObjectKind k, std::size_t i, std::size_t s) {
        if (s < n_.stations.size()) return true;
        add(k, i, "station", std::string(to_string(k)) + ": no such station");
        return false;
    }

    void unique_name(ObjectKind k, std::size_t i, const std::string& name, std::map<std::string, std::size_t>& seen,
                     bool required) {
        if (name.empty()) {
            if (required) add(k, i, "id", std::string(to_string(k)) + " " + std::to_string(i + 1) + ": a name is needed");
            return;
        }
        auto [it, fresh] = seen.emplace(name, i);
        if (!fresh)
            add(k, i, "id", std::string(to_string(k)) + " '" + name + "': the name is used twice (also by " +
                          to_string(k) + " " + std::to_string(it->second + 1) + ")");
    }

    void bands(std::size_t i, const std::vector<OffsetBand>& b, const char* what, const char* key, bool positive) {
        const Segment& s = n_.segments[i];
        for (std::size_t k = 0; k < b.size(); ++k) {
            const std::string who = "segment '" + s.name + "': " + what + " " + std::to_string(k + 1);
            if (!(b[k].from >= 0.0 && b[k].from < s.length))
                add(ObjectKind::segment, i, key, who + " starts at " + format_metres(b[k].from) + ", outside the segment (0 to " +
                                                format_metres(s.length) + ")");
            if (k > 0 && !(b[k].from > b[k - 1].from))
                add(ObjectKind::segment, i, key, who + " starts at or before the one in front of it; give them by increasing offset");
            // A speed band may lift the limit (infinity); a gradient must be a number.
            if (positive ? !(b[k].value > 0.0) : !std::isfinite(b[k].value))
                add(ObjectKind::segment, i, key, who + (positive ? " must be a speed above zero" : " must be a finite gradient"));
        }
    }

    void segment(std::size_t i) {
        const Segment& s = n_.segments[i];
        unique_name(ObjectKind::segment, i, s.name, segment_names_, true);
        const std::string who = "segment '" + s.name + "'";
        if (!(s.length > 0.0 && std::isfinite(s.length)))
            add(ObjectKind::segment, i, "length", who + ": length must be more than 0 m (it is " + format_metres(s.length) + ")");
        if (!s.forward && !s.backward) add(ObjectKind::segment, i, "directions", who + ": no heading is allowed on it");
        bands(i, s.gradient, "gradient band", "gradients", false);
        bands(i, s.speed, "speed band", "speed_limits", true);
        for (std::size_t k = 0; k < s.posts.size(); ++k) {
            const KmPost& p = s.posts[k];
            if (!(p.offset >= 0.0 && p.offset <= s.length) || !std::isfinite(p.position))
                add(ObjectKind::segment, i, "km_posts", who + ": kilometre post " + std::to_string(k + 1) + " lies outside the segment");
            else if (k > 0 && !(p.offset > s.posts[k - 1].offset))
                add(ObjectKind::segment, i, "km_posts", who + ": kilometre posts must be given by increasing offset");
            else if (k > 0 && p.position == s.posts[k - 1].position)
                add(ObjectKind::segment, i, "km_posts", who + ": kilometre posts " + std::to_string(k) + " and " +
                                                std::to_string(k + 1) + " show the same position");
        }
    }

    void node(std::size_t i) {
        const Node& nd = n_.nodes[i];
        unique_name(ObjectKind::node, i, nd.name, node_names_, true);
        const std::string who = std::string(to_string(nd.kind)) + " '" + nd.name + "'";
        const std::size_t need = ends_needed(nd.kind);
        if (nd.kind == NodeKind::switch_ ? nd.ends.size() < need : nd.ends.size() != need)
            add(ObjectKind::node, i, "ends", who + ": joins " + std::to_string(nd.ends.size()) + " segment ends, a " +
                                         to_string(nd.kind) + (nd.kind == NodeKind::switch_ ? " needs at least " : " needs ") +
                                         std::to_string(need));
        if (!(nd.fouling >= 0.0 && std::isfinite(nd.fouling)))
            add(ObjectKind::node, i, "fouling", who + ": the fouling distance must be 0 m or more");
        else if (nd.kind == NodeKind::diamond && nd.fouling == 0.0)
            add(ObjectKind::node, i, "fouling", who + ": a diamond crossing needs a fouling distance above 0 m, or the two ways over it would share no section");
        else if (nd.fouling > 0.0 && nd.kind != NodeKind::switch_ && nd.kind != NodeKind::diamond)
            add(ObjectKind::node, i, "fouling", who + ": only a switch or a diamond crossing has a fouling distance");
        for (std::size_t k = 0; k < nd.ends.size(); ++k) {
            const NodeEnd& e = nd.ends[k];
            if (e.at.segment >= n_.segments.size()) {
                add(ObjectKind::node, i, "ends", who + ": end " + std::to_string(k + 1) + " names no segment");
                continue;
            }
            const Segment& s = n_.segments[e.at.segment];
            if (!(e.speed > 0.0)) add(ObjectKind::node, i, "ends", who + ": the speed towards segment '" + s.name + "' must be above zero");
            const double reach = nd.reach(k);
            if (reach > 0.0 && std::isfinite(reach) && !(reach < s.length))
                add(ObjectKind::node, i, "fouling", who + ": its fouling point lies " + format_metres(reach) + " into segment '" + s.name +
                                             "', which is only " + format_metres(s.length) + " long");
            for (std::size_t j = 0; j < k; ++j)
                if (nd.ends[j].at == e.at) add(ObjectKind::node, i, "ends", who + ": joins one end of segment '" + s.name + "' twice");
        }
    }

    // Every segment end at exactly one node, and the reaches of the nodes at both ends apart.
    void ends_joined() {
        std::vector<std::vector<std::pair<std::size_t, std::size_t>>> at(2 * n_.segments.size());
        for (std::size_t i = 0; i < n_.nodes.size(); ++i)
            for (std::size_t k = 0; k < n_.nodes[i].ends.size(); ++k) {
                const EndRef& e = n_.nodes[i].ends[k].at;
                if (e.segment < n_.segments.size()) at[2 * e.segment + (e.end == End::end)].push_back({i, k});
            }
        for (std::size_t s = 0; s < n_.segments.size(); ++s) {
            const Segment& seg = n_.segments[s];
            for (int e = 0; e < 2; ++e) {
                const auto& nodes = at[2 * s + e];
                const std::string end = e == 0 ? "start" : "end";
                if (nodes.empty())
                    add(ObjectKind::segment, s, "", "segment '" + seg.name + "': its " + end + " is joined at no node");
                else if (nodes.size() > 1 && nodes[0].first != nodes[1].first)
                    add(ObjectKind::segment, s, "", "segment '" + seg.name + "': its " + end + " is joined at both '" +
                                                    n_.nodes[nodes[0].first].name + "' and '" +
                                                    n_.nodes[nodes[1].first].name + "'");
            }
            const auto& a = at[2 * s];
            const auto& b = at[2 * s + 1];
            if (a.size() == 1 && b.size() == 1) {
                const double ra = n_.nodes[a[0].first].reach(a[0].second);
                const double rb = n_.nodes[b[0].first].reach(b[0].second);
                if (ra + rb > seg.length && ra < seg.length && rb < seg.length)
                    add(ObjectKind::segment, s, "", "segment '" + seg.name + "': the fouling points of '" +
                                                    n_.nodes[a[0].first].name + "' and '" + n_.nodes[b[0].first].name +
                                                    "' overlap (" + format_metres(ra) + " + " + format_metres(rb) + " on " +
                                                    format_metres(seg.length) + ")");
            }
        }
    }

    bool location(ObjectKind k, std::size_t i, const std::string& who, const Location& at) {
        if (at.segment >= n_.segments.size()) {
            add(k, i, "segment", who + ": names no segment");
            return false;
        }
        const Segment& s = n_.segments[at.segment];
        if (!(at.offset >= 0.0 && at.offset <= s.length)) {
            add(k, i, "at", who + ": offset " + format_metres(at.offset) + " lies outside segment '" + s.name + "' (0 to " +
                          format_metres(s.length) + ")");
            return false;
        }
        return true;
    }

    // A section boundary inside a switch's or diamond's fouling reach would cut its section short.
    void clear_of_nodes(ObjectKind k, std::size_t i, const std::string& who, const Location& at) {
        const Segment& s = n_.segments[at.segment];
        for (const Node& nd : n_.nodes)
            for (std::size_t j = 0; j < nd.ends.size(); ++j) {
                if (nd.ends[j].at.segment != at.segment) continue;
                const double reach = nd.reach(j);
                const double from_node = nd.ends[j].at.end == End::start ? at.offset : s.length - at.offset;
                // At the node itself too: the node's section runs out from it along this end.
                if (reach > 0.0 && from_node < reach - kSamePlace)
                    add(k, i, "at", who + ": stands " + format_metres(from_node) + " from " + to_string(nd.kind) + " '" + nd.name +
                                  "', inside its fouling distance (" + format_metres(reach) + ")");
            }
    }

    void signal(std::size_t i) {
        const Signal& sg = n_.signals[i];
        unique_name(ObjectKind::signal, i, sg.name, signal_names_, true);
        const std::string who = "signal '" + sg.name + "'";
        if (location(ObjectKind::signal, i, who, sg.at)) {
            clear_of_nodes(ObjectKind::signal, i, who, sg.at);
            if (!n_.segments[sg.at.segment].allows(sg.heading))
                add(ObjectKind::signal, i, "heading", who + ": faces trains running " + to_string(sg.heading) + " on segment '" +
                                               n_.segments[sg.at.segment].name + "', where none may run");
        }
        if (!(sg.sighting_distance >= 0.0 && std::isfinite(sg.sighting_distance)))
            add(ObjectKind::signal, i, "sighting_distance", who + ": the sighting distance must be 0 m or more");
        if (!(sg.overlap >= 0.0 && std::isfinite(sg.overlap)))
            add(ObjectKind::signal, i, "overlap", who + ": the overlap must be 0 m or more");
        if (sg.distant_distance && !(*sg.distant_distance > 0.0 && std::isfinite(*sg.distant_distance)))
            add(ObjectKind::signal, i, "distant_distance", who + ": the distant signal's distance must be more than 0 m");
    }

    void station(std::size_t i) {
        unique_name(ObjectKind::station, i, n_.stations[i].id, station_ids_, true);
        bool timed = false;
        for (const TimingPoint& t : n_.timing_points) timed = timed || t.station == i;
        if (!timed && !n_.stations[i].id.empty())
            add(ObjectKind::station, i, "tracks", "station '" + n_.stations[i].id + "': has no timing point on any track");
    }

    void stopping_point(std::size_t i) {
        const StoppingPoint& p = n_.stopping_points[i];
        if (!known_station(ObjectKind::stopping_point, i, p.station)) return;
        const std::string who = "stopping point of " + station_name(p.station);
        if (!(p.max_train_length > 0.0))
            add(ObjectKind::stopping_point, i, "max_train_length", who + ": the longest train it is for must be longer than 0 m");
        if (!location(ObjectKind::stopping_point, i, who, p.at)) return;
        const Segment& s = n_.segments[p.at.segment];
        if (!s.allows(p.heading))
            add(ObjectKind::stopping_point, i, "heading", who + ": is for trains running " + to_string(p.heading) +
                                                   " on segment '" + s.name + "', where none may run");
        bool on_a_track = false;
        for (const TimingPoint& t : n_.timing_points)
            on_a_track = on_a_track || (t.station == p.station && t.at.segment == p.at.segment);
        if (!on_a_track)
            add(ObjectKind::stopping_point, i, "segment", who + ": segment '" + s.name +
                                                   "' is not one of the station's tracks (it holds no timing point of it)");
    }

    void platform(std::size_t i) {
        const Platform& p = n_.platforms[i];
        if (!known_station(ObjectKind::platform, i, p.station)) return;
        const std::string who = "platform" + quoted(p.name) + " of " + station_name(p.station);
        if (p.segment >= n_.segments.size()) {
            add(ObjectKind::platform, i, "segment", who + ": names no segment");
            return;
        }
        const Segment& s = n_.segments[p.segment];
        if (!(p.from >= 0.0 && p.from < p.to && p.to <= s.length))
            add(ObjectKind::platform, i, "from", who + ": must run from a lower to a higher offset within segment '" + s.name +
                                             "' (0 to " + format_metres(s.length) + "), not " + format_metres(p.from) + " to " +
                                             format_metres(p.to));
    }

    // Whether it matches a route is for the route search to say (find_routes).
    void route_name(std::size_t i) {
        const RouteName& r = n_.route_names[i];
        unique_name(ObjectKind::route_name, i, r.name, route_names_, true);
        const std::string who = "route '" + r.name + "'";
        if (r.entry_signal >= n_.signals.size()) add(ObjectKind::route_name, i, "from", who + ": names no signal to start at");
        if (r.exit_signal != kNone && r.exit_signal >= n_.signals.size())
            add(ObjectKind::route_name, i, "to", who + ": names no signal to end at");
        for (std::size_t v : r.via)
            if (v >= n_.segments.size()) add(ObjectKind::route_name, i, "via", who + ": a via track names no segment");
    }

    const Network& n_;
    std::vector<NetworkProblem> out_;
    std::map<std::string, std::size_t> segment_names_, node_names_, signal_names_, station_ids_, route_names_;
};

}  // namespace

std::vector<NetworkProblem> check_network(const Network& network) { return Checker(network).run(); }

NetworkError::NetworkError(std::vector<NetworkProblem> p) : std::runtime_error(joined(p)), problems(std::move(p)) {}
NetworkError::NetworkError(const std::string& message) : std::runtime_error(message) {}

}  // namespace knockon::net
