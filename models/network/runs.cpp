#include "models/network/runs.hpp"

#include <algorithm>

#include "models/network/paths.hpp"
#include "models/repeat_runs.hpp"
#include "models/service_run.hpp"

namespace knockon::net {
namespace {

// The written service shifted to the run starting `shift` later.
NetworkService shifted(const NetworkService& svc, double shift) {
    NetworkService out = svc;
    for (NetworkCall& c : out.calls) {
        if (c.call.arrival) *c.call.arrival += shift;
        if (c.call.departure) *c.call.departure += shift;
    }
    out.repeat.reset();
    return out;
}

const TrainType* type_of(const std::vector<TrainType>& types, const std::string& id) {
    for (const TrainType& t : types)
        if (t.id == id) return &t;
    return nullptr;
}

}  // namespace

NetworkRuns network_runs(const NetworkGraph& graph, const NetworkTimetable& timetable,
                         const std::vector<TrainType>& types) {
    const Network& network = graph.network();
    NetworkRuns out;
    for (std::size_t entry = 0; entry < timetable.services.size(); ++entry) {
        const NetworkService& written = timetable.services[entry];
        std::vector<std::pair<NetworkService, std::optional<std::uint32_t>>> runs;   // run, occurrence
        if (!written.repeat) {
            runs.emplace_back(written, std::nullopt);
        } else {
            const double first = written.calls.front().call.departure.value_or(0.0);
            const double n = repeat_count(first, written.repeat->every, written.repeat->until);
            for (std::uint32_t k = 0; k < n; ++k) {
                const double shift = k * written.repeat->every;
                runs.emplace_back(shifted(written, shift), k);
                runs.back().first.id = run_id(written.id, first + shift);
            }
        }
        for (auto& [run, occurrence] : runs) {
            // Split at the reversals: part p runs from call `from` up to and including call `to`.
            std::size_t from = 0, part = 1;
            const std::string draw_name = written.draw_key.empty() ? written.id : written.draw_key;
            for (std::size_t k = 0; k < run.calls.size(); ++k) {
                const bool last = k + 1 == run.calls.size();
                if (!last && !run.calls[k].reverses) continue;
                NetworkService piece = run;
                piece.id = part == 1 ? run.id : run.id + "." + std::to_string(part);
                piece.calls.assign(run.calls.begin() + static_cast<long>(from), run.calls.begin() + static_cast<long>(k) + 1);
                if (part > 1) {
                    piece.enters_at.clear();
                    piece.entry_speed.reset();
                    piece.calls.front().call.arrival.reset();   // it starts there: the set stands
                    piece.calls.front().reverses = false;
                }
                if (!last) {
                    piece.leaves_at.clear();
                    piece.calls.back().call.departure.reset();   // it ends there and turns
                    piece.calls.back().reverses = false;
                    piece.calls.back().min_turnaround.reset();
                }
                Service svc;
                svc.id = piece.id;
                svc.draw = {part == 1 ? draw_name : draw_name + "." + std::to_string(part), occurrence};
                svc.train_type = run.train_type;
                svc.category = run.category;
                svc.enters_at_edge = !piece.enters_at.empty();
                svc.entry_speed = piece.entry_speed;
                svc.leaves_at_edge = !piece.leaves_at.empty();
                svc.continues = part > 1;
                svc.entry = entry;
                svc.first_call = from;
                for (const NetworkCall& c : piece.calls) svc.calls.push_back(c.call);
                // The heading it starts in.
                const TrainType* type = type_of(types, run.train_type);
                const double length = type ? type->length : 0.0;
                const NetworkPath path = find_path(graph, path_request(network, piece, length));
                const Heading h = path.steps.empty() ? path.calls.front().heading : path.steps.front().run.heading;
                svc.direction = h == Heading::forward ? Direction::up : Direction::down;
                if (part > 1) {
                    const NetworkCall& at = run.calls[from];
                    ServiceLink link;
                    link.kind = LinkKind::turnaround;
                    link.from = out.services.back().id;
                    link.to = svc.id;
                    link.min_time = at.min_turnaround ? *at.min_turnaround
                                    : type                ? min_dwell_of(at.call, *type)
                                                          : 0.0;
                    out.links.push_back(link);
                }
                out.services.push_back(std::move(svc));
                out.runs.push_back(std::move(piece));
                from = k;
                ++part;
            }
        }
    }
    return out;
}

}  // namespace knockon::net
