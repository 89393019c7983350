#include "sim/record_places.hpp"

#include <algorithm>

namespace knockon {

RecordPlaces record_places(const std::vector<std::string>& stations) {
    RecordPlaces r;
    r.places = stations;
    std::sort(r.places.begin(), r.places.end());
    r.places.erase(std::unique(r.places.begin(), r.places.end()), r.places.end());
    r.of_record.reserve(stations.size());
    for (const std::string& s : stations)
        r.of_record.push_back(
            static_cast<std::uint32_t>(std::lower_bound(r.places.begin(), r.places.end(), s) - r.places.begin()));
    return r;
}

RecordPlaces record_places(const std::vector<TimingRecord>& timing) {
    std::vector<std::string> stations;
    stations.reserve(timing.size());
    for (const TimingRecord& r : timing) stations.push_back(r.station);
    return record_places(stations);
}

}  // namespace knockon
