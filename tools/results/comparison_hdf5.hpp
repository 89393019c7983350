#pragma once
// A comparison of scenario variants as one HDF5 file of kind "comparison" (`knockon compare ...
// --out FILE.h5`; layout: tools/results/HDF5_LAYOUT.md, "Comparison files"): for each variant the
// figures a study file holds under /study, here under /variants/<name>; under /comparison the
// variants in order with their plan figures, and the paired differences against the first
// variant with their 95 % confidence intervals (the figures of `compare --json`).
//
// The file is created under a temporary name when the writer is made (so a bad path fails before
// the studies run) and appears at its path only when finish() succeeds.
#include <memory>
#include <string>
#include <vector>

#include "sim/comparison.hpp"
#include "sim/sim_model.hpp"
#include "sim/study.hpp"
#include "tools/results/sim_hdf5.hpp"

namespace knockon {

// One variant as studied; the pointers must stay valid until finish() returns.
struct ComparedVariant {
    std::string name, description;
    const SimModel* model = nullptr;
    const StudyResult* study = nullptr;
    const StudySummary* summary = nullptr;
    PlanFigures plan;
};

// One row of /comparison/differences: a figure of `variant` minus the same figure of the first
// variant.  Paired figures carry the mean of the day-by-day differences with its 95 % Student-t
// interval over n days; plan figures (deterministic) carry the difference alone, the interval NaN
// and n = 0.
struct DifferenceRow {
    std::string variant, figure, unit;   // unit: "s" or "share"
    Estimate difference;
    bool paired() const { return difference.n > 0; }
};

// The rows for every variant after the first, in this order: total_knock_on, mean_arrival_delay,
// total_primary, punctual_<N>min per threshold, then plan_mean_minimum_headway,
// plan_peak_hour_consumption, plan_day_consumption.  comparisons[i] compares variants[i + 1]
// with variants[0].
std::vector<DifferenceRow> difference_rows(const std::vector<ComparedVariant>& variants,
                                           const std::vector<StudyComparison>& comparisons,
                                           const std::vector<double>& thresholds);

class ComparisonHdf5Writer {
public:
    // Creates the file under its temporary name with the root attributes (kind "comparison");
    // throws h5::Error naming `path` if it cannot.
    ComparisonHdf5Writer(const std::string& path, const Hdf5RunInfo& info);
    ~ComparisonHdf5Writer();   // without a successful finish(): removes the temporary file
    ComparisonHdf5Writer(const ComparisonHdf5Writer&) = delete;
    ComparisonHdf5Writer& operator=(const ComparisonHdf5Writer&) = delete;

    // Writes /variants/<name> for each variant and /comparison, closes the file and renames it
    // into place.  `variants` holds at least two, the first being the reference.
    void finish(const std::vector<ComparedVariant>& variants, const std::vector<StudyComparison>& comparisons,
                const std::vector<double>& thresholds);

private:
    struct State;
    std::unique_ptr<State> state_;
};

}  // namespace knockon
