#include "sim/delay_draws.hpp"

#include <algorithm>
#include <map>
#include <string>
#include <utility>

#include "models/service_paths.hpp"
#include "sim/random_stream.hpp"

namespace knockon {

namespace {

const DelayRule* match(const std::vector<DelayRule>& rules, const std::string& category,
                       const std::string& station) {
    for (const DelayRule& r : rules) {
        if (!r.category.empty() && r.category != category) continue;
        if (!r.station.empty() && r.station != station) continue;
        return &r;
    }
    return nullptr;
}

// The delay drawn for one place by `rule`, or 0 when no rule applies.
double draw_at(const RandomStream& rng, StreamKind kind, const DelayRule* rule, std::uint32_t train_key,
               std::uint32_t run, std::uint32_t place_key) {
    if (rule == nullptr) return 0.0;
    const UniformPair u = rng.uniforms(kind, train_key, place_key, run);
    return rule->distribution.sample(u.first, u.second);
}

// Every detection section any train's path crosses: its id (ids are shared between paths) and
// the position shown at its first piece's start, by the network's section index.
std::map<std::size_t, std::pair<double, std::string>> known_sections(const std::vector<TrainPlan>& trains) {
    std::map<std::size_t, std::pair<double, std::string>> out;
    for (const TrainPlan& tp : trains)
        for (const PathSection& s : tp.run.path.sections) out.emplace(s.index, std::make_pair(s.x_lo, s.id));
    return out;
}

}  // namespace

InjectedDelays draw_delays(const Scenario& scenario, const std::vector<TrainPlan>& trains, std::uint64_t seed,
                           std::uint32_t replication) {
    return DelayDrawer(scenario, trains).draw(seed, replication);
}

DelayDrawer::DelayDrawer(const Scenario& scenario, const std::vector<TrainPlan>& trains)
    : model_(scenario.delays), trains_(trains) {
    const PrimaryDelayModel& model = model_;
    for (const TrainPlan& tp : trains) {
        const Service& svc = *tp.run.service;
        Train& t = resolved_.emplace_back();
        if (svc.calls.empty()) continue;
        t.key = stable_key(svc.draw_name());
        // A service of its own keeps run 0, the word its draws have always had.
        if (svc.draw.occurrence) t.run = *svc.draw.occurrence + 1;
        // A service that starts where its set reversed does not enter: no entry delay.
        if (!svc.continues) t.entry = match(model.entry, svc.category, svc.calls.front().station);
        const std::size_t n = svc.calls.size();
        for (std::size_t c = 0; c < n; ++c) {
            const Call& call = svc.calls[c];
            const bool last = c + 1 == n;
            Place& p = t.calls.emplace_back();
            p.key = stable_key(call.station);
            // No dwell at the terminus: the train leaves the model there.
            if (call.stops && !(last && !svc.leaves_at_edge)) p.dwell = match(model.dwell, svc.category, call.station);
            if (!last || svc.leaves_at_edge) p.running = match(model.running, svc.category, call.station);
        }
    }
    // The sections each disruption rule blocks, as the scenario's layout finds them, kept where a
    // train's path crosses them (the engine knows no others), in the order of the position shown
    // at their start, then id, for a stable order.
    if (model.disruptions.empty()) return;
    const auto paths = service_paths(scenario);
    const auto known = known_sections(trains);
    for (const DisruptionRule& rule : model.disruptions) {
        std::vector<std::pair<double, std::string>> hit;
        for (std::size_t i : paths->sections_out_of_use(rule))
            if (auto it = known.find(i); it != known.end()) hit.push_back(it->second);
        std::sort(hit.begin(), hit.end());
        std::vector<std::string>& ids = disrupted_.emplace_back();
        for (auto& [x, id] : hit) ids.push_back(std::move(id));
    }
}

InjectedDelays DelayDrawer::draw(std::uint64_t seed, std::uint32_t replication) const {
    const PrimaryDelayModel& model = model_;
    const std::vector<TrainPlan>& trains = trains_;
    const RandomStream rng(seed, replication);
    InjectedDelays d;
    d.entry.assign(trains.size(), 0.0);
    d.dwell.resize(trains.size());
    d.running.resize(trains.size());
    for (std::size_t t = 0; t < trains.size(); ++t) {
        const Train& tr = resolved_[t];
        const std::size_t n = tr.calls.size();
        d.dwell[t].assign(n, 0.0);
        d.running[t].assign(n, 0.0);
        if (n == 0) continue;
        d.entry[t] = draw_at(rng, StreamKind::entry, tr.entry, tr.key, tr.run, 0);
        for (std::size_t c = 0; c < n; ++c) {
            const Place& p = tr.calls[c];
            d.dwell[t][c] = draw_at(rng, StreamKind::dwell, p.dwell, tr.key, tr.run, p.key);
            d.running[t][c] = draw_at(rng, StreamKind::running, p.running, tr.key, tr.run, p.key);
        }
    }

    for (std::size_t k = 0; k < model.disruptions.size(); ++k) {
        const DisruptionRule& rule = model.disruptions[k];
        const auto place_key = static_cast<std::uint32_t>(k);
        const UniformPair when = rng.uniforms(StreamKind::disruption, 0, place_key, 0);
        if (!(when.first < rule.daily_probability)) continue;
        const double start = rule.window_from + when.second * (rule.window_to - rule.window_from);
        const double length = rule.duration.quantile(rng.uniform(StreamKind::disruption, 0, place_key, 1));
        for (const std::string& id : disrupted_[k]) d.blocked.push_back({id, start, start + length});
    }
    return d;
}

}  // namespace knockon
