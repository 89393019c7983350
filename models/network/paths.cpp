#include "models/network/paths.hpp"

#include <cmath>
#include <functional>
#include <limits>
#include <queue>
#include <string>
#include <tuple>

namespace knockon::net {
namespace {

constexpr double kInf = std::numeric_limits<double>::infinity();

// A place and heading a leg of the search starts from.
struct Source {
    Location at;
    Heading heading;
    double cost;
};

// A place and heading a leg may end at, and where the next leg starts from it.
struct Target {
    Location at;
    Heading heading;
    Location next_at;
    Heading next_heading;
    double extra = 0.0;          // run beyond `at` to `next_at` (a via segment end to end)
    std::size_t call = kNone;    // the call met here, if any
};

// The best way found to one target: from which source, over which stretches.
struct Arrival {
    double cost = kInf;
    std::size_t source = kNone;
    std::vector<Stretch> run;
};

// Distance from `from` to `to` on one segment running in h; negative when `to` lies behind.
double ahead(double from, double to, Heading h) { return h == Heading::forward ? to - from : from - to; }

// Dijkstra over (segment, heading) states, each entered at its entry end; ties broken by state
// number so the same request always gives the same path.
std::vector<Arrival> shortest(const NetworkGraph& g, const std::vector<Source>& sources, const std::vector<Target>& targets) {
    const std::size_t n = g.network().segments.size();
    auto id = [](std::size_t seg, Heading h) { return 2 * seg + (h == Heading::backward); };
    struct Pred {
        bool from_source = false;
        std::size_t index = kNone;
    };
    std::vector<double> dist(2 * n, kInf);
    std::vector<Pred> pred(2 * n);
    std::vector<Pred> target_pred(targets.size());
    std::vector<double> best(targets.size(), kInf);
    using Item = std::tuple<double, std::size_t>;
    std::priority_queue<Item, std::vector<Item>, std::greater<Item>> queue;

    auto reach_targets = [&](std::size_t seg, Heading h, double offset, double cost, Pred p) {
        for (std::size_t t = 0; t < targets.size(); ++t) {
            if (targets[t].at.segment != seg || targets[t].heading != h) continue;
            const double d = ahead(offset, targets[t].at.offset, h);
            if (d < -kSamePlace) continue;
            if (cost + std::max(d, 0.0) < best[t]) {
                best[t] = cost + std::max(d, 0.0);
                target_pred[t] = p;
            }
        }
    };
    auto leave = [&](std::size_t seg, Heading h, double cost, Pred p) {
        for (const EndRef& e : g.onward(exit_end(seg, h))) {
            const Heading nh = heading_from(e);
            if (!g.segment(e.segment).allows(nh)) continue;
            const std::size_t s = id(e.segment, nh);
            if (cost < dist[s]) {
                dist[s] = cost;
                pred[s] = p;
                queue.push({cost, s});
            }
        }
    };
    for (std::size_t i = 0; i < sources.size(); ++i) {
        const Source& src = sources[i];
        if (!g.segment(src.at.segment).allows(src.heading)) continue;
        reach_targets(src.at.segment, src.heading, src.at.offset, src.cost, {true, i});
        const double to_exit = ahead(src.at.offset, g.offset_of(exit_end(src.at.segment, src.heading)), src.heading);
        leave(src.at.segment, src.heading, src.cost + to_exit, {true, i});
    }
    while (!queue.empty()) {
        const auto [cost, s] = queue.top();
        queue.pop();
        if (cost > dist[s]) continue;
        const std::size_t seg = s / 2;
        const Heading h = s % 2 ? Heading::backward : Heading::forward;
        reach_targets(seg, h, g.offset_of(entry_end(seg, h)), cost, {false, s});
        leave(seg, h, cost + g.segment(seg).length, {false, s});
    }

    std::vector<Arrival> out(targets.size());
    for (std::size_t t = 0; t < targets.size(); ++t) {
        if (best[t] == kInf) continue;
        // Back from the target to the source: the state reached last runs to the target, every
        // earlier one whole, and the source's own segment from the source to its exit end.
        std::vector<Stretch> back;
        Pred p = target_pred[t];
        bool last = true;
        while (!p.from_source) {
            const std::size_t seg = p.index / 2;
            const Heading h = p.index % 2 ? Heading::backward : Heading::forward;
            const double to = last ? targets[t].at.offset : g.offset_of(exit_end(seg, h));
            back.push_back({seg, g.offset_of(entry_end(seg, h)), to, h});
            last = false;
            p = pred[p.index];
        }
        const Source& src = sources[p.index];
        const double first_to = last ? targets[t].at.offset : g.offset_of(exit_end(src.at.segment, src.heading));
        Arrival a;
        a.cost = best[t];
        a.source = p.index;
        append(a.run, {src.at.segment, src.at.offset, first_to, src.heading});
        for (auto it = back.rbegin(); it != back.rend(); ++it) append(a.run, *it);
        out[t] = std::move(a);
    }
    return out;
}


// What the search must reach next, with a name for messages.
struct Waypoint {
    std::vector<Target> targets;
    std::string what;
};

std::string call_name(const Network& net, const PathRequest& r, std::size_t k) {
    return "call " + std::to_string(k + 1) + " (" + net.stations[r.calls[k].station].id + ")";
}

// The places a call can be met at: each track of its station (the one named, if any), each
// heading allowed there; a stop at the stop place for that heading and the train's length.
Waypoint call_waypoint(const NetworkGraph& g, const PathRequest& r, std::size_t k) {
    const Network& net = g.network();
    const PathCall& c = r.calls[k];
    Waypoint w{{}, call_name(net, r, k)};
    for (std::size_t i = 0; i < net.timing_points.size(); ++i) {
        const TimingPoint& tp = net.timing_points[i];
        if (tp.station != c.station || (c.track != kNone && tp.at.segment != c.track)) continue;
        for (Heading h : {Heading::forward, Heading::backward}) {
            if (!g.segment(tp.at.segment).allows(h)) continue;
            const Location at = c.stops ? stop_place(net, i, h, r.train_length) : tp.at;
            const Heading next = c.reverses ? opposite(h) : h;
            if (!g.segment(tp.at.segment).allows(next)) continue;
            w.targets.push_back({at, h, at, next, 0.0, k});
        }
    }
    return w;
}

Waypoint via_waypoint(const NetworkGraph& g, std::size_t segment) {
    Waypoint w{{}, "via segment '" + g.segment(segment).name + "'"};
    for (Heading h : {Heading::forward, Heading::backward}) {
        if (!g.segment(segment).allows(h)) continue;
        const EndRef in = entry_end(segment, h), out = exit_end(segment, h);
        w.targets.push_back({{segment, g.offset_of(in)}, h, {segment, g.offset_of(out)}, h, g.segment(segment).length});
    }
    return w;
}

Waypoint boundary_waypoint(const NetworkGraph& g, std::size_t node, bool entering) {
    const Node& nd = g.network().nodes[node];
    Waypoint w{{}, std::string(entering ? "the entry" : "the exit") + " at '" + nd.name + "'"};
    const EndRef& e = nd.ends.front().at;
    const Location at{e.segment, g.offset_of(e)};
    const Heading h = entering ? heading_from(e) : opposite(heading_from(e));
    w.targets.push_back({at, h, at, h});
    return w;
}

void check_request(const NetworkGraph& g, const PathRequest& r) {
    const Network& net = g.network();
    if (r.calls.empty()) throw NetworkError("a path needs at least one call");
    for (std::size_t node : {r.enters_at, r.leaves_at})
        if (node != kNone && (node >= net.nodes.size() || net.nodes[node].kind != NodeKind::boundary))
            throw NetworkError("a train enters and leaves only at a boundary node");
    for (std::size_t v : r.entry_via)
        if (v >= net.segments.size()) throw NetworkError("the entry: a via track names no segment");
    for (std::size_t k = 0; k < r.calls.size(); ++k) {
        const PathCall& c = r.calls[k];
        if (c.station >= net.stations.size()) throw NetworkError("call " + std::to_string(k + 1) + ": no such station");
        if (c.track != kNone && c.track >= net.segments.size())
            throw NetworkError(call_name(net, r, k) + ": no such track");
        if (c.reverses && !c.stops) throw NetworkError(call_name(net, r, k) + ": a train reverses only where it stops");
        for (std::size_t v : c.via)
            if (v >= net.segments.size()) throw NetworkError(call_name(net, r, k) + ": a via track names no segment");
    }
}

}  // namespace

NetworkPath find_path(const NetworkGraph& g, const PathRequest& r) {
    check_request(g, r);
    const Network& net = g.network();
    std::vector<Waypoint> way;
    if (r.enters_at != kNone) {
        way.push_back(boundary_waypoint(g, r.enters_at, true));
        for (std::size_t v : r.entry_via) way.push_back(via_waypoint(g, v));
    }
    for (std::size_t k = 0; k < r.calls.size(); ++k) {
        way.push_back(call_waypoint(g, r, k));
        if (way.back().targets.empty())
            throw NetworkError(call_name(net, r, k) + ": the station has no track there a train may run on");
        if (k + 1 < r.calls.size() || r.leaves_at != kNone)
            for (std::size_t v : r.calls[k].via) way.push_back(via_waypoint(g, v));
    }
    if (r.leaves_at != kNone) way.push_back(boundary_waypoint(g, r.leaves_at, false));

    // The first waypoint is where the path starts: every place of it at no cost.
    std::vector<std::vector<Arrival>> legs(way.size());
    for (std::size_t t = 0; t < way[0].targets.size(); ++t) legs[0].push_back({0.0, kNone, {}});
    for (std::size_t w = 1; w < way.size(); ++w) {
        std::vector<Source> sources;
        for (std::size_t t = 0; t < way[w - 1].targets.size(); ++t) {
            const Target& tg = way[w - 1].targets[t];
            sources.push_back({tg.next_at, tg.next_heading, legs[w - 1][t].cost + tg.extra});
        }
        legs[w] = shortest(g, sources, way[w].targets);
        bool any = false;
        for (const Arrival& a : legs[w]) any = any || a.cost < kInf;
        if (!any) throw NetworkError("no way over the network from " + way[w - 1].what + " to " + way[w].what);
    }

    // The best end, then back through the legs.
    std::size_t t = 0;
    for (std::size_t i = 1; i < legs.back().size(); ++i)
        if (legs.back()[i].cost < legs.back()[t].cost) t = i;
    std::vector<std::size_t> chosen(way.size());
    for (std::size_t w = way.size(); w-- > 0;) {
        chosen[w] = t;
        t = legs[w][t].source;
    }
    NetworkPath path;
    path.calls.resize(r.calls.size());
    auto run = [&](const Stretch& s) {
        if (std::fabs(s.to - s.from) < kSamePlace) return;
        path.length += s.length();
        const bool after_run = !path.steps.empty() && path.steps.back().kind == PathStep::Kind::run;
        if (!after_run || !run_on(path.steps.back().run, s)) path.steps.push_back({PathStep::Kind::run, s, kNone});
    };
    for (std::size_t w = 0; w < way.size(); ++w) {
        for (const Stretch& s : legs[w][chosen[w]].run) run(s);
        const Target& tg = way[w].targets[chosen[w]];
        if (tg.call != kNone) {
            path.calls[tg.call] = {tg.at, tg.heading, path.length};
            if (tg.next_heading != tg.heading) path.steps.push_back({PathStep::Kind::reversal, {}, tg.call});
        }
        if (tg.extra > 0.0) run({tg.at.segment, tg.at.offset, tg.next_at.offset, tg.heading});
    }
    return path;
}

Location stop_place(const Network& network, std::size_t timing_point, Heading heading, double length) {
    const TimingPoint& tp = network.timing_points[timing_point];
    const StoppingPoint* chosen = nullptr;
    for (const StoppingPoint& sp : network.stopping_points) {
        if (sp.station != tp.station || sp.at.segment != tp.at.segment || sp.heading != heading) continue;
        if (sp.max_train_length < length) continue;
        if (!chosen || sp.max_train_length < chosen->max_train_length) chosen = &sp;
    }
    return chosen ? chosen->at : tp.at;
}

}  // namespace knockon::net
