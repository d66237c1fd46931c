#pragma once
// Step doubling (Richardson) estimate of the local error of a one-step method of order p: from
// each state of the run, one step of h gives y_h and two steps of h/2 give y_h/2; then
//   y_h - y(t + h) ~ 2^p / (2^p - 1) (y_h - y_h/2)
// (E. Hairer, S. P. Nørsett, G. Wanner, Solving ODEs I, §II.4 — from memory). The run goes on
// with y_h, so the profile belongs to the fixed-step run with n steps. Cost: three steps' worth
// of evaluations per step.
#include <cstddef>
#include <type_traits>

#include "stepcert/core/concepts.hpp"
#include "stepcert/core/problem.hpp"
#include "stepcert/estimate/detail/local_error_walk.hpp"
#include "stepcert/estimate/local_error.hpp"
#include "stepcert/methods/method.hpp"
#include "stepcert/run/counted_rhs.hpp"
#include "stepcert/run/run.hpp"

namespace stepcert {

/// Per-step local error of `m` over n uniform steps on p's interval, estimated by step
/// doubling, in scalar T (default: the problem's).
template <class T = void, problem_like P, fixed_step_method M>
local_error_profile step_doubling_profile(const P& p, const M& m, std::size_t n, const local_error_options& opt = {}) {
    using Tr = std::conditional_t<std::is_void_v<T>, typename P::scalar_type, T>;
    using S = rebind_state<typename P::state_type, Tr>;
    constexpr const char* who = "stepcert::step_doubling_profile";
    detail::require_rhs_in<P, Tr>(p);
    detail::require_one_step_method<M>();
    local_error_profile out =
        detail::start_local_error_profile(p, m, n, opt, local_error_estimator::step_doubling, m.order(), who);
    const Tr t0 = static_cast<Tr>(p.t0());
    const Tr h = (static_cast<Tr>(p.t1()) - t0) / static_cast<Tr>(n);
    const typename P::rhs_type local_rhs = p.rhs();
    counted_rhs<typename P::rhs_type> rhs{&local_rhs, &out.cost.evaluations, opt.max_evaluations};
    auto ignore = [](const S&, const Tr&) {};
    Tr two_p(1);
    for (int k = 0; k < out.order; ++k) two_p *= 2;
    const Tr scale = two_p / (two_p - Tr(1));
    S y = convert_state<S>(p.y0());
    S whole = y, halves = y, diff = y;
    for (std::size_t j = 0; j < n; ++j) {
        const Tr t = t0 + static_cast<Tr>(j) * h;
        whole = y;
        m.integrate_uniform(rhs, whole, t, h, 1, 1, ignore);
        halves = y;
        m.integrate_uniform(rhs, halves, t, h / 2, 2, 2, ignore);
        for (std::size_t i = 0; i < state_size(y); ++i) diff[i] = scale * (whole[i] - halves[i]);
        detail::record_local_error(out, opt, t, h, diff, whole, who);
        y = whole;
    }
    out.cost.steps = 3 * n;
    return out;
}

} // namespace stepcert
