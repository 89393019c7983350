#pragma once
// One simulated day drawn over the plan: the as-run paths of the trains in the time-distance
// diagram, built from the day's records, and which traced day of a study to draw.
#include <cstdint>
#include <optional>
#include <string>
#include <vector>

#include "models/infrastructure.hpp"
#include "models/plan.hpp"
#include "models/scenario.hpp"
#include "sim/sim_result.hpp"
#include "sim/study.hpp"
#include "tools/report/plan_charts.hpp"
#include "tools/results/results_file.hpp"

namespace knockon {

// The sample median: the middle value of the sorted values, or the mean of the two middle ones
// (NaN when empty).
double median(std::vector<double> values);

struct ReplicationChoice {
    std::uint32_t replication = 0;
    std::string reason;   // for the reader: why this day
};

// Which traced day of a study to draw.  `requested`: that one, if it was traced (otherwise
// std::invalid_argument naming the traced ones).  Otherwise the traced day whose total knock-on
// delay is nearest the median total knock-on over all complete days of `per_day` (the lower
// replication number on a tie), so the picture shows a typical day rather than a lucky or a bad
// one; days that ended in deadlock are left out of both (the first traced day when every traced
// day deadlocked).  nullopt when no day was traced.
std::optional<ReplicationChoice> choose_replication(const std::vector<ReplicationStats>& per_day,
                                                    const std::vector<std::uint32_t>& traced,
                                                    std::optional<std::uint32_t> requested);

// The as-run paths of `day` as (time, chainage) points, for the trains the plan knows by id.
// From the sampled trajectories where the day has them for a train; otherwise through the
// timing points (arrival and departure at the station's stopping mark), the moments the head
// entered and left each detection section (at the section's ends, from the plan's stairway) and
// the stands at signals (at the signal), in time order and never running backwards: linear
// between these moments, so a path is exact at every one of them.
AsRunOverlay as_run_overlay(const SimResult& day, const Infrastructure& infra, const PlanResult& plan,
                            const std::string& label);
// The same for either kind of scenario: on a network the points lie along each train's path
// (AsRunOverlay::along_path), for the corridor diagrams to place.
AsRunOverlay as_run_overlay(const SimResult& day, const Scenario& scenario, const PlanResult& plan,
                            const std::string& label);

// The clock hour in which `day` lost the most time to knock-on delay: each timing record's knock-on
// (gathered on the run to the timing point and waiting to leave it) counts in the hour of its
// as-run departure, or of its arrival where it has no departure (a terminus); the earliest hour on a
// tie.  nullopt when no record has knock-on.
std::optional<LossHour> worst_knock_on_hour(const SimResult& day);

// The `count` largest delay trees of `day` (by all the knock-on their source caused, the lower
// source number on a tie) as arrows over the as-run paths of `overlay`: an arrow per causing
// train and receiving timing record (edges of one tree, cause and record summed), from the
// causing train's path where it passes the place to the delayed train at that timing point as it
// left it (arrived, where it did not leave).  Where the causing train never passes the place (a
// link's earlier train ending elsewhere), the arrow starts at the end of its path nearest it: on a
// line nearest in chainage, on a network (where two paths share no coordinate) nearest in time.
// Points are in the overlay's coordinate: chainage on a line, on a network distance along each
// end's own train's path (the corridor diagrams place each end with its train, and draw an arrow
// only where both ends lie on the corridor).  Knock-on with no train as its cause (a disruption,
// the dispatcher) counts in a tree's damage but draws no arrow.
std::vector<AsRunTree> largest_delay_trees(const SimResult& day, const StoredDelayTrees& trees,
                                           const AsRunOverlay& overlay, const Scenario& scenario,
                                           const PlanResult& plan, std::size_t count = 3);

// Train ids of `day` that the plan does not know (the scenario changed since the run).
std::vector<std::string> unknown_trains(const SimResult& day, const PlanResult& plan);

}  // namespace knockon
