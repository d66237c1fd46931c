#pragma once
// A sweep (sweep/cost_accuracy_sweep.hpp) as a cost–accuracy chart (report/cost_accuracy_svg.hpp):
// one series per method, x = right-hand-side evaluations or wall seconds per run, y = the error
// the sweep measured. Failed points (error +inf) are passed on, so the chart notes them.
#include <cstddef>
#include <string>
#include <vector>

#include "stepcert/core/number_text.hpp"
#include "stepcert/report/cost_accuracy_svg.hpp"
#include "stepcert/sweep/sweep_point.hpp"

namespace stepcert {

enum class chart_cost { evaluations, seconds };

/// One chart series per method of the sweep, in the order the methods were added.
inline std::vector<chart_series> sweep_chart_series(const sweep_result& r, chart_cost cost = chart_cost::evaluations) {
    std::vector<chart_series> out(r.methods.size());
    for (std::size_t m = 0; m < r.methods.size(); ++m) out[m].name = r.methods[m];
    for (const sweep_point& p : r.points) {
        chart_series& s = out.at(p.method_index);
        s.cost.push_back(cost == chart_cost::evaluations ? static_cast<double>(p.evaluations) : p.seconds_median);
        s.error.push_back(p.error);
    }
    return out;
}

/// The chart of a sweep; empty title and default axis labels are filled in from the sweep.
inline std::string sweep_svg(const sweep_result& r, chart_options opt = {}, chart_cost cost = chart_cost::evaluations) {
    if (opt.title.empty()) opt.title = r.problem + ": cost against accuracy";
    if (cost == chart_cost::seconds && opt.x_label == chart_options{}.x_label) opt.x_label = "wall time per run (s, median)";
    if (opt.y_label == chart_options{}.y_label)
        opt.y_label = "achieved error (max over " + std::to_string(r.output_times) + " output time" +
                      (r.output_times == 1 ? "" : "s") + ")";
    return cost_accuracy_svg(sweep_chart_series(r, cost), opt);
}

} // namespace stepcert
