#pragma once
// The true global error of a fixed-step run at the grid times, the ground truth the global
// estimates are judged by: against the exact solution when the problem has one (evaluated in
// 50 digits when it is generic), else against a multiprecision reference_solution on the grid.
// Same result type as the estimates, so effectivity() compares them directly.
#include <cstddef>
#include <string>
#include <type_traits>
#include <vector>

#include "stepcert/core/concepts.hpp"
#include "stepcert/core/error.hpp"
#include "stepcert/core/problem.hpp"
#include "stepcert/estimate/richardson_global.hpp"
#include "stepcert/methods/method.hpp"
#include "stepcert/reference/exact_evaluation.hpp"
#include "stepcert/reference/reference_grid.hpp"
#include "stepcert/reference/reference_solution.hpp"
#include "stepcert/run/run.hpp"

namespace stepcert {

template <class T = void, class Real = default_reference_real, problem_like P, fixed_step_method M>
global_error_estimate true_global_error(const P& p, const M& m, std::size_t n, const global_error_options& opt = {},
                                        int reference_digits = 24) {
    using Tr = std::conditional_t<std::is_void_v<T>, typename P::scalar_type, T>;
    const std::string who = "stepcert::true_global_error: ";
    opt.norm.validate();
    detail::refuse_breakpoints(p, "stepcert::true_global_error");
    if (n == 0 || opt.grid_points == 0 || n % opt.grid_points != 0)
        throw invalid_input(who + "give n >= 1 steps and a grid of points that divides n.");
    global_error_estimate out;
    out.problem = p.name();
    out.method = std::string(m.name());
    out.steps = n;
    out.declared_order = m.order();
    out.order_used = m.order();
    out.norm = opt.norm;
    run_options ro;
    ro.max_evaluations = opt.max_evaluations;
    const auto run = run_uniform<Tr>(p, m, n, n / opt.grid_points, ro);
    out.cost = run.stats;
    const std::size_t G = opt.grid_points;
    auto record = [&](std::size_t j, const auto& exact) {
        const auto& y = run.states[j];
        out.times.push_back(static_cast<double>(run.times[j]));
        out.estimate.push_back(opt.norm(y, exact));
        if (opt.keep_vectors) {
            using W = wider_scalar_t<scalar_of<std::decay_t<decltype(y)>>, scalar_of<std::decay_t<decltype(exact)>>>;
            std::vector<double> e(state_size(y));
            for (std::size_t i = 0; i < e.size(); ++i) e[i] = static_cast<double>(static_cast<W>(y[i]) - static_cast<W>(exact[i]));
            out.vectors.push_back(std::move(e));
        }
    };
    if constexpr (P::has_exact) {
        using X = detail::exact_real_for<P, Tr>;
        using SX = rebind_state<typename P::state_type, X>;
        const std::vector<X> times = uniform_times{G}.in<X>(static_cast<X>(p.t0()), static_cast<X>(p.t1()));
        SX exact = state_traits<SX>::make(p.dimension());
        for (std::size_t j = 1; j <= G; ++j) {
            p.exact()(times[j - 1], exact);
            record(j, exact);
        }
    } else {
        const auto ref = detail::vouched_uniform_reference<Real>(p, reference_digits, G, "stepcert::true_global_error");
        for (std::size_t j = 1; j <= G; ++j) record(j, ref.states[j - 1]);
    }
    return out;
}

} // namespace stepcert
