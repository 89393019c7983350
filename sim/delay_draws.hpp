#pragma once
// Primary delays of one simulated day drawn from the scenario's delay model.
//
// Each draw takes its uniforms from RandomStream(seed, replication) at the counter
// (kind, stable_key(service id), stable_key(station id), 0) -- place key 0 for entry -- so the
// draws of a train depend on its id and the ids of its stations only: add, remove or reorder
// other trains, or change the signalling, and its draws stay the same.  Disruption rule k uses
// (disruption, 0, k, 0) for occurrence and start, and draw 1 for the duration.
#include <cstdint>
#include <vector>

#include "models/infrastructure.hpp"
#include "models/plan.hpp"
#include "models/primary_delay_model.hpp"
#include "sim/injected_delays.hpp"

namespace knockon {

// entry[t]; dwell[t][call] at stops other than the terminus; running[t][call] for the stretch
// from that call to the next (and from the last call to the line end when the train runs on);
// `call` indexes Service::calls.  Disruptions block every detection section of their track that
// overlaps [from, to), as the trains' paths know them, for the drawn time.
InjectedDelays draw_delays(const PrimaryDelayModel& model, const Infrastructure& infra,
                           const std::vector<TrainPlan>& trains, std::uint64_t seed,
                           std::uint32_t replication);

}  // namespace knockon
