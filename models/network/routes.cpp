#include "models/network/routes.hpp"

#include <algorithm>
#include <cmath>
#include <map>
#include <set>
#include <utility>

namespace knockon::net {
namespace {

using Visited = std::set<std::pair<std::size_t, Heading>>;

// Ways are enumerated one by one; switches one after another with no signal between them double
// the ways at each.  Past this many steps of one search a layout is refused rather than searched
// for ever (a real layout needs a few dozen).
constexpr std::size_t kMaxSteps = 100000;

double length_of(const std::vector<Stretch>& run) {
    double l = 0.0;
    for (const Stretch& s : run) l += s.length();
    return l;
}

std::vector<std::size_t> sections_of(const DetectionSections& sections, const std::vector<Stretch>& run) {
    std::vector<std::size_t> out;
    for (const Stretch& s : run)
        for (std::size_t id : sections.crossed(s.segment, s.from, s.to))
            if (out.empty() || out.back() != id) out.push_back(id);
    return out;
}

class RouteWalker {
public:
    RouteWalker(const NetworkGraph& g, const DetectionSections& s, std::vector<Route>& out)
        : g_(g), sections_(s), out_(out) {}

    void from_signal(std::size_t sig) {
        const Signal& s = g_.network().signals[sig];
        entry_ = sig;
        // The signal's own segment is not marked: coming round to it again the train meets the
        // signal itself at the latest (a ring with one signal has a route from it to itself).
        Visited visited;
        steps_ = 0;
        walk(s.at.segment, s.at.offset, s.heading, false, {}, visited);
    }

private:
    // Runs on `segment` from `offset` in `h`, looking for the next signal facing h: beyond offset,
    // or at it too where the train has just come onto the segment.
    void walk(std::size_t segment, double offset, Heading h, bool inclusive, std::vector<Stretch> run, Visited& visited) {
        const Network& net = g_.network();
        if (++steps_ > kMaxSteps)
            throw NetworkError("beyond signal '" + net.signals[entry_].name + "' more than " + std::to_string(kMaxSteps) +
                               " pieces of track would have to be searched for the next signal: too many switches with "
                               "no signal between them");
        const bool fwd = h == Heading::forward;
        std::size_t found = kNone;
        double found_at = fwd ? kNoLimit : -kNoLimit;
        for (std::size_t i : g_.signals_on(segment)) {
            const Signal& s = net.signals[i];
            if (s.heading != h) continue;
            const double ahead = fwd ? s.at.offset - offset : offset - s.at.offset;
            if (ahead < (inclusive ? -kSamePlace : kSamePlace)) continue;
            if (found == kNone || (fwd ? s.at.offset < found_at : s.at.offset > found_at)) {
                found = i;
                found_at = s.at.offset;
            }
        }
        if (found != kNone) {
            append(run, {segment, offset, found_at, h});
            finish(std::move(run), found, kNone);
            return;
        }
        const EndRef out = exit_end(segment, h);
        append(run, {segment, offset, g_.offset_of(out), h});
        const std::vector<EndRef> next = g_.onward(out);
        if (next.empty()) {
            finish(std::move(run), kNone, g_.node_at(out).node);
            return;
        }
        for (const EndRef& e : next) {
            const Heading nh = heading_from(e);
            if (!g_.segment(e.segment).allows(nh)) continue;   // no train runs that way there
            if (!visited.insert({e.segment, nh}).second)
                throw NetworkError("beyond signal '" + net.signals[entry_].name + "' the track runs round through segment '" +
                                   g_.segment(e.segment).name + "' and back with no signal facing the train");
            walk(e.segment, g_.offset_of(e), nh, true, run, visited);
            visited.erase({e.segment, nh});
        }
    }

    void finish(std::vector<Stretch> run, std::size_t exit, std::size_t end_node) {
        const Network& net = g_.network();
        Route r;
        r.entry_signal = entry_;
        r.exit_signal = exit;
        r.end_node = end_node;
        r.length = length_of(run);
        r.sections = sections_of(sections_, run);
        r.run = std::move(run);
        r.name = net.signals[entry_].name + "-" + (exit != kNone ? net.signals[exit].name : net.nodes[end_node].name);
        if (const int n = ++names_[r.name]; n > 1) {
            r.name += '/';
            r.name += std::to_string(n);
        }
        if (exit != kNone && net.signals[exit].overlap > 0.0)
            for (auto& o : runs_ahead(g_, net.signals[exit].at, net.signals[exit].heading, net.signals[exit].overlap)) {
                Overlap ov;
                ov.length = length_of(o);
                ov.sections = sections_of(sections_, o);
                ov.run = std::move(o);
                r.overlaps.push_back(std::move(ov));
            }
        out_.push_back(std::move(r));
    }

    const NetworkGraph& g_;
    const DetectionSections& sections_;
    std::vector<Route>& out_;
    std::size_t entry_ = kNone;
    std::size_t steps_ = 0;
    std::map<std::string, int> names_;
};

void ahead(const NetworkGraph& g, std::size_t segment, double offset, Heading h, double left, std::vector<Stretch> run,
           std::vector<std::vector<Stretch>>& out, std::size_t& steps) {
    if (++steps > kMaxSteps)
        throw NetworkError("more than " + std::to_string(kMaxSteps) + " pieces of track lie within " +
                           std::to_string(left) + " m ahead of segment '" + g.segment(segment).name + "'");
    // Ends: every step runs to a segment's end, and segments are longer than zero.
    const EndRef exit = exit_end(segment, h);
    const double to_end = h == Heading::forward ? g.offset_of(exit) - offset : offset - g.offset_of(exit);
    if (left <= to_end + kSamePlace) {
        append(run, {segment, offset, h == Heading::forward ? offset + left : offset - left, h});
        out.push_back(std::move(run));
        return;
    }
    append(run, {segment, offset, g.offset_of(exit), h});
    bool went_on = false;
    for (const EndRef& e : g.onward(exit)) {
        const Heading nh = heading_from(e);
        if (!g.segment(e.segment).allows(nh)) continue;
        went_on = true;
        ahead(g, e.segment, g.offset_of(e), nh, left - to_end, run, out, steps);
    }
    if (!went_on) out.push_back(std::move(run));
}

}  // namespace

std::vector<std::vector<Stretch>> runs_ahead(const NetworkGraph& graph, const Location& start, Heading heading,
                                             double distance) {
    std::vector<std::vector<Stretch>> out;
    std::size_t steps = 0;
    ahead(graph, start.segment, start.offset, heading, distance, {}, out, steps);
    return out;
}

namespace {

bool runs_over(const Route& r, std::size_t segment) {
    for (const Stretch& s : r.run)
        if (s.segment == segment) return true;
    return false;
}

// Gives each named route its name: the one found route from its entry to its exit over its via
// tracks; none or several is a problem of that route name, as is a name another route has too.
void apply_names(const Network& net, std::vector<Route>& routes) {
    std::vector<NetworkProblem> problems;
    auto problem = [&](std::size_t i, std::string message) {
        problems.push_back({ObjectKind::route_name, i, "", "route '" + net.route_names[i].name + "': " + message});
    };
    for (std::size_t n = 0; n < net.route_names.size(); ++n) {
        const RouteName& rn = net.route_names[n];
        std::vector<std::size_t> matches;
        for (std::size_t i = 0; i < routes.size(); ++i) {
            const Route& r = routes[i];
            if (r.entry_signal != rn.entry_signal || r.exit_signal != rn.exit_signal) continue;
            bool over_all = true;
            for (std::size_t v : rn.via) over_all = over_all && runs_over(r, v);
            if (over_all) matches.push_back(i);
        }
        const std::string ends = "from signal '" + net.signals[rn.entry_signal].name + "' to " +
                                 (rn.exit_signal == kNone ? std::string("a buffer stop or boundary")
                                                          : "signal '" + net.signals[rn.exit_signal].name + "'");
        if (matches.empty())
            problem(n, "no route runs " + ends + (rn.via.empty() ? "" : " over its via tracks"));
        else if (matches.size() > 1)
            problem(n, std::to_string(matches.size()) + " routes run " + ends + "; name via tracks to say which");
        else
            routes[matches.front()].name = rn.name;
    }
    std::map<std::string, std::size_t> seen;
    for (const Route& r : routes)
        if (++seen[r.name] == 2)
            for (std::size_t n = 0; n < net.route_names.size(); ++n)
                if (net.route_names[n].name == r.name) problem(n, "another route found is called so too; give another name");
    if (!problems.empty()) throw NetworkError(std::move(problems));
}

}  // namespace

std::vector<Route> find_routes(const NetworkGraph& graph, const DetectionSections& sections) {
    std::vector<Route> routes;
    RouteWalker walker(graph, sections, routes);
    for (std::size_t i = 0; i < graph.network().signals.size(); ++i) walker.from_signal(i);
    apply_names(graph.network(), routes);
    return routes;
}

}  // namespace knockon::net
