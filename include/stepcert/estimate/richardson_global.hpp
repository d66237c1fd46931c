#pragma once
// Richardson estimate of the global error of a fixed-step run with n steps, from the same
// method run with more steps m = r n: with y_n - y = C h^p + O(h^(p+1)) at every grid time,
//   y_n - y ~ r^p / (r^p - 1) (y_n - y_m)
// (E. Hairer, S. P. Nørsett, G. Wanner, Solving ODEs I, §II.4 — from memory; sign: computed
// minus exact). p is the declared order, or, on request, the order observed from a third run
// (three_level_order on the differences at the final time), so that a method outside its
// asymptotic range shows itself instead of being trusted. richardson_global_error(p, m, n) uses
// the runs n, 2n (and 4n); richardson_global_errors(p, m, {n_0, n_1, ...}) estimates every level
// of a ladder of step counts from the next one. The result says whether the
// observed order agrees with the declared one and whether the differences are down at round-off;
// an estimate failing either is not a valid Richardson estimate (the certification refuses it).
#include <algorithm>
#include <cmath>
#include <cstddef>
#include <limits>
#include <string>
#include <type_traits>
#include <utility>
#include <vector>

#include "stepcert/core/concepts.hpp"
#include "stepcert/core/error.hpp"
#include "stepcert/core/norm.hpp"
#include "stepcert/core/problem.hpp"
#include "stepcert/estimate/global_error.hpp"
#include "stepcert/methods/method.hpp"
#include "stepcert/run/run.hpp"
#include "stepcert/study/richardson.hpp"

namespace stepcert {

namespace detail {

inline void check_richardson_options(const global_error_options& opt, const std::string& who) {
    opt.norm.validate();
    if (!(opt.order_tolerance > 0.0) || !std::isfinite(opt.order_tolerance) || !(opt.round_off_factor >= 0.0) ||
        !std::isfinite(opt.round_off_factor))
        throw invalid_input(who + "order_tolerance must be finite and > 0, round_off_factor finite and >= 0.");
}

} // namespace detail

/// Richardson estimates for a ladder of step counts n_0 < n_1 < ...: entry k estimates the global
/// error of the run with n_k steps from the run with n_(k+1) (so one entry fewer than levels). With
/// observe_order, entry k uses the order observed from n_k, n_(k+1), n_(k+2) (the last entry, which
/// has no third finer level, the one of the last three levels). Needs at least 2 levels, 3 to
/// observe the order; the grid of G points must divide every n_k.
template <class T = void, problem_like P, fixed_step_method M>
std::vector<global_error_estimate> richardson_global_errors(const P& p, const M& m, const std::vector<std::size_t>& steps,
                                                            const global_error_options& opt = {}) {
    using Tr = std::conditional_t<std::is_void_v<T>, typename P::scalar_type, T>;
    const std::string who = "stepcert::richardson_global_errors: ";
    detail::check_richardson_options(opt, who);
    detail::refuse_breakpoints(p, "stepcert::richardson_global_errors");
    const std::size_t needed = opt.observe_order ? 3 : 2;
    if (steps.size() < needed)
        throw invalid_input(who + "the ladder has " + std::to_string(steps.size()) + " level(s); Richardson's estimate needs " +
                            std::to_string(needed) + (opt.observe_order ? " (two differences to observe the order)" : " (one difference)") +
                            ": add finer levels.");
    for (std::size_t k = 0; k < steps.size(); ++k) {
        if (steps[k] == 0 || (k > 0 && steps[k] <= steps[k - 1]))
            throw invalid_input(who + "the step counts must be >= 1 and increase strictly from level to level.");
        if (opt.grid_points == 0 || steps[k] % opt.grid_points != 0)
            throw invalid_input(who + "the grid of " + std::to_string(opt.grid_points) + " points must divide the " +
                                std::to_string(steps[k]) + " steps of level " + std::to_string(k) +
                                " (the runs compare states at common times).");
    }
    if (m.order() <= 0)
        throw invalid_input(who + "method '" + std::string(m.name()) + "' declares no positive order (p = " +
                            std::to_string(m.order()) + "); Richardson's factor r^p/(r^p - 1) needs p >= 1.");
    using Run = decltype(run_uniform<Tr>(p, m, steps[0], steps[0] / opt.grid_points, run_options{}));
    std::vector<Run> runs;
    run_options ro;
    ro.max_evaluations = opt.max_evaluations;
    for (std::size_t n : steps) {
        runs.push_back(run_uniform<Tr>(p, m, n, n / opt.grid_points, ro));
        ro.max_evaluations -= std::min(ro.max_evaluations, runs.back().stats.evaluations);
    }
    const double length = static_cast<double>(p.t1() - p.t0());
    auto h_of = [&](std::size_t k) { return length / static_cast<double>(steps[k]); };
    // Rounding accumulates relative to the largest state of the run, not the final one (a
    // decaying solution keeps the rounding of its early values).
    auto floor_of = [&](std::size_t k) {
        double scale = 0.0;
        for (const auto& y : runs[k].states) scale = std::max(scale, opt.norm.of_difference(y, y));
        return round_off_floor(opt.round_off_factor, steps[k], static_cast<double>(std::numeric_limits<Tr>::epsilon()), scale);
    };
    auto final_difference = [&](std::size_t k) { return opt.norm(runs[k].final_state(), runs[k + 1].final_state()); };
    std::vector<global_error_estimate> out;
    for (std::size_t k = 0; k + 1 < steps.size(); ++k) {
        global_error_estimate e;
        e.problem = p.name();
        e.method = std::string(m.name());
        e.steps = steps[k];
        e.declared_order = m.order();
        e.norm = opt.norm;
        e.cost.steps = runs[k].stats.steps + runs[k + 1].stats.steps;
        e.cost.evaluations = runs[k].stats.evaluations + runs[k + 1].stats.evaluations;
        e.round_off_limited = final_difference(k) <= floor_of(k + 1);
        double order = e.declared_order;
        if (opt.observe_order) {
            const std::size_t a = std::min(k, steps.size() - 3);  // the triple a, a+1, a+2
            if (a + 2 > k + 1) {
                e.cost.steps += runs[a + 2].stats.steps;
                e.cost.evaluations += runs[a + 2].stats.evaluations;
            }
            const double d_ab = final_difference(a), d_bc = final_difference(a + 1);
            e.round_off_limited = e.round_off_limited || d_bc <= floor_of(a + 2);
            e.observed_order = three_level_order(h_of(a), h_of(a + 1), h_of(a + 2), d_ab, d_bc);
            e.order_observed = true;
            // No convergence seen (differences not shrinking): the declared order stays in the
            // factor, and the estimate is marked inconsistent.
            if (std::isfinite(e.observed_order) && e.observed_order > 0.0) order = e.observed_order;
            e.order_consistent =
                std::isfinite(e.observed_order) && std::abs(e.observed_order - e.declared_order) <= opt.order_tolerance;
        }
        e.order_used = order;
        const double r_p = std::pow(static_cast<double>(steps[k + 1]) / static_cast<double>(steps[k]), order);
        const double factor = r_p / (r_p - 1.0);
        const auto& coarse = runs[k];
        const auto& fine = runs[k + 1];
        const std::size_t dim = state_size(coarse.final_state());
        std::vector<double> v(dim);
        for (std::size_t j = 1; j < coarse.states.size(); ++j) {
            const auto& ya = coarse.states[j];
            const auto& yb = fine.states[j];
            for (std::size_t i = 0; i < dim; ++i) v[i] = factor * static_cast<double>(ya[i] - yb[i]);
            const double size = opt.norm.of_difference(v, ya);
            if (!std::isfinite(size))
                throw non_finite_value(who + "the estimate at t = " + detail::time_text(coarse.times[j]) + " is not finite.");
            e.times.push_back(static_cast<double>(coarse.times[j]));
            e.estimate.push_back(size);
            if (opt.keep_vectors) e.vectors.push_back(v);
        }
        out.push_back(std::move(e));
    }
    return out;
}

/// The global error of the run with n steps, from the runs with n and 2n steps (and 4n with
/// observe_order): the first entry of richardson_global_errors on that ladder.
template <class T = void, problem_like P, fixed_step_method M>
global_error_estimate richardson_global_error(const P& p, const M& m, std::size_t n, const global_error_options& opt = {}) {
    if (n == 0) throw invalid_input("stepcert::richardson_global_error: the number of steps must be at least 1.");
    std::vector<std::size_t> ladder{n, 2 * n};
    if (opt.observe_order) ladder.push_back(4 * n);
    // The first entry's cost counts all the runs it rests on (the third one too).
    return std::move(richardson_global_errors<T>(p, m, ladder, opt).front());
}

} // namespace stepcert
