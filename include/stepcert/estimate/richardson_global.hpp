#pragma once
// Richardson estimate of the global error of a fixed-step run with n steps, from the same
// method run with 2n steps: with y_n - y = C h^p + O(h^(p+1)) at every grid time,
//   y_n - y ~ 2^p / (2^p - 1) (y_n - y_2n)
// (E. Hairer, S. P. Nørsett, G. Wanner, Solving ODEs I, §II.4 — from memory; sign: computed
// minus exact). p is the declared order, or, on request, the order observed from a third run
// with 4n steps (three_level_order on the differences at the final time), so that a method
// outside its asymptotic range shows itself instead of being trusted. The result says whether the
// observed order agrees with the declared one and whether the differences are down at round-off;
// an estimate failing either is not a valid Richardson estimate (the certification refuses it).
#include <algorithm>
#include <cmath>
#include <cstddef>
#include <limits>
#include <string>
#include <type_traits>
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

template <class T = void, problem_like P, fixed_step_method M>
global_error_estimate richardson_global_error(const P& p, const M& m, std::size_t n, const global_error_options& opt = {}) {
    using Tr = std::conditional_t<std::is_void_v<T>, typename P::scalar_type, T>;
    const std::string who = "stepcert::richardson_global_error: ";
    opt.norm.validate();
    if (n == 0) throw invalid_input(who + "the number of steps must be at least 1.");
    if (!(opt.order_tolerance > 0.0) || !std::isfinite(opt.order_tolerance) || !(opt.round_off_factor >= 0.0) ||
        !std::isfinite(opt.round_off_factor))
        throw invalid_input(who + "order_tolerance must be finite and > 0, round_off_factor finite and >= 0.");
    if (opt.grid_points == 0 || n % opt.grid_points != 0)
        throw invalid_input(who + "the grid of " + std::to_string(opt.grid_points) + " points must divide the " +
                            std::to_string(n) + " steps (the runs compare states at common times).");
    if (m.order() <= 0)
        throw invalid_input(who + "method '" + std::string(m.name()) + "' declares no positive order (p = " +
                            std::to_string(m.order()) + "); Richardson's factor 2^p/(2^p - 1) needs p >= 1.");
    global_error_estimate out;
    out.problem = p.name();
    out.method = std::string(m.name());
    out.steps = n;
    out.declared_order = m.order();
    out.norm = opt.norm;
    run_options ro;
    ro.max_evaluations = opt.max_evaluations;
    const auto coarse = run_uniform<Tr>(p, m, n, n / opt.grid_points, ro);
    ro.max_evaluations -= std::min(ro.max_evaluations, coarse.stats.evaluations);
    const auto fine = run_uniform<Tr>(p, m, 2 * n, 2 * n / opt.grid_points, ro);
    out.cost.steps = coarse.stats.steps + fine.stats.steps;
    out.cost.evaluations = coarse.stats.evaluations + fine.stats.evaluations;
    double order = out.declared_order;
    // Rounding accumulates relative to the largest state of the run, not the final one (a
    // decaying solution keeps the rounding of its early values).
    auto floor_of = [&](std::size_t steps, const auto& run) {
        double scale = 0.0;
        for (const auto& y : run.states) scale = std::max(scale, opt.norm.of_difference(y, y));
        return round_off_floor(opt.round_off_factor, steps, static_cast<double>(std::numeric_limits<Tr>::epsilon()), scale);
    };
    out.round_off_limited = opt.norm(coarse.final_state(), fine.final_state()) <= floor_of(2 * n, fine);
    if (opt.observe_order) {
        ro.max_evaluations -= std::min(ro.max_evaluations, fine.stats.evaluations);
        const auto finer = run_uniform<Tr>(p, m, 4 * n, 4 * n / opt.grid_points, ro);
        out.cost.steps += finer.stats.steps;
        out.cost.evaluations += finer.stats.evaluations;
        const double h = static_cast<double>(p.t1() - p.t0()) / static_cast<double>(n);
        const double d_ab = opt.norm(coarse.final_state(), fine.final_state());
        const double d_bc = opt.norm(fine.final_state(), finer.final_state());
        out.round_off_limited = out.round_off_limited || d_bc <= floor_of(4 * n, finer);
        out.observed_order = three_level_order(h, h / 2, h / 4, d_ab, d_bc);
        out.order_observed = true;
        // No convergence seen (differences not shrinking): the declared order stays in the
        // factor, and the estimate is marked inconsistent.
        if (std::isfinite(out.observed_order) && out.observed_order > 0.0) order = out.observed_order;
        out.order_consistent = std::isfinite(out.observed_order) && std::abs(out.observed_order - out.declared_order) <= opt.order_tolerance;
    }
    out.order_used = order;
    const double factor = std::exp2(order) / (std::exp2(order) - 1.0);
    const std::size_t dim = state_size(coarse.final_state());
    std::vector<double> e(dim);
    for (std::size_t j = 1; j < coarse.states.size(); ++j) {
        const auto& a = coarse.states[j];
        const auto& b = fine.states[j];
        for (std::size_t i = 0; i < dim; ++i) e[i] = factor * static_cast<double>(a[i] - b[i]);
        const double size = opt.norm.of_difference(e, a);
        if (!std::isfinite(size))
            throw non_finite_value(who + "the estimate at t = " + detail::time_text(coarse.times[j]) + " is not finite.");
        out.times.push_back(static_cast<double>(coarse.times[j]));
        out.estimate.push_back(size);
        if (opt.keep_vectors) out.vectors.push_back(e);
    }
    return out;
}

} // namespace stepcert
