#pragma once
// What a time-distance diagram is drawn along: a line's chainage (line_axis), or one corridor of
// a network (corridor_diagram_axis: its stations at their distances along the trains' paths,
// models/corridor_axis).  The chart (plan_charts) lays out whatever axis it is given; the axis
// says where each train, block, signal and loop lies on it and which track a train uses.
#include <cstddef>
#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "models/corridor_axis.hpp"
#include "models/infrastructure.hpp"
#include "models/plan.hpp"
#include "models/scenario.hpp"

namespace knockon {

struct TimeWindow {
    double from = 0.0, to = 0.0;   // seconds after midnight
    double length() const { return to - from; }
};

struct AxisStation {
    std::string id, name;   // name as shown
    double at = 0.0;        // on the axis [m]
    std::string where;      // for tooltips, e.g. "km 12.400"
};
struct AxisSignal {
    double at = 0.0;
    bool downwards = true;  // faces trains running down the page (the left column)
    std::string tooltip;
};
struct AxisBand {           // where trains on a loop or a crossing place's other tracks are drawn offset
    double from = 0.0, to = 0.0;
    std::string tooltip;
};
struct AxisSpan {
    double lo = 0.0, hi = 0.0;
};
// A point of a train's planned path: time [s], position on the axis [m], and its track's slot:
// 0 on the through track, k drawn k offsets aside (a loop; a crossing place's k-th track).
struct AxisPoint {
    double t = 0.0, at = 0.0;
    int slot = 0;
};

class DiagramAxis {
public:
    virtual ~DiagramAxis() = default;
    std::string name;          // the corridor's; empty for a line
    std::string axis_label;    // beside the distance ticks
    std::string signal_legend; // what the two columns of signal ticks are
    double length = 1.0;       // the axis runs from 0 to here [m]
    std::vector<AxisStation> stations;
    std::vector<AxisSignal> signals;
    std::vector<AxisBand> bands;

    // Train `train` (index into the plan) in the window, sampled about every `step` seconds;
    // empty when it is not drawn on this axis or not in the window.
    virtual std::vector<AxisPoint> planned(std::size_t train, const TrainPlan& tp, double from, double to,
                                           double step) const = 0;
    // Where a route's blocking, or a section's, lies on the axis; nullopt when off it.
    virtual std::optional<AxisSpan> route(std::size_t train, const TrainPlan& tp, const RouteBlocking& r) const = 0;
    virtual std::optional<AxisSpan> section(std::size_t train, const TrainPlan& tp,
                                            const SectionBlocking& b) const = 0;
    // A point of the day as run (AsRunOverlay: chainage on a line, distance along the path on a
    // network) on the axis; NaN when off it.
    virtual double as_run(std::size_t train, double y) const = 0;
    // Whether the train runs down the page (distance growing).
    virtual bool downwards(std::size_t train, const TrainPlan& tp) const = 0;
    // Tooltip of the marks over a train's offset stretches.
    virtual std::string offset_note(std::size_t train, const TrainPlan& tp) const = 0;
};

std::unique_ptr<DiagramAxis> line_axis(const Infrastructure& infra);
std::unique_ptr<DiagramAxis> corridor_diagram_axis(const Scenario& scenario, const PlanResult& plan,
                                                   const CorridorAxis& corridor);
// The scenario's diagrams: the line's one axis, or one per corridor of a network.
std::vector<std::unique_ptr<DiagramAxis>> diagram_axes(const Scenario& scenario, const PlanResult& plan);

}  // namespace knockon
