#include "models/network/timetable.hpp"

#include <algorithm>
#include <map>
#include <set>

#include "models/call_times.hpp"
#include "models/repeat_runs.hpp"
#include "models/units.hpp"

namespace knockon::net {
namespace {

struct Problems {
    std::vector<TimetableProblem>& out;
    TimetablePart part;
    std::size_t index;
    std::size_t count = 0;

    void add(std::size_t call, std::string field, std::string message, std::size_t item = kNone) {
        out.push_back({part, index, call, std::move(field), item, std::move(message)});
        ++count;
    }
};

// The station's tracks: the segments its timing points stand on.
std::vector<std::size_t> tracks_of(const Network& net, std::size_t station) {
    std::vector<std::size_t> out;
    for (const TimingPoint& tp : net.timing_points)
        if (tp.station == station && std::find(out.begin(), out.end(), tp.at.segment) == out.end())
            out.push_back(tp.at.segment);
    return out;
}

std::string names(const Network& net, const std::vector<std::size_t>& segments) {
    std::string s;
    for (std::size_t seg : segments) s += (s.empty() ? "" : ", ") + net.segments[seg].name;
    return s;
}

// A boundary named at `field` ("enter" or "leave").
void check_boundary(const Network& net, const std::string& name, const char* field, Problems& p) {
    if (name.empty()) return;
    const std::size_t n = net.find_node(name);
    if (n == kNone)
        p.add(kNone, field, "no node has the id \"" + name + "\"");
    else if (net.nodes[n].kind != NodeKind::boundary)
    {
        std::string kind = to_string(net.nodes[n].kind);
        std::replace(kind.begin(), kind.end(), '_', ' ');
        p.add(kNone, field, "node '" + name + "' is a " + kind +
                                ", not a boundary: trains enter and leave the network only at boundaries");
    }
}

// Names, reversals and the first and last calls; true when the path can be looked for.
bool check_names(const Network& net, const std::vector<TrainType>& types, const NetworkService& svc, Problems& p) {
    const std::size_t before = p.count;
    if (std::none_of(types.begin(), types.end(), [&](const TrainType& t) { return t.id == svc.train_type; }))
        p.add(kNone, "type", "no train type has the id \"" + svc.train_type + "\"");
    check_boundary(net, svc.enters_at, "enter", p);
    check_boundary(net, svc.leaves_at, "leave", p);
    if (svc.calls.empty()) {
        p.add(kNone, "calls", "at least one call is needed");
        return false;
    }
    for (std::size_t k = 0; k < svc.calls.size(); ++k) {
        const NetworkCall& c = svc.calls[k];
        const std::size_t station = net.find_station(c.call.station);
        if (station == kNone) p.add(k, "station", "no station has the id \"" + c.call.station + "\"");
        if (!c.call.track.empty()) {
            const std::size_t seg = net.find_segment(c.call.track);
            if (seg == kNone) {
                p.add(k, "track", "no segment has the id \"" + c.call.track + "\"");
            } else if (station != kNone) {
                const std::vector<std::size_t> tracks = tracks_of(net, station);
                if (std::find(tracks.begin(), tracks.end(), seg) == tracks.end())
                    p.add(k, "track", "segment '" + c.call.track + "' is not a track of station " + c.call.station +
                                          " (its tracks: " + names(net, tracks) + ")");
            }
        }
        for (std::size_t i = 0; i < c.via.size(); ++i)
            if (net.find_segment(c.via[i]) == kNone) p.add(k, "via", "no segment has the id \"" + c.via[i] + "\"", i);
        if (c.min_turnaround && !c.reverses)
            p.add(k, "min_turnaround", "only a stop where the train reverses has a minimum turnaround time");
        if (!c.reverses) continue;
        if (!c.call.stops) {
            p.add(k, "reverses", "a train reverses only where it stops, not where it passes");
        } else if ((k == 0 && svc.enters_at.empty()) || (k + 1 == svc.calls.size() && svc.leaves_at.empty())) {
            p.add(k, "reverses", std::string("a train reverses on its way, not where it ") +
                                     (k == 0 && svc.enters_at.empty() ? "starts" : "ends") +
                                     " (a set that goes on as another service is a link)");
        } else if (station != kNone) {
            // A reversal needs a track of the station that trains may run on both ways.
            std::vector<std::size_t> tracks = tracks_of(net, station);
            const std::size_t named = c.call.track.empty() ? kNone : net.find_segment(c.call.track);
            if (named != kNone) tracks = {named};
            const bool both = std::any_of(tracks.begin(), tracks.end(), [&](std::size_t seg) {
                return net.segments[seg].forward && net.segments[seg].backward;
            });
            if (!both && !tracks.empty())
                p.add(k, "reverses", "service " + svc.id + " cannot reverse at " + c.call.station + ": " +
                                         (tracks.size() == 1 ? "track " : "tracks ") + names(net, tracks) +
                                         (tracks.size() == 1 ? " carries" : " carry") +
                                         " trains one way only (directions: both is needed)");
        }
        // The return working leaves at a time of the timetable, as any service's first call.
        if (c.call.stops && !c.call.departure)
            p.add(k, "reverses", "a reversal needs its departure time (dep): the return working leaves then");
    }
    for (const CallTimeProblem& t : call_time_problems([&] {
             std::vector<Call> calls;
             for (const NetworkCall& c : svc.calls) calls.push_back(c.call);
             return calls;
         }()))
        p.add(t.call, t.key, t.message);
    const Call& first = svc.calls.front().call;
    if (svc.enters_at.empty() && (!first.stops || !first.departure))
        p.add(0, "", "the first call of a service that starts on the network must be a stop with dep given "
                     "(a service coming from beyond a boundary gives enter)");
    if (!svc.enters_at.empty() && !first.departure)
        p.add(0, "", "a service that enters at a boundary must give a time at its first call (dep or pass)");
    if (svc.leaves_at.empty() && !svc.calls.back().call.stops)
        p.add(svc.calls.size() - 1, "", "the last call of a service that ends on the network must be a stop "
                                        "(give leave: BOUNDARY if it runs on beyond one)");
    if (svc.calls.size() == 1 && svc.enters_at.empty() && svc.leaves_at.empty())
        p.add(kNone, "calls", "a service that neither enters nor leaves the network needs at least two calls");
    if (svc.repeat && first.departure && svc.repeat->until < *first.departure)
        p.add(kNone, "repeat", "until " + format_time_of_day(svc.repeat->until) + " is before the first call's time " +
                                   format_time_of_day(*first.departure));
    else if (svc.repeat && first.departure &&
             repeat_count(*first.departure, svc.repeat->every, svc.repeat->until) > kMaxRunsPerPattern)
        p.add(kNone, "repeat", "the pattern gives more than " + std::to_string(kMaxRunsPerPattern) +
                                   " runs, which is taken for a mistake");
    return p.count == before;
}

// Lays the path; a place it cannot reach is a problem at the call, via or exit concerned.
void check_path(const NetworkGraph& g, const NetworkService& svc, double length, Problems& p) {
    const PathRequest request = path_request(g.network(), svc, length);
    try {
        (void)find_path(g, request);
    } catch (const PathNotFound& e) {
        const std::string message = "service " + svc.id + ": " + e.what();
        if (e.call == kNone)
            p.add(kNone, e.via == kNone ? "leave" : "", message);
        else if (e.via != kNone)
            p.add(e.call, "via", message, e.via);
        else
            p.add(e.call, svc.calls[e.call].call.track.empty() ? "station" : "track", message);
    } catch (const NetworkError& e) {
        p.add(kNone, "", "service " + svc.id + ": " + e.what());
    }
}

void check_corridor(const NetworkGraph& g, const Corridor& c, const std::set<std::string>& earlier, Problems& p) {
    const Network& net = g.network();
    if (earlier.count(c.name)) p.add(kNone, "id", "corridor id \"" + c.name + "\" is used twice");
    if (c.stations.size() < 2) {
        p.add(kNone, "stations", "a corridor runs through at least two stations");
        return;
    }
    PathRequest r;
    bool known = true;
    for (std::size_t k = 0; k < c.stations.size(); ++k) {
        const std::size_t s = net.find_station(c.stations[k]);
        if (s == kNone) {
            p.add(kNone, "stations", "no station has the id \"" + c.stations[k] + "\"", k);
            known = false;
        } else if (k > 0 && c.stations[k] == c.stations[k - 1]) {
            p.add(kNone, "stations", "station " + c.stations[k] + " follows itself", k);
            known = false;
        }
        PathCall call;
        call.station = s;
        call.stops = false;
        r.calls.push_back(call);
    }
    if (!known) return;
    try {
        (void)find_path(g, r);
    } catch (const PathNotFound& e) {
        p.add(kNone, "stations", "corridor " + c.name + ": " + e.what(), e.call);
    } catch (const NetworkError& e) {
        p.add(kNone, "", "corridor " + c.name + ": " + e.what());
    }
}

}  // namespace

std::vector<TimetableProblem> check_timetable(const NetworkGraph& g, const std::vector<TrainType>& types,
                                              const NetworkTimetable& tt) {
    std::vector<TimetableProblem> out;
    std::set<std::string> ids;
    for (std::size_t i = 0; i < tt.services.size(); ++i) {
        const NetworkService& svc = tt.services[i];
        Problems p{out, TimetablePart::service, i};
        if (!ids.insert(svc.id).second) p.add(kNone, "id", "service id \"" + svc.id + "\" is used twice");
        if (!check_names(g.network(), types, svc, p)) continue;
        const auto type = std::find_if(types.begin(), types.end(), [&](const TrainType& t) { return t.id == svc.train_type; });
        check_path(g, svc, type->length, p);
    }
    std::set<std::string> names;
    for (std::size_t i = 0; i < tt.corridors.size(); ++i) {
        Problems p{out, TimetablePart::corridor, i};
        check_corridor(g, tt.corridors[i], names, p);
        names.insert(tt.corridors[i].name);
    }
    return out;
}

PathRequest path_request(const Network& net, const NetworkService& svc, double train_length) {
    PathRequest r;
    r.enters_at = svc.enters_at.empty() ? kNone : net.find_node(svc.enters_at);
    r.leaves_at = svc.leaves_at.empty() ? kNone : net.find_node(svc.leaves_at);
    r.train_length = train_length;
    for (const NetworkCall& c : svc.calls) {
        PathCall call;
        call.station = net.find_station(c.call.station);
        call.track = c.call.track.empty() ? kNone : net.find_segment(c.call.track);
        call.stops = c.call.stops;
        call.reverses = c.reverses;
        for (const std::string& v : c.via) call.via.push_back(net.find_segment(v));
        r.calls.push_back(std::move(call));
    }
    return r;
}

std::vector<Corridor> default_corridors(const NetworkTimetable& tt) {
    std::vector<Corridor> out;
    std::map<std::string, int> used;   // name -> times given
    auto add = [&](std::vector<std::string> stations) {
        if (stations.size() < 2) return;
        const std::vector<std::string> back(stations.rbegin(), stations.rend());
        for (const Corridor& c : out)
            if (c.stations == stations || c.stations == back) return;
        std::string name = stations.front() + "-" + stations.back();
        if (const int n = ++used[name]; n > 1) name += " " + std::to_string(n);
        out.push_back({name, std::move(stations)});
    };
    for (const NetworkService& svc : tt.services) {
        std::vector<std::string> part;
        for (const NetworkCall& c : svc.calls) {
            part.push_back(c.call.station);
            if (c.reverses) {
                add(part);
                part = {c.call.station};
            }
        }
        add(part);
    }
    return out;
}

std::vector<Corridor> corridors_of(const NetworkTimetable& tt) {
    return tt.corridors.empty() ? default_corridors(tt) : tt.corridors;
}

}  // namespace knockon::net
