#pragma once
// Primary delays of one simulated day drawn from the scenario's delay model.
//
// Each draw takes its uniforms from RandomStream(seed, replication) at the counter
// (kind, stable_key(draw name), stable_key(station id), run) -- place key 0 for entry -- where the
// draw name is the service's draw_key, else its id (for a repeat pattern the pattern's id), and
// run is 0 for a service of its own and 1 + the occurrence for a repeat's runs (0, 1, 2, ... in
// time order).  So a train's draws depend on who it is and where, never on times or positions in
// a list: retime it, add, remove or reorder other trains, or change the signalling, and its draws
// stay the same.  Disruption rule k uses (disruption, 0, k, 0) for occurrence and start, and
// index 1 for the duration; neither depends on any train.
#include <cstdint>
#include <string>
#include <vector>

#include "models/infrastructure.hpp"
#include "models/plan.hpp"
#include "models/primary_delay_model.hpp"
#include "models/scenario.hpp"
#include "sim/injected_delays.hpp"

namespace knockon {

// entry[t]; dwell[t][call] at stops other than the terminus; running[t][call] for the stretch
// from that call to the next (and from the last call to the line end when the train runs on);
// `call` indexes Service::calls.  Disruptions block, for the drawn time, every detection section
// their place reaches (a line's track and chainage, a network's segment and offsets:
// ServicePaths::sections_out_of_use) that some train's path crosses, by the id the paths give it.
// The delay rules are the scenario's `delays`; `trains` its plan.
InjectedDelays draw_delays(const Scenario& scenario, const std::vector<TrainPlan>& trains, std::uint64_t seed,
                           std::uint32_t replication);

// The same draws for many replications: which rule applies where, and the keys, are worked out
// once (a study draws thousands of days).  Holds references to the scenario's delay model and the
// plans.  Throws ScenarioError where a disruption's place is not in the scenario's layout.
class DelayDrawer {
public:
    DelayDrawer(const Scenario& scenario, const std::vector<TrainPlan>& trains);
    InjectedDelays draw(std::uint64_t seed, std::uint32_t replication) const;

private:
    struct Place {
        std::uint32_t key = 0;                 // stable_key of the station
        const DelayRule* dwell = nullptr;      // the rule that applies, if any
        const DelayRule* running = nullptr;
    };
    struct Train {
        std::uint32_t key = 0;                 // stable_key of the service's draw name
        std::uint32_t run = 0;                 // 0, or 1 + the occurrence of a repeat's run
        const DelayRule* entry = nullptr;
        std::vector<Place> calls;
    };
    const PrimaryDelayModel& model_;
    const std::vector<TrainPlan>& trains_;
    std::vector<Train> resolved_;
    std::vector<std::vector<std::string>> disrupted_;   // per disruption rule: section ids

};

}  // namespace knockon
