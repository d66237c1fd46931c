#pragma once
// The true local error of a one-step method, the ground truth the estimators are judged by: for
// each step of the uniform grid, one step of h from the reference state y(t_n) (rounded to the
// working type) compared with the reference y(t_n + h); the difference is formed in the wider
// of the two types. The reference comes from reference_solution on the same grid (computed here,
// or shared: one reference on a grid of G0 points serves every n dividing G0).
#include <cmath>
#include <cstddef>
#include <limits>
#include <string>
#include <type_traits>
#include <vector>

#include "stepcert/core/concepts.hpp"
#include "stepcert/core/error.hpp"
#include "stepcert/core/problem.hpp"
#include "stepcert/estimate/detail/local_error_walk.hpp"
#include "stepcert/estimate/local_error.hpp"
#include "stepcert/methods/method.hpp"
#include "stepcert/reference/reference_grid.hpp"
#include "stepcert/reference/reference_solution.hpp"
#include "stepcert/run/counted_rhs.hpp"
#include "stepcert/run/run.hpp"

namespace stepcert {

/// True local error of `m` on each of n uniform steps, from a shared reference whose times
/// include the grid t0 + j (t1 - t0)/n (compute it with reference_solution(p, digits,
/// uniform_times{G0}), G0 a multiple of n). Its cost is not counted in the profile's.
template <class T = void, problem_like P, fixed_step_method M, class RefState>
local_error_profile true_local_error_profile(const P& p, const M& m, std::size_t n, const reference_result<RefState>& reference,
                                             const local_error_options& opt = {}) {
    using Tr = std::conditional_t<std::is_void_v<T>, typename P::scalar_type, T>;
    using S = rebind_state<typename P::state_type, Tr>;
    using W = wider_scalar_t<Tr, scalar_of<RefState>>;
    constexpr const char* who = "stepcert::true_local_error_profile";
    detail::require_rhs_in<P, Tr>(p);
    detail::require_one_step_method<M>();
    local_error_profile out =
        detail::start_local_error_profile(p, m, n, opt, local_error_estimator::reference_truth, m.order(), who);
    const std::vector<std::size_t> at = detail::reference_grid_indices<Tr>(p, reference, n, who);
    const Tr t0 = static_cast<Tr>(p.t0());
    const Tr h = (static_cast<Tr>(p.t1()) - t0) / static_cast<Tr>(n);
    const typename P::rhs_type local_rhs = p.rhs();
    counted_rhs<typename P::rhs_type> rhs{&local_rhs, &out.cost.evaluations, opt.max_evaluations};
    auto ignore = [](const S&, const Tr&) {};
    S y = convert_state<S>(p.y0());
    std::vector<W> diff(state_size(y));
    // Relative uncertainty of the reference (its vouched digits) plus the rounding of its start
    // state to the working type, recorded per step so that bounds built on these errors hold.
    const double reference_uncertainty = std::pow(10.0, -reference.vouched_digits) +
                                         2.0 * static_cast<double>(std::numeric_limits<Tr>::epsilon());
    for (std::size_t j = 0; j < n; ++j) {
        const Tr t = t0 + static_cast<Tr>(j) * h;
        // From the reference state at t_j (y0 itself at j = 0) ...
        y = j == 0 ? convert_state<S>(p.y0()) : convert_state<S>(reference.states[at[j - 1]]);
        m.integrate_uniform(rhs, y, t, h, 1, 1, ignore);
        // ... to the reference at t_(j+1), subtracted in the wider type.
        const RefState& exact = reference.states[at[j]];
        for (std::size_t i = 0; i < diff.size(); ++i) diff[i] = static_cast<W>(y[i]) - static_cast<W>(exact[i]);
        detail::record_local_error(out, opt, t, h, diff, exact, who, reference_uncertainty);
    }
    out.cost.steps = n;
    return out;
}

/// As above, computing the reference on the grid with `digits` significant digits first (in
/// Real, default default_reference_real); throws accuracy_unreachable when it cannot vouch for them.
template <class T = void, class Real = default_reference_real, problem_like P, fixed_step_method M>
local_error_profile true_local_error_profile(const P& p, const M& m, std::size_t n, int digits = 24,
                                             const local_error_options& opt = {}) {
    if (n == 0) throw invalid_input("stepcert::true_local_error_profile: the number of steps must be at least 1.");
    const auto reference = detail::vouched_uniform_reference<Real>(p, digits, n, "stepcert::true_local_error_profile");
    return true_local_error_profile<T>(p, m, n, reference, opt);
}

} // namespace stepcert
