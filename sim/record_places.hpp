#pragma once
// The places a study reports knock-on at: the timing records' stations, sorted by id, and the
// place of each timing record.  Every day of a model has the same records (SimModel lays them
// out), so a study works them out once, with the model, rather than sorting names every day.
#include <cstdint>
#include <string>
#include <vector>

#include "sim/sim_result.hpp"

namespace knockon {

struct RecordPlaces {
    std::vector<std::string> places;       // sorted by id, no duplicates
    std::vector<std::uint32_t> of_record;  // per timing record: index into places
};

// From the stations of the timing records, in record order.
RecordPlaces record_places(const std::vector<std::string>& stations);
RecordPlaces record_places(const std::vector<TimingRecord>& timing);

}  // namespace knockon
