#include "models/network/from_line.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <map>
#include <set>

#include "models/network/checks.hpp"
#include "models/path.hpp"

namespace knockon::net {
namespace {

bool same(double a, double b) { return std::fabs(a - b) < kSamePlace; }

std::string km(double x) {
    char buf[32];
    std::snprintf(buf, sizeof buf, "%.3f", x / 1000.0);
    return buf;
}

class LineReader {
public:
    explicit LineReader(const Infrastructure& infra) : infra_(infra) {}

    LineNetwork run() {
        for (std::size_t t = 0; t < infra_.tracks.size(); ++t) cut_track(t);
        for (std::size_t t = 0; t < infra_.tracks.size(); ++t) switches_on(t);
        free_ends();
        for (const knockon::Signal& s : infra_.signals) signal(s);
        for (std::size_t t = 0; t < infra_.tracks.size(); ++t) joints_on(t);
        stations();
        out_.network.interlocking = infra_.interlocking;
        return std::move(out_);
    }

private:
    Network& net() { return out_.network; }

    // Chainages of the loops' turnouts on track t, its own ends included.
    std::vector<double> cuts_of(const Track& t) const {
        std::vector<double> cuts{t.from, t.to};
        for (const Track& c : infra_.tracks)
            if (c.parent == t.id)
                for (double x : {c.from, c.to})
                    if (x > t.from + kSamePlace && x < t.to - kSamePlace) cuts.push_back(x);
        std::sort(cuts.begin(), cuts.end());
        cuts.erase(std::unique(cuts.begin(), cuts.end(), same), cuts.end());
        return cuts;
    }

    void cut_track(std::size_t ti) {
        const Track& t = infra_.tracks[ti];
        const std::vector<double> cuts = cuts_of(t);
        for (std::size_t k = 0; k + 1 < cuts.size(); ++k) {
            const double x0 = cuts[k], x1 = cuts[k + 1];
            Segment s;
            s.name = cuts.size() == 2 ? t.id : t.id + "." + std::to_string(k + 1);
            s.length = x1 - x0;
            s.forward = t.up;
            s.backward = t.down;
            s.posts = {{0.0, x0}};
            s.gradient.push_back({0.0, infra_.gradient_at(x0)});
            s.speed.push_back({0.0, std::min(infra_.line_speed_at(x0), t.speed_limit)});
            for (const ChainageBand& b : infra_.gradients)
                if (b.from > x0 + kSamePlace && b.from < x1 - kSamePlace) s.gradient.push_back({b.from - x0, infra_.gradient_at(b.from)});
            for (const ChainageBand& b : infra_.speed_limits)
                if (b.from > x0 + kSamePlace && b.from < x1 - kSamePlace)
                    s.speed.push_back({b.from - x0, std::min(infra_.line_speed_at(b.from), t.speed_limit)});
            pieces_of_[t.id].push_back(net().segments.size());
            net().segments.push_back(std::move(s));
            out_.pieces.push_back({t.id, x0, x1});
        }
    }

    // The piece of track `id` that ends at x (lower) or starts at x (upper); kNone if none.
    std::size_t piece_ending(const std::string& id, double x) const {
        for (std::size_t s : pieces_of_.at(id))
            if (same(out_.pieces[s].x_to, x)) return s;
        return kNone;
    }
    std::size_t piece_starting(const std::string& id, double x) const {
        for (std::size_t s : pieces_of_.at(id))
            if (same(out_.pieces[s].x_from, x)) return s;
        return kNone;
    }

    void add_node(const std::string& name, NodeKind kind, const std::vector<EndRef>& ends) {
        Node nd;
        nd.name = name;
        nd.kind = kind;
        for (const EndRef& e : ends) {
            nd.ends.push_back({e, kNoLimit});
            joined_.insert({e.segment, e.end == End::end});
        }
        if (const int n = ++node_names_[nd.name]; n > 1) {
            nd.name += '#';
            nd.name += std::to_string(n);
        }
        net().nodes.push_back(std::move(nd));
    }

    // A switch at each turnout of a loop on track ti: the toe on the track beyond the loop, the
    // legs the track towards the loop (straight) and the loop's end.  Zero fouling distance: the
    // line model bounds sections at the turnout itself.
    void switches_on(std::size_t ti) {
        const Track& t = infra_.tracks[ti];
        for (double x : cuts_of(t)) {
            if (same(x, t.from) || same(x, t.to)) continue;
            std::vector<const Track*> leaving, joining;
            for (const Track& c : infra_.tracks) {
                if (c.parent != t.id) continue;
                if (same(c.from, x)) leaving.push_back(&c);
                if (same(c.to, x)) joining.push_back(&c);
            }
            if (!leaving.empty() && !joining.empty())
                throw NetworkError("loops '" + joining.front()->id + "' and '" + leaving.front()->id + "' meet at km " +
                                   km(x) + " of track '" + t.id + "': a network needs a piece of track between their switches");
            const bool leaves = !leaving.empty();
            std::vector<EndRef> ends;
            const std::size_t lower = piece_ending(t.id, x), upper = piece_starting(t.id, x);
            ends.push_back(leaves ? EndRef{lower, End::end} : EndRef{upper, End::start});
            ends.push_back(leaves ? EndRef{upper, End::start} : EndRef{lower, End::end});
            for (const Track* c : leaves ? leaving : joining) {
                const std::size_t leg = leaves ? piece_starting(c->id, x) : piece_ending(c->id, x);
                ends.push_back({leg, leaves ? End::start : End::end});
            }
            add_node(t.id + " " + km(x), NodeKind::switch_, ends);
            toe_[{t.id, x}] = ends.front().segment;
        }
    }

    // Track ends not at a turnout: where a main track ends and another of a common direction
    // begins, the train runs on (a link, with the joint the line model has there); else trains
    // enter and leave there (a boundary).
    void free_ends() {
        for (std::size_t s = 0; s < net().segments.size(); ++s)
            for (End e : {End::start, End::end}) {
                if (joined_.count({s, e == End::end})) continue;
                const LinePiece& p = out_.pieces[s];
                const double x = e == End::start ? p.x_from : p.x_to;
                const Track& t = *infra_.find_track(p.track);
                std::size_t other = kNone;
                if (e == End::end && !t.is_loop())
                    for (std::size_t o = 0; o < net().segments.size() && other == kNone; ++o) {
                        const Track& u = *infra_.find_track(out_.pieces[o].track);
                        if (o != s && !u.is_loop() && same(out_.pieces[o].x_from, x) && !joined_.count({o, false}) &&
                            ((t.up && u.up) || (t.down && u.down)))
                            other = o;
                    }
                if (other != kNone) {
                    add_node(p.track + " " + km(x), NodeKind::link, {{s, End::end}, {other, End::start}});
                    net().joints.push_back({"", {other, 0.0}});
                } else {
                    add_node(p.track + " " + km(x), NodeKind::boundary, {{s, e}});
                }
            }
    }

    // The segment of track `id` at chainage x: the piece holding it, and at a turnout of a loop
    // beside the track the piece on the toe side, which trains over either leg pass.
    std::size_t segment_at(const std::string& id, double x) const {
        if (auto it = toe_.find({id, x}); it != toe_.end()) return it->second;
        for (const auto& [key, seg] : toe_)
            if (key.first == id && same(key.second, x)) return seg;
        for (std::size_t s : pieces_of_.at(id))
            if (x >= out_.pieces[s].x_from - kSamePlace && x <= out_.pieces[s].x_to + kSamePlace) return s;
        return kNone;
    }

    Location location(const std::string& track, double x) const {
        const std::size_t s = segment_at(track, x);
        if (s == kNone) return {kNone, 0.0};
        return {s, std::clamp(x - out_.pieces[s].x_from, 0.0, net_length(s))};
    }
    double net_length(std::size_t s) const { return out_.network.segments[s].length; }

    void signal(const knockon::Signal& s) {
        Signal out;
        out.name = s.id;
        out.at = infra_.find_track(s.track) ? location(s.track, s.at) : Location{};
        out.heading = s.direction == Direction::up ? Heading::forward : Heading::backward;
        out.system = infra_.aspect_system_at(s.at);
        out.sighting_distance = s.sighting_distance;
        out.overlap = s.overlap;
        out.distant_distance = s.distant_distance;
        net().signals.push_back(out);
    }

    // The line model's boundaries on track ti that no signal of the track, turnout or track end
    // gives in the network: overlap ends and extra joints.
    void joints_on(std::size_t ti) {
        const Track& t = infra_.tracks[ti];
        const std::vector<double> turnouts = cuts_of(t);
        for (double x : section_boundaries(infra_, t)) {
            if (std::any_of(turnouts.begin(), turnouts.end(), [&](double c) { return same(c, x); })) continue;
            const bool at_signal = std::any_of(infra_.signals.begin(), infra_.signals.end(),
                                               [&](const knockon::Signal& s) { return s.track == t.id && same(s.at, x); });
            if (!at_signal) net().joints.push_back({"", location(t.id, x)});
        }
    }

    // A station's timing point on every track passing its chainage.
    void stations() {
        for (const knockon::Station& st : infra_.stations) {
            net().stations.push_back({st.id, st.name});
            for (const Track& t : infra_.tracks)
                if (st.at >= t.from - kSamePlace && st.at <= t.to + kSamePlace)
                    net().timing_points.push_back({net().stations.size() - 1, location(t.id, st.at)});
        }
    }

    const Infrastructure& infra_;
    LineNetwork out_;
    std::map<std::string, std::vector<std::size_t>> pieces_of_;
    std::map<std::pair<std::string, double>, std::size_t> toe_;
    std::set<std::pair<std::size_t, bool>> joined_;
    std::map<std::string, int> node_names_;
};

}  // namespace

LineNetwork network_from_line(const Infrastructure& infra) { return LineReader(infra).run(); }

}  // namespace knockon::net
