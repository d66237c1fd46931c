// stepcert_cli compare: a cost–accuracy sweep of several methods on one catalogue problem, its
// Pareto front, and (with --target-error) the cheapest method for a target, confirmed by a run.
#include <cmath>
#include <cstdio>
#include <iostream>
#include <sstream>
#include <string>
#include <variant>
#include <vector>

#include "stepcert/methods/method.hpp"
#include "stepcert/report/cost_accuracy_svg.hpp"
#include "stepcert/report/estimate_caution.hpp"
#include "stepcert/report/sweep_csv.hpp"
#include "stepcert/report/sweep_json.hpp"
#include "stepcert/sweep/cheapest_method.hpp"
#include "stepcert/sweep/cost_accuracy_sweep.hpp"
#include "stepcert/sweep/pareto_front.hpp"
#include "stepcert/sweep/sweep_progress.hpp"

#include "commands.hpp"
#include "output.hpp"
#include "registry.hpp"

namespace stepcert_cli {

namespace {

// Strings built with += (a + b + c of temporaries trips g++ 12's -Wrestrict).
template <class... Parts>
void append(std::string& s, const Parts&... parts) {
    (s += ... += parts);
}
template <class... Parts>
std::string cat(const Parts&... parts) {
    std::string s;
    append(s, parts...);
    return s;
}

/// x in printf format `fmt`; "-" for NaN (a point without a figure), "inf" for infinity.
std::string number(double x, const char* fmt = "%.3e") {
    if (std::isnan(x)) return "-";
    if (std::isinf(x)) return x > 0 ? "inf" : "-inf";
    char buf[64];
    std::snprintf(buf, sizeof buf, fmt, x);
    return buf;
}

std::string padded(std::string s, std::size_t width, bool left_aligned) {
    if (s.size() >= width) return cat(s, " ");
    const std::string fill(width - s.size(), ' ');
    return left_aligned ? cat(s, fill) : cat(fill, s);
}

std::string setting_text(const stepcert::sweep_setting& s) {
    if (s.kind == stepcert::sweep_kind::fixed_step) {
        std::string t = std::to_string(s.steps);
        t += " steps";
        return t;
    }
    std::string t = "tol ";
    t += number(s.value(), "%.1e");
    return t;
}

/// The sweep as a table: one row per point, front members marked, then the answer and caution.
std::string sweep_table(const stepcert::sweep_result& r, const std::string& answer) {
    const auto front = stepcert::pareto_front(r);
    std::vector<bool> on_front(r.points.size(), false);
    for (std::size_t i : front) on_front[i] = true;
    std::string s = "cost-accuracy comparison: problem '";
    s += r.problem;
    append(s, "', t in [", number(r.t0, "%g"), ", ", number(r.t1, "%g"), "], ", std::to_string(r.dimension), " unknowns\n");
    append(s, "errors against: ", r.truth, "; error = max over ", std::to_string(r.output_times),
           " output times of max_i |e_i| / (atol + rtol |y_i|), atol ", number(r.norm.atol, "%g"), ", rtol ", number(r.norm.rtol, "%g"),
           "\n");
    append(s, padded("method", 30, true), padded("setting", 16, true), padded("error", 11, false), padded("evaluations", 13, false),
           padded("steps", 9, false), padded("s/run", 11, false), "  front / status\n");
    for (std::size_t i = 0; i < r.points.size(); ++i) {
        const auto& p = r.points[i];
        append(s, padded(p.method, 30, true), padded(setting_text(p.setting), 16, true), padded(number(p.error), 11, false),
               padded(std::to_string(p.evaluations), 13, false), padded(std::to_string(p.steps), 9, false),
               padded(number(p.seconds_median, "%.2e"), 11, false), "  ");
        if (!p.ok()) {
            s += to_string(p.status);
            s += ": ";
            s += p.message;
        } else if (on_front[i]) {
            s += "* Pareto front";
        }
        s += "\n";
    }
    s += answer;
    s += stepcert::estimate_caution;
    s += "\n";
    return s;
}

std::string sweep_chart(const stepcert::sweep_result& r, double target) {
    std::vector<stepcert::chart_series> series;
    for (std::size_t m = 0; m < r.methods.size(); ++m) {
        stepcert::chart_series c{r.methods[m], {}, {}};
        for (const auto& p : r.points_of(m))
            if (p.ok()) {
                c.cost.push_back(static_cast<double>(p.evaluations));
                c.error.push_back(p.error);
            }
        series.push_back(std::move(c));
    }
    stepcert::chart_options opt;
    opt.title = cat("cost against accuracy: ", r.problem);
    if (target > 0.0) opt.target = target;
    return stepcert::cost_accuracy_svg(series, opt);
}

/// One paragraph answering the cheapest method for the target; sets `met`.
template <class Sweep>
std::string cheapest_text(Sweep& sweep, const stepcert::sweep_result& r, double target, bool& met) {
    std::string s = cat("cheapest method for target error ", number(target, "%g"), ": ");
    try {
        const stepcert::cheapest_answer a = stepcert::cheapest_method(sweep, r, target);
        met = a.target_met;
        append(s, a.method(), " at ", setting_text(a.prediction.setting), " (predicted ",
               number(a.prediction.predicted_evaluations, "%.0f"), " evaluations)\n");
        append(s, "  confirmed by a run: ", setting_text(a.confirmation.setting), ", error ", number(a.confirmation.error), ", ",
               std::to_string(a.confirmation.evaluations), " evaluations; target ", met ? "met" : "NOT met", " after ",
               std::to_string(a.tries), a.tries == 1 ? " run\n" : " runs\n");
    } catch (const stepcert::accuracy_unreachable& e) {
        met = false;
        s += "none: ";
        s += e.what();
        s += "\n";
    }
    return s;
}

} // namespace

int run_compare(const compare_request& q) {
    for (std::size_t i = 0; i < q.methods.size(); ++i)
        for (std::size_t k = 0; k < i; ++k)
            if (q.methods[i] == q.methods[k])
                throw stepcert::invalid_input(cat("method '", q.methods[i], "' is given twice; give each --method once."));
    const problem_entry& info = problem_info(q.problem);
    const any_problem problem = make_problem(q.problem, q.t_end);
    std::vector<any_method> methods;
    for (const auto& name : q.methods) methods.push_back(make_method(name));

    stepcert::sweep_options opt;
    opt.output_times = q.output_times;
    opt.norm = stepcert::weighted_norm{q.norm.atol, q.norm.rtol, stepcert::norm_kind::max};
    opt.repeats = q.repeats;
    opt.threads = q.threads;
    if (q.progress) opt.progress = stepcert::terminal_progress("stepcert_cli compare");

    // Ladders: step counts doubling from the problem's coarsest (a multiple of the output times),
    // controller tolerances falling tenfold from --coarsest-tolerance.
    const std::size_t G = q.output_times;
    const std::size_t n0 = q.coarsest_steps > 0 ? q.coarsest_steps : info.study_coarsest_steps;
    std::vector<std::size_t> steps;
    std::vector<double> tolerances;
    for (std::size_t k = 0; k < q.points; ++k) {
        steps.push_back((((n0 << k) + G - 1) / G) * G);
        tolerances.push_back(q.coarsest_tolerance * std::pow(10.0, -static_cast<double>(k)));
    }

    bool met = true;
    std::string answer;
    const stepcert::sweep_result result = std::visit(
        [&](const auto& p) {
            stepcert::cost_accuracy_sweep sweep(p, opt);
            for (const any_method& method : methods)
                std::visit(
                    [&](const auto& m) {
                        if constexpr (stepcert::fixed_step_method<std::remove_cvref_t<decltype(m)>>)
                            sweep.add_fixed_step(m, steps);
                        else
                            sweep.add_adaptive(m, tolerances);
                    },
                    method);
            stepcert::sweep_result r = sweep.run();
            if (q.target_error > 0.0) answer = cheapest_text(sweep, r, q.target_error, met);
            return r;
        },
        problem);

    if (q.format == "json")
        deliver(cat(stepcert::sweep_to_json(result).dump(2), "\n"), q.output);
    else if (q.format == "csv")
        deliver(stepcert::sweep_csv(result), q.output);
    else if (q.format == "svg")
        deliver(sweep_chart(result, q.target_error), q.output);
    else
        deliver(sweep_table(result, answer), q.output);
    // The file stays one document; the answer goes beside it.
    if (q.format != "text" && !answer.empty()) std::cerr << answer;
    return met ? 0 : 1;
}

} // namespace stepcert_cli
