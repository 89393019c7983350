#include "tools/report/plan_charts.hpp"

#include <algorithm>
#include <cmath>
#include <map>
#include <optional>
#include <set>
#include <stdexcept>
#include <utility>

#include "models/units.hpp"

namespace knockon {

using svg::Element;
using svg::Point;

namespace {

constexpr double kHour = 3600.0;
constexpr std::size_t kMaxTrainLabels = 40;  // more trains than this in a window: tooltips only

std::string km(double metres, int decimals = 3) { return svg::number(metres / 1000.0, decimals); }

// Keeps the points of a time-ordered polyline that lie in [from, to], adding the points where
// it crosses the window's edges (linear interpolation).
std::vector<Point> clip_in_time(const std::vector<Point>& pts, double from, double to) {
    std::vector<Point> out;
    auto at = [](const Point& a, const Point& b, double t) {
        if (b.x == a.x) return Point{t, b.y};
        return Point{t, a.y + (b.y - a.y) * (t - a.x) / (b.x - a.x)};
    };
    for (std::size_t i = 0; i < pts.size(); ++i) {
        const Point& p = pts[i];
        const bool inside = p.x >= from && p.x <= to;
        if (i > 0) {
            const Point& q = pts[i - 1];
            // Entering over the window's start, or leaving over its end (or both in one step).
            if (q.x < from && p.x > from) out.push_back(at(q, p, from));
            if (inside) out.push_back(p);
            if (q.x < to && p.x > to) out.push_back(at(q, p, to));
        } else if (inside) {
            out.push_back(p);
        }
    }
    // A lone point is no line: a train that only touches an edge of the window is not drawn.
    if (out.size() < 2) out.clear();
    return out;
}

// Keeps a point where time has moved on by at least `step` since the last one kept (and the
// last point), so that a densely sampled trajectory costs about one point per pixel column.
std::vector<Point> thin_in_time(const std::vector<Point>& pts, double step) {
    std::vector<Point> out;
    for (std::size_t i = 0; i < pts.size(); ++i)
        if (out.empty() || i + 1 == pts.size() || pts[i].x - out.back().x >= step) out.push_back(pts[i]);
    return out;
}

// An arrow's two ends on the axis, each placed with its own train (a line: as drawn; a network
// corridor: along the train's part of it); nullopt when either end lies off the axis, so that an
// arrow is drawn only between two trains the diagram shows, at places it shows.
std::optional<std::pair<Point, Point>> arrow_on(const DiagramAxis& axis, const AsRunArrow& a) {
    const double y1 = axis.as_run(a.from_train, a.from.y), y2 = axis.as_run(a.to_train, a.to.y);
    if (!std::isfinite(y1) || !std::isfinite(y2)) return std::nullopt;
    return std::pair<Point, Point>{{a.from.x, y1}, {a.to.x, y2}};
}

// How many of a tree's arrows `axis` cannot draw (see arrow_on): on a line none.
std::size_t arrows_elsewhere(const DiagramAxis& axis, const AsRunTree& tree) {
    return static_cast<std::size_t>(std::count_if(tree.arrows.begin(), tree.arrows.end(),
                                                  [&](const AsRunArrow& a) { return !arrow_on(axis, a); }));
}

// The day's largest delay trees over the as-run paths: an arrow per piece of knock-on one train
// passed to another, from the causing train's path to the delayed train's, in the tree's style
// ("tree-arrow tree-K", K from 1, largest first), with what it carried in data- attributes.  An
// arrow is cut to the window; one wholly outside it, or with an end off the axis, is left out.
void draw_delay_trees(Element& doc, const AsRunOverlay& as_run, const PlanResult& plan, TimeWindow window,
                      const svg::LinearScale& X, const svg::LinearScale& Y, const DiagramAxis& axis) {
    if (as_run.trees.empty()) return;
    Element& g = doc.add(svg::group("delay-trees"));
    for (std::size_t k = 0; k < as_run.trees.size(); ++k) {
        const AsRunTree& tree = as_run.trees[k];
        const std::string style = "tree-" + std::to_string(k + 1);
        for (const AsRunArrow& a : tree.arrows) {
            if (a.from_train >= plan.trains.size() || a.to_train >= plan.trains.size()) continue;
            const auto ends = arrow_on(axis, a);
            if (!ends) continue;
            Point p = ends->first, q = ends->second;
            // Cut to the window in time (the head, then the tail).
            auto at = [](const Point& u, const Point& v, double t) {
                const double f = v.x != u.x ? (t - u.x) / (v.x - u.x) : 0.0;
                return Point{t, u.y + f * (v.y - u.y)};
            };
            if ((p.x < window.from && q.x < window.from) || (p.x > window.to && q.x > window.to)) continue;
            if (p.x < window.from) p = at(p, q, window.from);
            if (p.x > window.to) p = at(p, q, window.to);
            if (q.x < window.from) q = at(p, q, window.from);
            if (q.x > window.to) q = at(p, q, window.to);
            const std::string from = plan.trains[a.from_train].run.service->id;
            const std::string to = plan.trains[a.to_train].run.service->id;
            const double x1 = X(p.x), y1 = Y(p.y), x2 = X(q.x), y2 = Y(q.y);
            g.add(svg::line(x1, y1, x2, y2, "tree-arrow " + style))
                .attr("data-tree", static_cast<double>(k + 1))
                .attr("data-from", from)
                .attr("data-to", to)
                .attr("data-place", a.place)
                .attr("data-cause", a.cause)
                .attr("data-seconds", svg::number(a.seconds, 3))
                .tooltip("delay tree " + std::to_string(k + 1) + " (" + tree.label + "): " +
                         svg::number(a.seconds / 60.0, 1) + " min passed from " + from + " to " + to + " at " +
                         a.place + (a.cause == "link" ? " (a link)" : " (it held a section)"));
            // The head: a small triangle pointing along the arrow at the delayed train.
            const double len = std::hypot(x2 - x1, y2 - y1);
            const double ux = len > 1e-9 ? (x2 - x1) / len : 1.0, uy = len > 1e-9 ? (y2 - y1) / len : 0.0;
            const double b1x = x2 - 7.0 * ux - 3.5 * uy, b1y = y2 - 7.0 * uy + 3.5 * ux;
            const double b2x = x2 - 7.0 * ux + 3.5 * uy, b2y = y2 - 7.0 * uy - 3.5 * ux;
            g.add(svg::path("M" + svg::number(x2) + "," + svg::number(y2) + " L" + svg::number(b1x) + "," +
                                svg::number(b1y) + " L" + svg::number(b2x) + "," + svg::number(b2y) + " Z",
                            "tree-head " + style));
        }
    }
}

// The as-run paths over the plan (each with a white halo so it stands out from the planned
// paths and blocks beneath) and the stands at signals.
void draw_as_run(Element& doc, const AsRunOverlay& as_run, const PlanResult& plan,
                 const std::vector<std::string>& categories, TimeWindow window, const svg::LinearScale& X,
                 const svg::LinearScale& Y, double step, const DiagramAxis& axis) {
    Element& g = doc.add(svg::group("as-run"));
    for (const AsRunPath& p : as_run.paths) {
        if (p.train >= plan.trains.size()) continue;
        // Onto the axis; a point off it (beyond a corridor's part of the path) is left out.
        std::vector<Point> placed;
        for (const Point& q : p.points)
            if (const double y = axis.as_run(p.train, q.y); std::isfinite(y)) placed.push_back({q.x, y});
        std::vector<Point> pts = thin_in_time(clip_in_time(placed, window.from, window.to), step);
        if (pts.size() < 2) continue;
        for (Point& q : pts) q = {X(q.x), Y(q.y)};
        const ServiceRun& run = plan.trains[p.train].run;
        g.add(svg::polyline(pts, "asrun-halo"));
        g.add(svg::polyline(pts, "asrun-path " + category_class(categories, run.service->category)))
            .tooltip(run.service->id + " as run (" + as_run.label + ")");
    }
    for (const AsRunHold& h : as_run.holds) {
        const double t0 = std::max(h.from, window.from), t1 = std::min(h.to, window.to);
        if (!(t1 > t0) || h.train >= plan.trains.size()) continue;
        const double at = axis.as_run(h.train, h.chainage);
        if (!std::isfinite(at)) continue;
        g.add(svg::line(X(t0), Y(at), std::max(X(t1), X(t0) + 1.5), Y(at), "asrun-hold"))
            .tooltip(plan.trains[h.train].run.service->id + " stood at signal " + h.signal + " " +
                     format_time_of_day(h.from) + "-" + format_time_of_day(h.to) + " (" +
                     svg::number(h.to - h.from, 0) + " s)");
    }
    draw_delay_trees(doc, as_run, plan, window, X, Y, axis);
}

}  // namespace

namespace {

// How far a path on a loop (a crossing place's other track) is drawn off the through track's [px].
constexpr double kLoopOffset = 4.0;

// A train's legs sampled about every `sample_step` seconds as (time, pos(s)), leg ends always
// included; a leg wholly outside the window only needs its ends (the clipping interpolates stops
// that span an edge).
template <class Position>
std::vector<Point> sample_legs(const ServiceRun& run, TimeWindow window, double sample_step, Position pos) {
    std::vector<Point> pts;
    const double step = std::max(sample_step, 0.1);
    for (const RunLeg& leg : run.legs) {
        const Trajectory& tr = leg.trajectory;
        const double t0 = leg.start_time, dur = tr.duration();
        const bool outside = t0 + dur < window.from || t0 > window.to;
        const long n = outside ? 1 : std::max(1L, static_cast<long>(std::ceil(dur / step)));
        for (long i = 0; i <= n; ++i) {
            const double tau = dur * static_cast<double>(i) / static_cast<double>(n);
            pts.push_back({t0 + tau, pos(tr.position_at(tau))});
        }
    }
    return pts;
}

}  // namespace

std::vector<std::string> train_categories(const PlanResult& plan) {
    std::vector<std::string> out;
    for (const TrainPlan& tp : plan.trains) {
        const std::string& c = tp.run.service->category;
        if (std::find(out.begin(), out.end(), c) == out.end()) out.push_back(c);
    }
    return out;
}

BusiestHour busiest_hour(const PlanResult& plan) {
    // Departures from stops and passes of timing points; a terminating train's arrival at its
    // terminus is neither.
    std::map<long, std::size_t> per_hour;
    for (const TrainPlan& tp : plan.trains) {
        const auto& calls = tp.run.calls;
        for (std::size_t i = 0; i < calls.size(); ++i) {
            const PlannedCall& c = calls[i];
            const bool terminus = i + 1 == calls.size() && c.stops;
            if (terminus || !std::isfinite(c.planned_departure)) continue;
            ++per_hour[static_cast<long>(std::floor(c.planned_departure / kHour))];
        }
    }
    BusiestHour best{{6 * kHour, 7 * kHour}, 0};
    for (const auto& [hour, n] : per_hour)   // ascending hours: the earliest wins a tie
        if (n > best.events) best = {{hour * kHour, (hour + 1) * kHour}, n};
    return best;
}

TimeWindow plan_extent(const PlanResult& plan) {
    double lo = INFINITY, hi = -INFINITY;
    for (const TrainPlan& tp : plan.trains) {
        lo = std::min(lo, tp.run.appear_time);
        hi = std::max(hi, tp.run.vanish_time);
        for (const RouteBlocking& r : tp.stairway.routes) {
            lo = std::min(lo, r.start);
            hi = std::max(hi, r.end);
        }
    }
    if (!(lo <= hi)) return {0.0, kHour};
    TimeWindow w{std::floor(lo / kHour) * kHour, std::ceil(hi / kHour) * kHour};
    if (w.to <= w.from) w.to = w.from + kHour;
    return w;
}

TimeWindow choose_window(const PlanResult& plan, const WindowRequest& request, std::string* reason) {
    TimeWindow w;
    std::string why;
    if (request.all) {
        if (request.from || request.to) throw std::invalid_argument("--all cannot be combined with --from or --to");
        w = plan_extent(plan);
        why = "every train, in whole hours from the first blocking to the last";
    } else if (request.from && request.to) {
        w = {*request.from, *request.to};
        why = "as asked for";
    } else if (request.from) {
        w = {*request.from, *request.from + kHour};
        why = "the hour from the time asked for";
    } else if (request.to) {
        w = {*request.to - kHour, *request.to};
        why = "the hour up to the time asked for";
    } else if (request.worst && request.worst->knock_on > 0.0) {
        w = request.worst->window;
        why = "the hour in which the day drawn lost the most time to knock-on delay (" +
              svg::number(request.worst->knock_on / 60.0, 1) + " min, all trains)";
    } else {
        const BusiestHour b = busiest_hour(plan);
        w = b.window;
        why = "the busiest clock hour (" + std::to_string(b.events) + " departures and passes at timing points)";
    }
    if (!(w.to > w.from)) throw std::invalid_argument("the window must end after it starts");
    if (w.length() > 48 * kHour) throw std::invalid_argument("the window may be at most 48 hours long");
    if (reason) *reason = why;
    return w;
}

std::vector<Point> train_path_points(const ServiceRun& run, TimeWindow window, double sample_step) {
    return clip_in_time(sample_legs(run, window, sample_step, [&](double s) { return run.path.chainage_at(s); }),
                        window.from, window.to);
}

std::vector<Point> train_path_positions(const ServiceRun& run, TimeWindow window, double sample_step, double s_from,
                                        double s_to) {
    std::vector<Point> pts =
        clip_in_time(sample_legs(run, window, sample_step, [](double s) { return s; }), window.from, window.to);
    // The head never runs back along its path, so the part from s_from to s_to is clipped as the
    // window is, with the axes swapped.
    for (Point& p : pts) std::swap(p.x, p.y);
    pts = clip_in_time(pts, s_from, s_to);
    for (Point& p : pts) std::swap(p.x, p.y);
    return pts;
}

ChainageSpan route_span(const TrainPlan& train, const RouteBlocking& route) {
    const double lo = route.s_entry, hi = route.s_exit + route.overlap;
    ChainageSpan span{INFINITY, -INFINITY};
    for (const SectionBlocking& b : train.stairway.sections)
        if (std::min(hi, b.s_to) - std::max(lo, b.s_from) > 1e-6) {
            span.lo = std::min(span.lo, b.x_lo);
            span.hi = std::max(span.hi, b.x_hi);
        }
    if (span.lo > span.hi) {
        // No section found (should not happen): the route's own ends along the path.
        const double a = train.run.path.chainage_at(lo), b = train.run.path.chainage_at(hi);
        span = {std::min(a, b), std::max(a, b)};
    }
    return span;
}

Element time_distance_chart(const Infrastructure& infra, const PlanResult& plan, TimeWindow window,
                            const ChartOptions& options, const AsRunOverlay* as_run) {
    return time_distance_chart(*line_axis(infra), plan, window, options, as_run);
}

Element time_distance_chart(const DiagramAxis& dax, const PlanResult& plan, TimeWindow window,
                            const ChartOptions& options, const AsRunOverlay* as_run) {
    const double W = options.width;
    // The left margin holds the longest station name (bold, hence wider than text_width's rule),
    // the signal columns and a little room, so no name is cut at the drawing's edge.
    constexpr double kStationFont = 11.0, kLabelGap = 13.0;
    double widest = 0.0;
    for (const AxisStation& st : dax.stations) widest = std::max(widest, 1.12 * text_width(st.name, kStationFont));
    const double left = std::max(190.0, widest + 24.0 + 12.0), right = 70.0;
    const double top = options.title.empty() ? 16.0 : 46.0;
    const double plot_h = 520.0;
    const double plot_w = std::max(200.0, W - left - right);
    const svg::LinearScale X{window.from, window.to, left, left + plot_w};
    const double length = dax.length;
    const svg::LinearScale Y{0.0, length, top, top + plot_h};   // chainage grows downwards
    const std::vector<std::string> categories = train_categories(plan);

    // The legend's height decides the drawing's height, so lay it out first.
    std::vector<LegendItem> legend;
    for (std::size_t k = 0; k < categories.size(); ++k)
        legend.push_back({sample_line("legend-line " + category_style(k) + (as_run ? " dimmed" : "")),
                          (as_run ? "planned path: " : "train path: ") + categories[k]});
    if (as_run) {
        legend.push_back({sample_line("legend-asrun cat-0"), as_run->label + " (solid, bold, in the train's colour)"});
        legend.push_back({svg::line(4, 6, 22, 6, "legend-hold"), "standing at a signal showing stop"});
        for (std::size_t k = 0; k < as_run->trees.size(); ++k) {
            const AsRunTree& tree = as_run->trees[k];
            const std::string style = "tree-" + std::to_string(k + 1);
            Element arrow = svg::group();
            arrow.add(svg::line(2, 6, 18, 6, "legend-tree " + style));
            arrow.add(svg::path("M24,6 L17,2.5 L17,9.5 Z", "tree-head " + style));
            // On a corridor, the arrows between trains it does not both show are counted here.
            const std::size_t elsewhere = arrows_elsewhere(dax, tree);
            legend.push_back({std::move(arrow),
                              "delay tree " + std::to_string(k + 1) + ": " + tree.label + ", " +
                                  svg::number(tree.damage / 60.0, 1) +
                                  " min of knock-on (arrow: from the train that passed it on to the train it delayed)" +
                                  (elsewhere == 0 ? std::string()
                                                  : "; elsewhere: " + std::to_string(elsewhere) + " of its " +
                                                        std::to_string(tree.arrows.size()) +
                                                        " arrows (trains not both on this corridor there)")});
        }
    }
    {
        Element block = svg::group();
        block.add(svg::rect(1, 0, 24, 12, "legend-block cat-0"));
        legend.push_back({std::move(block), "blocking time of a route (shaded in the train's style)"});
        legend.push_back({svg::rect(1, 0, 24, 12, "legend-conflict"), "conflict: overlapping blocking times"});
        legend.push_back({sample_line("legend-station"), "station (timing point)"});
        Element sig = svg::group();
        sig.add(svg::line(4, 6, 11, 6, "legend-signal sig-up"));
        sig.add(svg::line(15, 6, 22, 6, "legend-signal sig-down"));
        legend.push_back({std::move(sig), dax.signal_legend});
    }
    const double legend_h = legend_height(legend, plot_w);
    const double axis_bottom = top + plot_h;
    const double legend_y = axis_bottom + 52.0;
    const double H = legend_y + legend_h + (options.footnote.empty() ? 6.0 : 24.0);

    Element doc = chart_document(W, H, "time-distance", options, "time-distance diagram", left);
    {
        Element& defs = doc.add(Element("defs"));
        Element& pat = defs.add(Element("pattern"));
        pat.attr("id", "knockon-hatch").attr("patternUnits", "userSpaceOnUse").attr("width", 6.0).attr("height", 6.0)
            .attr("patternTransform", "rotate(45)");
        pat.add(svg::rect(0, 0, 6, 6)).attr("fill", "#ffffff").attr("fill-opacity", "0.55");
        pat.add(svg::line(0, 0, 0, 6)).attr("stroke", "#000000").attr("stroke-width", 2.2);
    }

    // Grid: whole-clock time ticks and the stations.
    Element& grid = doc.add(svg::group("grid-layer"));
    for (double t : svg::time_ticks(window.from, window.to, std::max(2, static_cast<int>(plot_w / 90.0)))) {
        const double x = X(t);
        grid.add(svg::line(x, top, x, axis_bottom, "grid"));
        grid.add(svg::line(x, axis_bottom, x, axis_bottom + 5, "tick"));
        grid.add(svg::text(x, axis_bottom + 18, svg::format_hhmm(t), "tick-label", "middle"));
    }
    // Station names beside their lines, moved apart where stations lie closer than a line of text
    // (with a leader to the station's line).
    std::vector<double> wanted;
    for (const AxisStation& st : dax.stations) wanted.push_back(Y(st.at) + 4.0);
    const std::vector<double> label_y = spread_labels(wanted, kLabelGap, top - 2.0, axis_bottom + 12.0);
    for (std::size_t i = 0; i < dax.stations.size(); ++i) {
        const AxisStation& st = dax.stations[i];
        const double y = Y(st.at);
        Element& l = grid.add(svg::line(left, y, left + plot_w, y, "station-line"));
        l.tooltip(st.name + " (" + st.id + "), " + st.where);
        grid.add(svg::text(left - 24, label_y[i], st.name, "station-label", "end")).tooltip(st.id + ", " + st.where);
        if (std::abs(label_y[i] - wanted[i]) > 1.0)
            grid.add(svg::line(left - 23, label_y[i] - 4.0, left - 19, y, "label-leader"));
    }
    // Signals: a column of ticks each side of the strip left of the plot.
    Element& sigs = doc.add(svg::group("signals"));
    for (const AxisSignal& s : dax.signals) {
        const double y = Y(s.at);
        const bool up = s.downwards;
        const double x0 = up ? left - 18 : left - 9;
        sigs.add(svg::line(x0, y, x0 + 7, y, up ? "signal-tick sig-up" : "signal-tick sig-down")).tooltip(s.tooltip);
    }
    // Chainage axis on the right.
    Element& axis = doc.add(svg::group("axis"));
    for (double x : svg::nice_ticks(0.0, length, 8)) {
        const double y = Y(x);
        axis.add(svg::line(left + plot_w, y, left + plot_w + 5, y, "tick"));
        axis.add(svg::text(left + plot_w + 8, y + 4, km(x, 1), "tick-label"));
    }
    {
        const double cx = left + plot_w + 52, cy = top + plot_h / 2;
        axis.add(svg::text(cx, cy, dax.axis_label, "axis-label", "middle"))
            .attr("transform", "rotate(90 " + svg::number(cx) + " " + svg::number(cy) + ")");
    }
    axis.add(svg::text(left + plot_w / 2, axis_bottom + 38, "time of day [HH:MM]", "axis-label", "middle"));
    axis.add(svg::text(left - 40, top - 6, "station", "axis-label small", "end"));
    axis.add(svg::text(left - 14, top - 6, "signals", "axis-label small", "middle"));

    // Loops: a band over each loop's extent, where trains on the loop are drawn offset.
    Element& loop_bands = doc.add(svg::group("loops"));
    for (const AxisBand& b : dax.bands)
        loop_bands.add(svg::rect(left, Y(b.from), plot_w, Y(b.to) - Y(b.from), "loop-band")).tooltip(b.tooltip);
    // Blocking-time stairways beneath the paths.
    Element& blocks = doc.add(svg::group("stairways"));
    for (std::size_t ti = 0; ti < plan.trains.size(); ++ti) {
        const TrainPlan& tp = plan.trains[ti];
        const std::string cls = "block " + category_class(categories, tp.run.service->category);
        Element* g = nullptr;
        for (const RouteBlocking& r : tp.stairway.routes) {
            if (r.end <= window.from || r.start >= window.to) continue;
            const std::optional<AxisSpan> on_axis = dax.route(ti, tp, r);
            if (!on_axis) continue;
            const AxisSpan span = *on_axis;
            const double x0 = X(std::max(r.start, window.from)), x1 = X(std::min(r.end, window.to));
            if (!g) {
                g = &blocks.add(svg::group());
                g->tooltip("blocking times of " + tp.run.service->id);
            }
            g->add(svg::rect(x0, Y(span.lo), x1 - x0, Y(span.hi) - Y(span.lo), cls))
                .tooltip(tp.run.service->id + ": route " + r.entry_signal + " to " +
                         (r.exit_signal.empty() ? "path end" : r.exit_signal) + ", blocked " +
                         format_time_of_day(r.start) + "-" + format_time_of_day(r.end));
        }
    }

    // Conflicts: where two trains' section blockings overlap.
    Element& conflicts = doc.add(svg::group("conflicts"));
    for (const Conflict& c : plan.conflicts) {
        const double t0 = std::max(c.from, window.from), t1 = std::min(c.from + c.overlap, window.to);
        if (t1 <= t0) continue;
        const SectionBlocking* sec = nullptr;
        for (const SectionBlocking& b : plan.trains[c.second].stairway.sections)
            if (b.section == c.section) sec = &b;
        if (!sec) continue;
        const std::optional<AxisSpan> span = dax.section(c.second, plan.trains[c.second], *sec);
        if (!span) continue;
        conflicts.add(svg::rect(X(t0), Y(span->lo), X(t1) - X(t0), Y(span->hi) - Y(span->lo), "conflict"))
            .tooltip("conflict on " + c.section + ": " + plan.trains[c.first].run.service->id + " and " +
                     plan.trains[c.second].run.service->id + ", " + svg::number(c.overlap, 0) + " s from " +
                     format_time_of_day(c.from));
    }

    // Train paths, thinned to about one point per pixel column on long windows.
    const double step = std::max(10.0, window.length() / plot_w);
    Element& paths = doc.add(svg::group("paths"));
    Element& loop_marks = doc.add(svg::group("loop-paths"));
    std::vector<std::pair<std::size_t, Point>> labels;
    for (std::size_t ti = 0; ti < plan.trains.size(); ++ti) {
        const TrainPlan& tp = plan.trains[ti];
        const std::vector<AxisPoint> drawn = dax.planned(ti, tp, window.from, window.to, step);
        if (drawn.empty()) continue;
        // On a loop (a crossing place's other track) the path is drawn a few pixels off the
        // through track's, so that two trains crossing there read as a crossing, not as
        // overlapping stairways.
        std::vector<Point> pts, on_loop;
        for (const AxisPoint& a : drawn) {
            pts.push_back({X(a.t), Y(a.at) + kLoopOffset * a.slot});
            if (a.slot > 0) on_loop.push_back(pts.back());
        }
        if (on_loop.size() > 1)
            loop_marks.add(svg::polyline(on_loop, "loop-path")).tooltip(dax.offset_note(ti, tp));
        const ServiceRun& r = tp.run;
        paths.add(svg::polyline(pts, "train-path " + category_class(categories, r.service->category) +
                                         (as_run ? " dimmed" : "")))
            .tooltip(r.service->id + " (" + r.service->category + ", " + r.type->id + ", " + to_string(r.path.direction) + ")");
        labels.push_back({ti, pts.front()});
    }
    if (as_run) draw_as_run(doc, *as_run, plan, categories, window, X, Y, step, dax);
    if (labels.size() <= kMaxTrainLabels) {
        Element& g = doc.add(svg::group("train-labels"));
        for (const auto& [ti, p] : labels) {
            // Inside the plot beside the path's first point, on the side away from the path (up
            // trains run down the page, down trains up it), unless that would leave the plot.
            const TrainPlan& tp = plan.trains[ti];
            const bool up = dax.downwards(ti, tp);
            const double y = up ? p.y + 11 : p.y - 4;
            if (p.x - left > 50)
                g.add(svg::text(p.x - 3, y, tp.run.service->id, "train-label", "end"));
            else
                g.add(svg::text(p.x + 3, y, tp.run.service->id, "train-label"));
        }
    }
    if (labels.empty())
        doc.add(svg::text(left + plot_w / 2, top + plot_h / 2, "no train runs in this window", "empty-note", "middle"));

    doc.add(svg::rect(left, top, plot_w, plot_h, "frame"));
    draw_legend(doc, std::move(legend), left, legend_y, plot_w);
    draw_footnote(doc, options, left, H);
    return doc;
}

Element capacity_chart(const PlanResult& plan, const ChartOptions& options) {
    // Groups: one per line section and direction, in the plan's order; a bar per window.
    struct Group {
        std::string name;
        Direction direction;
        std::vector<const CapacityFigure*> figures;
    };
    std::vector<Group> groups;
    double top_value = 1.0;
    for (const CapacityFigure& f : plan.capacity) {
        if (groups.empty() || groups.back().name != f.line_section || groups.back().direction != f.direction)
            groups.push_back({f.line_section, f.direction, {}});
        groups.back().figures.push_back(&f);
        top_value = std::max({top_value, f.consumption, f.limit});
    }

    const double W = options.width;
    const double left = 70.0, right = 20.0;
    const double top = options.title.empty() ? 20.0 : 50.0;
    const double plot_h = 300.0;
    const double plot_w = std::max(200.0, W - left - right);
    const double group_w = groups.empty() ? plot_w : plot_w / static_cast<double>(groups.size());
    const double label_font = 11.0;
    std::size_t longest = 0;
    for (const Group& g : groups) longest = std::max(longest, g.name.size());
    const bool slanted = text_width(std::string(longest, 'M'), label_font) > group_w - 6;
    const double label_h = slanted ? 14.0 + 0.5 * text_width(std::string(longest, 'M'), label_font) : 34.0;

    // Percent axis: at least 0-100 %, in nice steps.
    const double ymax_pct = [&] {
        const double v = top_value * 100.0;
        const double st = svg::nice_step(0.0, v, 5);
        return std::max(100.0, std::ceil(v / st - 1e-9) * st);
    }();
    const svg::LinearScale Y{0.0, ymax_pct, top + plot_h, top};
    const double axis_bottom = top + plot_h;

    std::vector<LegendItem> legend;
    legend.push_back({svg::rect(1, 0, 24, 12, "legend-bar win-peak"), "peak hour (the line section's busiest clock hour)"});
    legend.push_back({svg::rect(1, 0, 24, 12, "legend-bar win-day"), "whole day"});
    {
        Element lim = svg::group();
        lim.add(svg::line(1, 6, 25, 6, "cap-limit-halo"));
        lim.add(svg::line(1, 6, 25, 6, "legend-limit"));
        legend.push_back({std::move(lim), "UIC 406 recommended limit for the window (as recalled)"});
    }
    // The sample is the mark itself, not a made-up figure that could be read as a result.
    legend.push_back({svg::text(13, 10, kOverMark, "bar-value over", "middle"),
                      "above the limit: value in bold, marked " + std::string(kOverMark)});
    const double legend_y = axis_bottom + label_h + 30.0;
    const double legend_h = legend_height(legend, plot_w);
    const double H = legend_y + legend_h + (options.footnote.empty() ? 6.0 : 24.0);

    Element doc = chart_document(W, H, "capacity", options, "capacity consumption", left);

    Element& axis = doc.add(svg::group("axis"));
    for (double v : svg::nice_ticks(0.0, ymax_pct, 5)) {
        const double y = Y(v);
        axis.add(svg::line(left, y, left + plot_w, y, "grid"));
        axis.add(svg::line(left - 5, y, left, y, "tick"));
        axis.add(svg::text(left - 8, y + 4, svg::number(v, 0) + " %", "tick-label", "end"));
    }
    {
        const double cx = 18, cy = top + plot_h / 2;
        axis.add(svg::text(cx, cy, "capacity consumption [% of the window]", "axis-label", "middle"))
            .attr("transform", "rotate(-90 " + svg::number(cx) + " " + svg::number(cy) + ")");
    }

    Element& bars = doc.add(svg::group("bars"));
    for (std::size_t gi = 0; gi < groups.size(); ++gi) {
        const Group& g = groups[gi];
        const double gx = left + group_w * static_cast<double>(gi);
        const double n = static_cast<double>(g.figures.size());
        const double bar_w = std::min(30.0, group_w * 0.7 / n);
        const double x_start = gx + (group_w - bar_w * n - 4.0 * (n - 1)) / 2.0;
        for (std::size_t k = 0; k < g.figures.size(); ++k) {
            const CapacityFigure& f = *g.figures[k];
            const std::string win = f.window == "peak hour" ? "win-peak" : f.window == "day" ? "win-day" : "win-other";
            const double x = x_start + static_cast<double>(k) * (bar_w + 4.0);
            const double v = f.consumption * 100.0, lim = f.limit * 100.0;
            const bool over = f.consumption > f.limit;
            bars.add(svg::rect(x, Y(v), bar_w, Y(0) - Y(v), "cap-bar " + win))
                .tooltip(f.line_section + " " + to_string(f.direction) + ", " + f.window + " " +
                         svg::format_hhmm(f.from) + "-" + svg::format_hhmm(f.to) + ": " + svg::number(v, 1) +
                         " % (limit " + svg::number(lim, 0) + " %), " + std::to_string(f.trains) + " trains");
            if (f.limit > 0.0) {
                bars.add(svg::line(x - 4, Y(lim), x + bar_w + 4, Y(lim), "cap-limit-halo"));
                bars.add(svg::line(x - 4, Y(lim), x + bar_w + 4, Y(lim), "cap-limit"));
            }
            // The value above its bar, or above the limit mark where the two would collide.
            double ly = Y(v) - 4;
            if (f.limit > 0.0 && std::abs(Y(v) - Y(lim)) < 12) ly = std::min(Y(v), Y(lim)) - 5;
            bars.add(svg::text(x + bar_w / 2, ly, (over ? std::string(kOverMark) + " " : "") + svg::number(v, 0) + " %",
                               over ? "bar-value over" : "bar-value", "middle"));
        }
        const double cx = gx + group_w / 2, ly = axis_bottom + 16;
        if (slanted) {
            bars.add(svg::text(cx, ly, g.name + " (" + to_string(g.direction) + ")", "group-label", "end"))
                .attr("transform", "rotate(-35 " + svg::number(cx) + " " + svg::number(ly) + ")");
        } else {
            bars.add(svg::text(cx, ly, g.name, "group-label", "middle"));
            bars.add(svg::text(cx, ly + 14, to_string(g.direction), "group-sub", "middle"));
        }
    }
    if (groups.empty())
        doc.add(svg::text(left + plot_w / 2, top + plot_h / 2, "no line section carries trains", "empty-note", "middle"));
    axis.add(svg::line(left, axis_bottom, left + plot_w, axis_bottom, "baseline"));
    axis.add(svg::text(left + plot_w / 2, axis_bottom + label_h + 12, "line section and direction", "axis-label",
                       "middle"));
    draw_legend(doc, std::move(legend), left, legend_y, plot_w);
    draw_footnote(doc, options, left, H);
    return doc;
}

Element hourly_capacity_chart(const PlanResult& plan, const ChartOptions& options) {
    // Each hour's highest figure, and which line section it is.
    std::map<double, const CapacityFigure*> top;
    double limit = 0.0, top_value = 1.0;
    for (const CapacityFigure& f : plan.hourly_capacity) {
        const CapacityFigure*& t = top[f.from];
        if (!t || f.consumption > t->consumption) t = &f;
        limit = f.limit;
        top_value = std::max({top_value, f.consumption, f.limit});
    }
    const double W = options.width;
    const double left = 70.0, right = 20.0;
    const double top_y = options.title.empty() ? 20.0 : 50.0;
    const double plot_h = 220.0;
    const double plot_w = std::max(200.0, W - left - right);
    const double ymax_pct = [&] {
        const double v = top_value * 100.0;
        const double st = svg::nice_step(0.0, v, 5);
        return std::max(100.0, std::ceil(v / st - 1e-9) * st);
    }();
    const svg::LinearScale Y{0.0, ymax_pct, top_y + plot_h, top_y};
    const double axis_bottom = top_y + plot_h;
    std::vector<LegendItem> legend;
    legend.push_back({svg::rect(1, 0, 24, 12, "legend-bar win-peak"), "the hour's highest line section and direction"});
    {
        Element lim = svg::group();
        lim.add(svg::line(1, 6, 25, 6, "cap-limit-halo"));
        lim.add(svg::line(1, 6, 25, 6, "legend-limit"));
        legend.push_back({std::move(lim), "UIC 406 recommended peak-hour limit (as recalled)"});
    }
    legend.push_back({svg::text(13, 10, kOverMark, "bar-value over", "middle"),
                      "above the limit: value in bold, marked " + std::string(kOverMark)});
    const double legend_y = axis_bottom + 50.0;
    const double H = legend_y + legend_height(legend, plot_w) + (options.footnote.empty() ? 6.0 : 24.0);
    Element doc = chart_document(W, H, "hourly-capacity", options, "capacity consumption hour by hour", left);

    Element& axis = doc.add(svg::group("axis"));
    for (double v : svg::nice_ticks(0.0, ymax_pct, 5)) {
        axis.add(svg::line(left, Y(v), left + plot_w, Y(v), "grid"));
        axis.add(svg::text(left - 8, Y(v) + 4, svg::number(v, 0) + " %", "tick-label", "end"));
    }
    {
        const double cx = 18, cy = top_y + plot_h / 2;
        axis.add(svg::text(cx, cy, "consumption [% of the hour]", "axis-label", "middle"))
            .attr("transform", "rotate(-90 " + svg::number(cx) + " " + svg::number(cy) + ")");
    }
    Element& bars = doc.add(svg::group("bars"));
    const double n = static_cast<double>(std::max<std::size_t>(top.size(), 1));
    const double slot = plot_w / n, bar_w = std::min(40.0, slot * 0.7);
    std::size_t k = 0;
    for (const auto& [from, f] : top) {
        const double x = left + slot * static_cast<double>(k++) + (slot - bar_w) / 2;
        const double v = f->consumption * 100.0;
        const bool over = f->consumption > f->limit;
        bars.add(svg::rect(x, Y(v), bar_w, Y(0) - Y(v), "hour-bar win-peak"))
            .tooltip(svg::format_hhmm(from) + "-" + svg::format_hhmm(f->to) + ": " + svg::number(v, 1) + " % on " +
                     f->line_section + " " + to_string(f->direction) + " (" + std::to_string(f->trains) + " trains)");
        bars.add(svg::text(x + bar_w / 2, Y(v) - 4, (over ? std::string(kOverMark) + " " : "") + svg::number(v, 0) + " %",
                           over ? "bar-value over" : "bar-value", "middle"));
        bars.add(svg::text(x + bar_w / 2, axis_bottom + 16, svg::format_hhmm(from), "group-label", "middle"));
    }
    if (limit > 0.0) {   // over the bars
        Element& g = doc.add(svg::group("limit"));
        g.add(svg::line(left, Y(limit * 100.0), left + plot_w, Y(limit * 100.0), "cap-limit-halo"));
        g.add(svg::line(left, Y(limit * 100.0), left + plot_w, Y(limit * 100.0), "cap-limit"));
    }
    if (top.empty())
        doc.add(svg::text(left + plot_w / 2, top_y + plot_h / 2, "no line section carries trains", "empty-note", "middle"));
    axis.add(svg::line(left, axis_bottom, left + plot_w, axis_bottom, "baseline"));
    axis.add(svg::text(left + plot_w / 2, axis_bottom + 36, "clock hour (start)", "axis-label", "middle"));
    draw_legend(doc, std::move(legend), left, legend_y, plot_w);
    draw_footnote(doc, options, left, H);
    return doc;
}

}  // namespace knockon
