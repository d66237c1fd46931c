#pragma once
// The embedded pair's estimate of the local error, step by step along a fixed-step run of an
// explicit tableau with embedded weights: err = h sum_i (b_i - b_hat_i) k_i = y - y_hat. It
// estimates the local error of the lower-order solution of the pair (order min(p, p_hat)), not
// that of the propagated one when the propagated one is the higher (local extrapolation, as in
// Dormand–Prince and Cash–Karp): the profile's order and power say which. No extra evaluations.
#include <algorithm>
#include <cstddef>
#include <type_traits>
#include <utility>

#include "stepcert/core/concepts.hpp"
#include "stepcert/core/problem.hpp"
#include "stepcert/estimate/detail/local_error_walk.hpp"
#include "stepcert/estimate/local_error.hpp"
#include "stepcert/methods/adaptive_tableau_method.hpp"
#include "stepcert/methods/tableau_error_stepper.hpp"
#include "stepcert/run/counted_rhs.hpp"
#include "stepcert/run/run.hpp"
#include "stepcert/tableau/tableau.hpp"

namespace stepcert {

/// The lower-order solution of an embedded pair as a tableau of its own (b := b_hat), e.g. to
/// take its true local error with true_local_error_profile(p, tableau_method(...), n).
template <class C>
tableau<C> embedded_solution_tableau(const tableau<C>& tab) {
    detail::require_explicit_tableau(tab, "embedded_solution_tableau", true);
    if (tab.claimed_embedded_order >= tab.claimed_order) return tab;  // b is already the lower-order one
    tableau<C> out = tab;
    out.name = tab.name + " (embedded solution)";
    out.b = *tab.b_embedded;
    out.claimed_order = tab.claimed_embedded_order;
    out.b_embedded.reset();
    out.claimed_embedded_order = 0;
    return out;
}

/// Per-step embedded error estimate over n uniform steps of the pair `tab` (propagating b).
template <class T = void, problem_like P, class C>
local_error_profile embedded_local_error_profile(const P& p, const tableau<C>& tab, std::size_t n,
                                                 const local_error_options& opt = {}) {
    using Tr = std::conditional_t<std::is_void_v<T>, typename P::scalar_type, T>;
    using S = rebind_state<typename P::state_type, Tr>;
    constexpr const char* who = "stepcert::embedded_local_error_profile";
    detail::require_rhs_in<P, Tr>(p);
    const auto method = adaptive_tableau_method(tab);  // validates: explicit, embedded weights present
    local_error_profile out = detail::start_local_error_profile(p, method, n, opt, local_error_estimator::embedded_pair,
                                                                std::min(tab.claimed_order, tab.claimed_embedded_order), who);
    out.method = tab.name;
    const Tr t0 = static_cast<Tr>(p.t0());
    const Tr h = (static_cast<Tr>(p.t1()) - t0) / static_cast<Tr>(n);
    const typename P::rhs_type local_rhs = p.rhs();
    counted_rhs<typename P::rhs_type> rhs{&local_rhs, &out.cost.evaluations, opt.max_evaluations};
    S y = convert_state<S>(p.y0());
    S dydt = y, next = y, err = y;
    tableau_error_stepper<S> stepper(tab, state_size(y));
    rhs(static_cast<const S&>(y), dydt, t0);
    for (std::size_t j = 0; j < n; ++j) {
        const Tr t = t0 + static_cast<Tr>(j) * h;
        stepper.do_step(rhs, y, dydt, t, next, h, err);
        detail::record_local_error(out, opt, t, h, err, next, who);
        std::swap(y, next);
        if (j + 1 < n && !stepper.derivative_at_end(dydt)) rhs(static_cast<const S&>(y), dydt, t0 + static_cast<Tr>(j + 1) * h);
    }
    out.cost.steps = n;
    return out;
}

} // namespace stepcert
