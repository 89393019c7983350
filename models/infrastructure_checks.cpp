#include "models/infrastructure_checks.hpp"

#include <algorithm>
#include <cmath>
#include <map>
#include <tuple>
#include <utility>

#include "models/units.hpp"

namespace knockon {

namespace {

constexpr double kEps = kChainageTolerance;

std::optional<std::size_t> find_id(const std::vector<std::string>& ids, const std::vector<std::size_t>& at,
                                   const std::string& id) {
    auto it = std::find(ids.begin(), ids.end(), id);
    if (it == ids.end()) return std::nullopt;
    return at[static_cast<std::size_t>(it - ids.begin())];
}

class InfrastructureChecker {
public:
    InfrastructureChecker(const Infrastructure& in, const UnreadFields& unread, bool length_read)
        : in_(in), unread_(unread) {
        if (length_read) length_ = in.length;
    }

    InfrastructureCheck run() {
        check_tracks();
        check_loops();
        check_main_tracks();
        check_stations();
        check_signals();
        check_joints();
        return std::move(out_);
    }

private:
    void add(LineObject kind, std::size_t index, std::string field, std::string message) {
        LineProblem p;
        p.kind = kind;
        p.index = index;
        p.field = std::move(field);
        p.message = std::move(message);
        out_.problems.push_back(std::move(p));
    }

    // "<kind> id "X" is used twice", pointing at the first object of the id.
    void add_twice(LineObject kind, std::size_t index, const std::string& id, std::size_t first) {
        add(kind, index, "id", std::string(to_string(kind)) + " id \"" + id + "\" is used twice");
        LineProblem& p = out_.problems.back();
        p.other = first;
        p.other_field = "id";
        p.other_at = p.message.size();
    }

    bool read(LineObject kind, std::size_t index, const char* field) const { return !unread_.has(kind, index, field); }

    void check_tracks() {
        const auto& tracks = in_.tracks;
        out_.track_usable.assign(tracks.size(), false);
        for (std::size_t k = 0; k < tracks.size(); ++k) {
            const Track& t = tracks[k];
            bool ok = !unread_.any(LineObject::track, k);
            const bool from_read = read(LineObject::track, k, "from");
            const bool to_read = read(LineObject::track, k, "to");
            for (const auto& [key, x, given] : {std::tuple<const char*, double, bool>{"from", t.from, from_read},
                                                 std::tuple<const char*, double, bool>{"to", t.to, to_read}}) {
                if (!given) continue;
                if (auto p = off_line(x, length_)) {
                    add(LineObject::track, k, key, *p);
                    ok = false;
                }
            }
            if (from_read && to_read && t.from >= t.to) {
                add(LineObject::track, k, "to",
                    "a track must end beyond its start: to " + format_km(t.to) + " is not beyond from " +
                        format_km(t.from));
                ok = false;
            }
            if (!read(LineObject::track, k, "id")) {
                // nameless: nothing refers to it
            } else if (auto first = find_id(out_.track_ids, out_.track_at, t.id)) {
                add_twice(LineObject::track, k, t.id, *first);
                ok = false;
            } else {
                out_.track_ids.push_back(t.id);
                out_.track_at.push_back(k);
                main_.push_back(k);
            }
            out_.track_usable[k] = ok;
        }
    }

    void check_loops() {
        const auto& tracks = in_.tracks;
        for (std::size_t k : main_) {   // every track but the second of an id
            const Track& tr = tracks[k];
            if (!tr.is_loop()) continue;
            if (tr.parent == tr.id) {
                add(LineObject::track, k, "parent", "a track cannot be its own parent");
                continue;
            }
            const auto pi = out_.track_index(tr.parent);
            if (!pi) {
                add(LineObject::track, k, "parent", unknown_name("track", tr.parent, out_.track_ids));
                continue;
            }
            const Track& p = tracks[*pi];
            if (p.is_loop()) {
                add(LineObject::track, k, "parent",
                    "track \"" + p.id + "\" is itself a loop; a loop must leave a main track");
                continue;
            }
            if (!out_.track_usable[k] || !out_.track_usable[*pi]) continue;
            if (tr.from < p.from - kEps || tr.to > p.to + kEps)
                add(LineObject::track, k, "",
                    "loop " + tr.id + " (" + format_km(tr.from) + " to " + format_km(tr.to) +
                        ") does not lie within its parent " + p.id + " (" + format_km(p.from) + " to " +
                        format_km(p.to) + ")");
            for (Direction d : {Direction::up, Direction::down}) {
                if (tr.allows(d) && !p.allows(d)) {
                    add(LineObject::track, k, "directions",
                        "loop " + tr.id + " carries " + to_string(d) + " trains but its parent " + p.id +
                            " does not");
                    break;
                }
            }
        }
    }

    // Two main tracks carrying one direction over the same stretch would make the main line
    // ambiguous; a second track there is a loop with a parent.
    void check_main_tracks() {
        const auto& tracks = in_.tracks;
        for (std::size_t b = 0; b < tracks.size(); ++b) {
            if (tracks[b].is_loop() || !out_.track_usable[b]) continue;
            for (std::size_t a = 0; a < b; ++a) {
                if (tracks[a].is_loop() || !out_.track_usable[a]) continue;
                const double lo = std::max(tracks[a].from, tracks[b].from);
                const double hi = std::min(tracks[a].to, tracks[b].to);
                if (hi - lo <= kEps) continue;
                for (Direction d : {Direction::up, Direction::down}) {
                    if (tracks[a].allows(d) && tracks[b].allows(d)) {
                        add(LineObject::track, b, "",
                            "main tracks " + tracks[a].id + " and " + tracks[b].id + " both carry " + to_string(d) +
                                " trains from " + format_km(lo) + " to " + format_km(hi) +
                                "; main tracks of one direction may only meet end to end "
                                "(a second track alongside is a loop with a parent)");
                        break;
                    }
                }
            }
        }
    }

    void check_stations() {
        const auto& stations = in_.stations;
        out_.station_usable.assign(stations.size(), false);
        for (std::size_t i = 0; i < stations.size(); ++i) {
            const Station& st = stations[i];
            bool ok = !unread_.any(LineObject::station, i);
            if (read(LineObject::station, i, "at")) {
                if (auto p = off_line(st.at, length_)) {
                    add(LineObject::station, i, "at", *p);
                    ok = false;
                }
            }
            if (!read(LineObject::station, i, "id")) {
                // nameless: nothing refers to it
            } else if (auto first = find_id(out_.station_ids, out_.station_at, st.id)) {
                add_twice(LineObject::station, i, st.id, *first);
                ok = false;
            } else {
                out_.station_ids.push_back(st.id);
                out_.station_at.push_back(i);
            }
            out_.station_usable[i] = ok;
        }
    }

    // The usable track of that id, reporting an unknown one at `field` of the object.
    const Track* track_ref(LineObject kind, std::size_t index, const std::string& id) {
        const auto k = out_.track_index(id);
        if (!k) {
            add(kind, index, "track", unknown_name("track", id, out_.track_ids));
            return nullptr;
        }
        return out_.track_usable[*k] ? &in_.tracks[*k] : nullptr;
    }

    void check_signals() {
        const auto& signals = in_.signals;
        std::map<std::string, std::size_t> seen;   // id -> first signal
        // Signals so far per (track, direction): chainage and index.
        std::map<std::pair<std::string, Direction>, std::vector<std::pair<double, std::size_t>>> placed;
        for (std::size_t i = 0; i < signals.size(); ++i) {
            const Signal& sig = signals[i];
            if (read(LineObject::signal, i, "id")) {
                auto [pos, fresh] = seen.emplace(sig.id, i);
                if (!fresh) add_twice(LineObject::signal, i, sig.id, pos->second);
            }
            if (!read(LineObject::signal, i, "track")) continue;
            const Track* tr = track_ref(LineObject::signal, i, sig.track);
            if (!tr) continue;
            const bool at_read = read(LineObject::signal, i, "at");
            const bool dir_read = read(LineObject::signal, i, "direction");
            if (at_read)
                if (auto p = off_track("signal at", sig.at, *tr)) add(LineObject::signal, i, "at", *p);
            if (dir_read && !tr->allows(sig.direction))
                add(LineObject::signal, i, "direction",
                    "track " + tr->id + " does not carry " + to_string(sig.direction) + " trains");
            // Two main signals of one direction at one place on a track would bound a block of
            // no length: the second could never be passed at danger or cleared apart.
            if (!at_read || !dir_read) continue;
            auto& here = placed[{sig.track, sig.direction}];
            for (const auto& [x, other] : here) {
                if (std::abs(x - sig.at) < kSignalSpacingMin) {
                    add(LineObject::signal, i, "at",
                        "signal " + sig.id + " stands at " + format_km(sig.at) + " on track " + sig.track +
                            " facing " + to_string(sig.direction) + ", where signal " + signals[other].id);
                    LineProblem& p = out_.problems.back();
                    p.other = other;
                    p.other_at = p.message.size();
                    p.message += " already stands; main signals of one direction on a track must be at least 1 m apart";
                    break;
                }
            }
            here.emplace_back(sig.at, i);
        }
    }

    void check_joints() {
        for (std::size_t j = 0; j < in_.extra_joints.size(); ++j) {
            const auto& [track, at] = in_.extra_joints[j];
            if (const Track* tr = track_ref(LineObject::joint, j, track))
                if (auto p = off_track("joint at", at, *tr)) add(LineObject::joint, j, "at", *p);
        }
    }

    const Infrastructure& in_;
    const UnreadFields& unread_;
    std::optional<double> length_;
    InfrastructureCheck out_;
    std::vector<std::size_t> main_;   // tracks that are the first of their id
};

}  // namespace

std::optional<std::size_t> InfrastructureCheck::track_index(const std::string& id) const {
    return find_id(track_ids, track_at, id);
}

std::optional<std::size_t> InfrastructureCheck::station_index(const std::string& id) const {
    return find_id(station_ids, station_at, id);
}

AreasCheck check_signalling_areas(const std::vector<SignallingArea>& areas, std::optional<double> length,
                                  const UnreadFields& unread, bool complete) {
    AreasCheck out;
    auto add = [&](LineObject kind, std::size_t index, const char* field, std::string message) {
        LineProblem p;
        p.kind = kind;
        p.index = index;
        p.field = field;
        p.message = std::move(message);
        out.problems.push_back(std::move(p));
    };
    if (areas.empty()) {
        add(LineObject::area_list, 0, "", "at least one area is needed, covering the line from 0 km to its end");
        return out;
    }
    for (std::size_t i = 0; i < areas.size(); ++i) {
        const SignallingArea& a = areas[i];
        if (unread.any(LineObject::area, i)) complete = false;
        const bool from_read = !unread.has(LineObject::area, i, "from");
        const bool to_read = !unread.has(LineObject::area, i, "to");
        if (from_read)
            if (auto p = off_line(a.from, length)) add(LineObject::area, i, "from", *p);
        if (to_read)
            if (auto p = off_line(a.to, length)) add(LineObject::area, i, "to", *p);
        if (from_read && to_read && a.from >= a.to)
            add(LineObject::area, i, "to",
                "an area must end beyond its start: to " + format_km(a.to) + " is not beyond from " +
                    format_km(a.from));
    }
    // Coverage is only judged on a complete list, else one bad entry shows up as a gap too.
    if (!complete || !out.problems.empty()) return out;
    double covered = 0.0;
    for (std::size_t i = 0; i < areas.size(); ++i) {
        const SignallingArea& a = areas[i];
        if (a.from > covered + kEps)
            add(LineObject::area, i, "from",
                "the areas leave " + format_km(covered) + " to " + format_km(a.from) +
                    " uncovered; list them in chainage order without gaps");
        else if (a.from < covered - kEps)
            add(LineObject::area, i, "from",
                "this area overlaps the one before it, which ends at " + format_km(covered) +
                    "; list them in chainage order without overlaps");
        covered = std::max(covered, a.to);
    }
    if (length && covered < *length - kEps)
        add(LineObject::area_list, 0, "",
            "the areas leave " + format_km(covered) + " to " + format_km(*length) + " (the line end) uncovered");
    out.covers = out.problems.empty();
    return out;
}

InfrastructureCheck check_infrastructure(const Infrastructure& infrastructure, const UnreadFields& unread,
                                         bool length_read) {
    return InfrastructureChecker(infrastructure, unread, length_read).run();
}

std::string known_list(const std::vector<std::string>& ids) {
    if (ids.empty()) return "none are defined";
    std::string out = "known: ";
    for (std::size_t i = 0; i < ids.size() && i < 12; ++i) {
        if (i > 0) out += ", ";
        out += ids[i];
    }
    if (ids.size() > 12) out += ", ...";
    return out;
}

std::string unknown_name(const char* kind, const std::string& id, const std::vector<std::string>& known) {
    return std::string("unknown ") + kind + " \"" + id + "\"; " + known_list(known);
}

std::optional<std::string> off_track(const std::string& what, double x, const Track& track) {
    if (x >= track.from - kEps && x <= track.to + kEps) return std::nullopt;
    return what + " " + format_km(x) + " lies off track " + track.id + ", which runs from " + format_km(track.from) +
           " to " + format_km(track.to);
}

std::optional<std::string> off_line(double x, std::optional<double> length) {
    if (x < -kEps) return format_km(x) + " lies before the line start (0 km)";
    if (length && x > *length + kEps) return format_km(x) + " lies beyond the line end (" + format_km(*length) + ")";
    return std::nullopt;
}

}  // namespace knockon
