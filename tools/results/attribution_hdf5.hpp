#pragma once
// Where knock-on comes from (sim/attribution) in the HDF5 results (layout: tools/results/HDF5_LAYOUT.md,
// "Attribution"): a day's sources and delay-tree edges beside its other tables, and a study's
// figures across days (sources, places, what the knock-on passed through, direct causes) beside
// its other summary tables.
#include "sim/attribution.hpp"
#include "sim/attribution_figures.hpp"
#include "sim/sim_model.hpp"

namespace knockon {

namespace h5 {
class Group;
}

// Tables attribution_sources and attribution_edges into a day's group (/day, /replications/<k>).
void write_day_attribution(const h5::Group& day, const SimResult& result, const DayAttribution& a);

// Tables attribution_sources, attribution_places, attribution_through and attribution_causes into
// /study; `timing` the study's timing template.
void write_study_attribution(const h5::Group& study, const SimModel& model, const AttributionSummary& s,
                             const std::vector<TimingRecord>& timing);

}  // namespace knockon
