#include "models/line_paths.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>

#include "models/network/checks.hpp"
#include "models/network/paths.hpp"
#include "models/scenario_error.hpp"

namespace knockon {
namespace {

const double kEps = 1e-6;

std::string km(double x) {
    char buf[32];
    std::snprintf(buf, sizeof buf, "%.3f", x / 1000.0);
    return buf;
}

// Progress along the service's direction: chainage for up, distance from the far end for down.
double progress(const Infrastructure& infra, Direction d, double x) { return d == Direction::up ? x : infra.length - x; }

// The line model's section ids and track ids, by the network's section and segment index.
net::PathNames line_names(const net::LineNetwork& line, const net::DetectionSections& sections) {
    net::PathNames names;
    for (const net::LinePiece& p : line.pieces) names.tracks.push_back(p.track);
    for (const net::DetectionSection& d : sections.all()) {
        // A line's sections are each one piece of one track (network_from_line keeps it so).
        const net::SectionPiece& piece = d.pieces.front();
        const net::LinePiece& p = line.pieces[piece.segment];
        names.sections.push_back(section_id(p.track, p.x_from + piece.from, p.x_from + piece.to));
    }
    return names;
}

}  // namespace

net::LineNetwork LinePaths::read(const Infrastructure& infra) {
    try {
        return net::network_from_line(infra);
    } catch (const net::NetworkError& e) {
        throw PathError(e.what());
    }
}

// A network the line reader makes that its own checks refuse is a line the network cannot take.
LinePaths::LinePaths(const Infrastructure& infra) try
    : infra_(infra), line_(read(infra)), graph_(line_.network), sections_(graph_), names_(line_names(line_, sections_)) {
} catch (const net::NetworkError& e) {
    throw PathError(e.what());
}

// The boundary where a train of direction d enters (or leaves) at the line's end: on the main
// track that carries d there.
std::size_t LinePaths::edge_boundary(Direction d, bool entering) const {
    const bool at_zero = (d == Direction::up) == entering;
    const double x = at_zero ? 0.0 : infra_.length;
    const Track* main = infra_.main_track_at(at_zero ? std::min(0.5, x + infra_.length / 2) : std::max(x - 0.5, x / 2), d);
    if (!main) throw PathError("no main track for the " + std::string(to_string(d)) + " direction at " + km(x) + " km");
    for (std::size_t s = 0; s < line_.pieces.size(); ++s) {
        const net::LinePiece& p = line_.pieces[s];
        if (p.track != main->id || std::fabs((at_zero ? p.x_from : p.x_to) - x) > kEps) continue;
        const net::NodeSlot n = graph_.node_at({s, at_zero ? net::End::start : net::End::end});
        if (line_.network.nodes[n.node].kind == net::NodeKind::boundary) return n.node;
    }
    throw PathError("the main track " + main->id + " of the " + std::string(to_string(d)) + " direction does not reach the line end at " +
                    km(x) + " km");
}

// The segment of track `track` holding the station's timing point; kNone where it has none.
std::size_t LinePaths::timing_segment(std::size_t station, const std::string& track) const {
    for (const net::TimingPoint& tp : line_.network.timing_points)
        if (tp.station == station && line_.pieces[tp.at.segment].track == track) return tp.at.segment;
    return net::kNone;
}

// The pieces of the main track of direction d that lie wholly between chainages x_a and x_b, in
// running order: run over end to end, they keep the train off the loops beside them.
std::vector<std::size_t> LinePaths::main_between(double x_a, double x_b, Direction d) const {
    const double lo = std::min(x_a, x_b), hi = std::max(x_a, x_b);
    std::vector<std::size_t> out;
    for (std::size_t s = 0; s < line_.pieces.size(); ++s) {
        const net::LinePiece& p = line_.pieces[s];
        if (p.x_from < lo - kEps || p.x_to > hi + kEps) continue;
        const Track* main = infra_.main_track_at(0.5 * (p.x_from + p.x_to), d);
        if (main && main->id == p.track) out.push_back(s);
    }
    std::sort(out.begin(), out.end(), [&](std::size_t a, std::size_t b) {
        return d == Direction::up ? line_.pieces[a].x_from < line_.pieces[b].x_from
                                  : line_.pieces[a].x_from > line_.pieces[b].x_from;
    });
    return out;
}

net::PathRequest LinePaths::request(const Service& service, double train_length) const {
    if (service.calls.empty()) throw PathError("service has no calls");
    const Direction d = service.direction;
    auto station_of = [&](const Call& c) {
        const Station* st = infra_.find_station(c.station);
        if (!st) throw PathError("unknown station '" + c.station + "'");
        return st;
    };
    const double p_start = service.enters_at_edge ? 0.0 : progress(infra_, d, station_of(service.calls.front())->at);
    const double p_end = service.leaves_at_edge ? infra_.length : progress(infra_, d, station_of(service.calls.back())->at);
    if (p_end < p_start - kEps)
        throw PathError("the calls run against the service's direction (" + std::string(to_string(d)) + ")");

    net::PathRequest r;
    r.train_length = train_length;
    double last_loop_end = -1.0;   // progress where the last loop called at ends
    double last_p = p_start;
    for (std::size_t i = 0; i < service.calls.size(); ++i) {
        const Call& c = service.calls[i];
        const Station* st = station_of(c);
        const double sp = progress(infra_, d, st->at);
        if (i > 0 && sp < last_p - kEps) throw PathError("call at " + c.station + " lies behind the previous call");
        last_p = sp;
        const Track* track = nullptr;
        if (!c.track.empty()) {
            track = infra_.find_track(c.track);
            if (!track) throw PathError("call at " + c.station + ": unknown track '" + c.track + "'");
            if (!track->allows(d))
                throw PathError("call at " + c.station + ": track " + track->id + " is not worked in the " + to_string(d) +
                                " direction");
            double a = progress(infra_, d, track->from), b = progress(infra_, d, track->to);
            if (a > b) std::swap(a, b);
            if (sp < a - kEps || sp > b + kEps)
                throw PathError("call at " + c.station + ": track " + track->id + " does not pass the station");
            if (track->is_loop()) {
                if (a < last_loop_end - kEps)
                    throw PathError("call at " + c.station + ": loop " + track->id + " overlaps the previous loop used");
                last_loop_end = b;
            } else {
                track = nullptr;   // a main track is the default anyway
            }
        }
        if (!track) track = infra_.main_track_at(st->at, d);
        net::PathCall pc;
        pc.station = line_.network.find_station(st->id);
        pc.track = track ? timing_segment(pc.station, track->id) : net::kNone;
        pc.stops = c.stops;
        r.calls.push_back(std::move(pc));
    }
    // Main-track pieces between the calls (and the line's ends), so that no loop is taken that
    // no call names.
    const double x_first = infra_.find_station(service.calls.front().station)->at;
    const double x_last = infra_.find_station(service.calls.back().station)->at;
    const double x_lo = d == Direction::up ? 0.0 : infra_.length, x_hi = d == Direction::up ? infra_.length : 0.0;
    if (service.enters_at_edge) {
        r.enters_at = edge_boundary(d, true);
        r.entry_via = main_between(x_lo, x_first, d);
    }
    for (std::size_t i = 0; i + 1 < service.calls.size(); ++i)
        r.calls[i].via = main_between(infra_.find_station(service.calls[i].station)->at,
                                      infra_.find_station(service.calls[i + 1].station)->at, d);
    if (service.leaves_at_edge) {
        r.leaves_at = edge_boundary(d, false);
        r.calls.back().via = main_between(x_last, x_hi, d);
    }
    return r;
}

std::vector<std::size_t> LinePaths::sections_out_of_use(const DisruptionRule& rule) const {
    if (!rule.segment.empty())
        throw ScenarioError({"delays.disruptions: segment: a line places a disruption by `track` and chainage, not "
                             "by a network's segment (\"" + rule.segment + "\")"});
    // The track's segments (one per piece between the turnouts of loops beside it) each take the
    // part of the chainage range that lies on them, as offsets from the piece's start.
    std::vector<std::size_t> out;
    for (std::size_t k = 0; k < line_.pieces.size(); ++k) {
        const net::LinePiece& piece = line_.pieces[k];
        if (piece.track != rule.track) continue;
        const double a = std::max(rule.from, piece.x_from), b = std::min(rule.to, piece.x_to);
        if (b <= a) continue;
        for (std::size_t i : sections_.crossed(k, a - piece.x_from, b - piece.x_from)) out.push_back(i);
    }
    std::sort(out.begin(), out.end());
    out.erase(std::unique(out.begin(), out.end()), out.end());
    return out;
}

double LinePaths::longest_overlap() const {
    double o = 0.0;
    for (const Signal& s : infra_.signals) o = std::max(o, s.overlap);
    return o;
}

TrainPath LinePaths::lay(const Service& service, double rear, double ahead) const {
    const net::PathRequest r = request(service, rear);
    try {
        const net::NetworkPath found = net::find_path(graph_, r);
        return net::train_path(graph_, sections_, names_, r, found, {rear, ahead});
    } catch (const net::NetworkError& e) {
        throw PathError(e.what());
    }
}

}  // namespace knockon
