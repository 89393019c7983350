#pragma once
// A day's attribution of knock-on (sim/attribution) as a study keeps it for every day: one flat
// row of figures, the same length every day, so that it folds into running means like the other
// figures and goes through shard files and MPI bytes as one column.  Across days each figure is a
// mean with its 95 % interval: damage per source, knock-on received and caused per place, the
// knock-on that passed through each section, link and buffer, and by direct cause.
#include <cstddef>
#include <cstdint>
#include <string>
#include <vector>

#include "sim/attribution.hpp"
#include "sim/estimates.hpp"
#include "sim/record_places.hpp"
#include "sim/sim_model.hpp"

namespace knockon {

// Where each figure stands in a day's row.
struct AttributionLayout {
    static constexpr std::size_t kCauses = 5;   // per HoldCause::Kind
    std::uint32_t records = 0, trains = 0, sections = 0, links = 0, pairs = 0, places = 0;

    SourceIndex sources() const { return {records, trains, sections}; }
    std::size_t width() const { return sources().size() + sections + links + pairs + kCauses + 2 * std::size_t{places}; }
    std::size_t damage(std::size_t source) const { return source; }
    std::size_t through_section(std::size_t k) const { return sources().size() + k; }
    std::size_t through_link(std::size_t l) const { return sources().size() + sections + l; }
    std::size_t through_buffer(std::size_t p) const { return sources().size() + sections + links + p; }
    std::size_t by_cause(std::size_t c) const { return sources().size() + sections + links + pairs + c; }
    std::size_t received(std::size_t place) const { return by_cause(kCauses) + place; }
    std::size_t caused(std::size_t place) const { return by_cause(kCauses) + places + place; }
    bool operator==(const AttributionLayout& o) const {
        return records == o.records && trains == o.trains && sections == o.sections && links == o.links &&
               pairs == o.pairs && places == o.places;
    }
};

// The day's row: damage per source, knock-on through each section, link and buffer pair
// (SimModel::buffer_pairs: what the leader passed to the follower directly), by direct cause, and
// per place (RecordPlaces) the knock-on received there and the damage of the primary delays drawn there.
std::vector<float> attribution_row(const SimModel& model, const SimResult& day, const DayAttribution& a,
                                   AttributionLayout& layout);

// Across days: one figure of the row.
struct SourceDamage {
    std::size_t source = 0;   // SourceIndex number
    Estimate damage;          // per day [s]
};
struct PlaceKnockOn {
    std::string place;
    Estimate received, caused;   // per day [s]
};
struct ThroughStats {
    std::size_t index = 0;   // section, link or buffer pair
    Estimate knock_on;       // per day [s]
};

struct AttributionSummary {
    AttributionLayout layout;
    std::vector<SourceDamage> sources;   // every source with knock-on on some day, largest mean first
    std::vector<PlaceKnockOn> places;    // every place, by id
    std::vector<ThroughStats> sections, links, buffers;   // with knock-on on some day, largest mean first
    std::vector<Estimate> by_cause;      // per HoldCause::Kind
};

// From the running means of the rows (in layout order) and the timing template.
AttributionSummary summarize_attribution(const AttributionLayout& layout, const std::vector<RunningMean>& row,
                                         const std::vector<TimingRecord>& timing);

}  // namespace knockon
