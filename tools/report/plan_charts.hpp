#pragma once
// Charts of a timetable analysis (PlanResult) as SVG: the time-distance diagram of a time window
// (every train's planned path with its blocking-time stairway, conflicts marked) and the UIC 406
// capacity consumption per line section against the recommended limits.
//
// The charts style their elements by CSS class only (chart_css()), so they can be restyled and
// their elements counted: "train-path" (one polyline per train drawn), "block" (one rectangle
// per route of a train drawn), "conflict", "cap-bar" (one bar per line section and window),
// "cap-limit", "hour-bar" (one per clock hour of the hourly profile); over a simulated day, "asrun-path" (one polyline per train drawn as run) and
// "asrun-hold" (one mark per stand at a signal).
#include <cstddef>
#include <optional>
#include <string>
#include <vector>

#include "models/infrastructure.hpp"
#include "models/plan.hpp"
#include "tools/report/chart_kit.hpp"
#include "tools/report/diagram_axis.hpp"
#include "tools/report/svg.hpp"

namespace knockon {


// The whole clock hour in which most trains depart or pass a timing point (earliest on ties),
// and that count; 06:00-07:00 with no trains at all.
struct BusiestHour {
    TimeWindow window;
    std::size_t events = 0;
};
BusiestHour busiest_hour(const PlanResult& plan);

// From the first blocking to the last of any train, widened to whole hours (00:00-01:00 when empty).
TimeWindow plan_extent(const PlanResult& plan);

// The clock hour in which a simulated day lost the most time to knock-on delay, and how much
// (as_run.hpp finds it from the day's records).
struct LossHour {
    TimeWindow window;
    double knock_on = 0.0;   // [s], all trains
};

// The window a command was asked for: `all` = plan_extent; --from and --to as given; one of them
// alone = the hour from or up to it; neither = the hour the drawn day lost the most time in
// (`worst`, when it lost any), else the busiest hour.  `reason` says which, for the reader.
// Throws std::invalid_argument for an empty or over-long (> 48 h) window.
struct WindowRequest {
    bool all = false;
    std::optional<double> from, to;   // seconds after midnight
    std::optional<LossHour> worst;    // of the day drawn over the plan
};
TimeWindow choose_window(const PlanResult& plan, const WindowRequest& request, std::string* reason = nullptr);

// A train's planned path as (time [s], chainage [m]) points: its legs sampled about every
// `sample_step` seconds (leg ends always included, so a stop shows as a flat stretch between two
// legs), clipped to the window with the crossing points interpolated.  Empty when the train does
// not run in the window.
std::vector<svg::Point> train_path_points(const ServiceRun& run, TimeWindow window, double sample_step);
// The same sampling as (time [s], distance along the path [m]), clipped to the window and to the
// part of the path from s_from to s_to (a network corridor's part of it).
std::vector<svg::Point> train_path_positions(const ServiceRun& run, TimeWindow window, double sample_step,
                                             double s_from, double s_to);

// The chainage extent of a route's blocking: the detection sections it locks, from its entry
// signal to its exit signal plus the overlap (min x_lo, max x_hi).
struct ChainageSpan {
    double lo = 0.0, hi = 0.0;
};
ChainageSpan route_span(const TrainPlan& train, const RouteBlocking& route);

// One simulated day as run, to draw over the plan.
struct AsRunPath {
    std::size_t train = 0;            // index into PlanResult::trains
    std::vector<svg::Point> points;   // (time [s], chainage [m]; on a network along the path) in time order
};
struct AsRunHold {                    // a stand at a signal showing stop
    std::size_t train = 0;
    std::string signal;
    double from = 0.0, to = 0.0;      // [s]
    double chainage = 0.0;            // of the signal [m] (on a network: along the train's path)
};
// Knock-on one train passed to another on the day (an edge of a delay tree, tools/report/as_run):
// from the causing train's path to the delayed train's at the place and time it arrived there.
struct AsRunArrow {
    std::size_t from_train = 0, to_train = 0;   // indices into PlanResult::trains
    std::string place;                          // the delayed train's timing point
    std::string cause;                          // "train" (it held a section) or "link"
    svg::Point from, to;                        // (time [s], chainage [m])
    double seconds = 0.0;
};
struct AsRunTree {                    // the knock-on one source of delay started that day
    std::string label;                // the source, in words
    double damage = 0.0;              // all of its knock-on [s]
    std::vector<AsRunArrow> arrows;   // the part of it passed from train to train
};
struct AsRunOverlay {
    std::string label;                // for the legend, e.g. "as run, replication 7"
    bool along_path = false;          // points lie along each train's path (a network), not by chainage
    std::vector<AsRunPath> paths;
    std::vector<AsRunHold> holds;
    std::vector<AsRunTree> trees;     // the day's largest delay trees, largest first (may be none)
};

// With `as_run`, the planned paths are drawn lighter ("dimmed") and the as-run paths over them,
// solid and bold in the train's colour, with the stands at signals marked.  Drawn along `axis`
// (diagram_axis: a line's chainage or a network corridor); the first form along the line.
svg::Element time_distance_chart(const DiagramAxis& axis, const PlanResult& plan, TimeWindow window,
                                 const ChartOptions& options = {}, const AsRunOverlay* as_run = nullptr);
svg::Element time_distance_chart(const Infrastructure& infra, const PlanResult& plan, TimeWindow window,
                                 const ChartOptions& options = {}, const AsRunOverlay* as_run = nullptr);

svg::Element capacity_chart(const PlanResult& plan, const ChartOptions& options = {});

// The hour-by-hour profile (PlanResult::hourly_capacity): one bar per clock hour ("hour-bar"), the
// highest consumption of any line section and direction in it, and the peak-hour limit
// ("cap-limit").
svg::Element hourly_capacity_chart(const PlanResult& plan, const ChartOptions& options = {});

// Distinct train categories in order of first appearance; a category's index picks its style.
std::vector<std::string> train_categories(const PlanResult& plan);

}  // namespace knockon
