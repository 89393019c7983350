#include "tools/read/link_fields.hpp"

#include <map>
#include <string_view>
#include <tuple>
#include <utility>

#include "models/links.hpp"
#include "models/units.hpp"
#include "models/input_ranges.hpp"

namespace knockon::yamlio {

void read_links(ErrorList& errors, const MapFields& t, const std::vector<Service>& all,
                const StationCheck& station_problem, const ServicePaths* paths, std::vector<ServiceLink>& out,
                std::vector<std::string>& where) {
    auto seq = t.sequence("links", false);
    if (!seq) return;
    std::map<std::string, const Service*> services;
    for (const Service& svc : all) services[svc.id] = &svc;
    std::map<std::pair<int, std::string>, std::string> used;   // (kind, side + service) -> first link's path
    for (const ServiceLink& l : out)   // links already made (a network's reversals)
        if (l.kind != LinkKind::connection) {
            used.emplace(std::make_pair(static_cast<int>(l.kind), "from " + l.from), "the reversal of its service");
            used.emplace(std::make_pair(static_cast<int>(l.kind), "to " + l.to), "the reversal of its service");
        }
    for (std::size_t i = 0; i < seq->size(); ++i) {
        const std::string path = item(t.path_of("links"), i);
        MapFields f(errors, std::as_const(*seq)[i], path,
                    {"from", "forms", "feeds", "crew_to", "at", "turnaround", "transfer", "crew_change",
                     "max_wait"});
        if (!f.ok()) continue;
        ServiceLink link;
        std::string later_key;
        int kinds = 0;
        for (const auto& [key, kind] : {std::pair<const char*, LinkKind>{"forms", LinkKind::turnaround},
                                        {"feeds", LinkKind::connection},
                                        {"crew_to", LinkKind::crew}})
            if (f.has(key)) {
                ++kinds;
                link.kind = kind;
                later_key = key;
            }
        if (kinds != 1) {
            f.error("", kinds == 0 ? "a link needs one of forms (turnaround), feeds (connection) or crew_to (crew link)"
                                   : "a link is one of forms, feeds or crew_to, not several; write one link each");
            continue;
        }
        const char* time_key = link.kind == LinkKind::turnaround   ? "turnaround"
                               : link.kind == LinkKind::connection ? "transfer"
                                                                   : "crew_change";
        bool ok = true;
        // Keys of the other kinds are mistakes, not options.
        for (const char* k : {"turnaround", "transfer", "crew_change", "max_wait", "at"}) {
            const bool belongs = std::string_view(k) == time_key ||
                                 (link.kind == LinkKind::connection && (std::string_view(k) == "max_wait" ||
                                                                        std::string_view(k) == "at"));
            if (!belongs && f.has(k)) {
                f.error(k, std::string("a ") + (link.kind == LinkKind::crew ? "crew link" : to_string(link.kind)) +
                               " (" + later_key + ") has no " + k + "; it takes " + time_key +
                               (link.kind == LinkKind::connection ? ", at and max_wait" : ""));
                ok = false;
            }
        }
        auto from = f.text("from", true);
        auto to = f.text(later_key, true);
        auto min_time = ranged(f, time_key, Input::link_time, true);
        if (!from || !to || !min_time) ok = false;
        if (link.kind == LinkKind::connection) {
            auto at = f.text("at", true);
            auto wait = ranged(f, "max_wait", Input::link_wait, true);
            if (!at || !wait) {
                ok = false;
            } else {
                link.station = *at;
                link.max_wait = *wait;
                if (auto problem = station_problem(*at)) {
                    f.error("at", *problem);
                    ok = false;
                }
            }
        }
        const Service* a = nullptr;
        const Service* b = nullptr;
        for (const auto& [key, id, svc] : {std::tuple<const char*, const std::optional<std::string>*, const Service**>{
                                               "from", &from, &a},
                                           {later_key.c_str(), &to, &b}})
            if (*id) {
                auto it = services.find(**id);
                if (it == services.end()) {
                    f.error(key, "unknown service \"" + **id +
                                     "\" (runs of a repeat pattern are named by their first time, e.g. S1-0630)");
                    ok = false;
                } else {
                    *svc = it->second;
                }
            }
        if (!ok || !a || !b) continue;
        link.from = *from;
        link.to = *to;
        link.min_time = *min_time;
        if (paths) {
            if (auto problem = link_problem(*paths, link, *a, *b)) {
                f.error(link.kind == LinkKind::connection ? "at" : later_key, *problem);
                continue;
            }
        }
        // A set forms one later service and is formed by one; a crew works one after another.
        if (link.kind != LinkKind::connection) {
            const int k = static_cast<int>(link.kind);
            for (const auto& [side, key, id] : {std::tuple<const char*, const char*, std::string>{"from ", "from", link.from},
                                               {"to ", later_key.c_str(), link.to}}) {
                auto [pos, fresh] = used.emplace(std::make_pair(k, side + id), path);
                if (!fresh) {
                    f.error(key, std::string("service ") + id + " is already " +
                                     (std::string_view(side) == "from " ? "the earlier" : "the later") + " service of a " +
                                     (link.kind == LinkKind::crew ? "crew link" : "turnaround") + " (" + pos->second +
                                     "); a set or crew goes on to one service at a time");
                    ok = false;
                }
            }
            if (!ok) continue;
        }
        out.push_back(link);
        where.push_back(location(errors.file(), f.node().Mark(), f.path()));
    }
}


}  // namespace knockon::yamlio
