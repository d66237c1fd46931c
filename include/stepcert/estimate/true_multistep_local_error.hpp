#pragma once
// The true local error of adams_bashforth_moulton<Steps>, the ground truth Milne's device is
// judged by: for each multistep step j (j = Steps-1, ..., n-1), one PECE step of h from the
// reference history y(t_(j-Steps+1)), ..., y(t_j) (rounded to the working type, derivatives
// evaluated there) compared with the reference y(t_(j+1)); the difference is formed in the wider
// of the two types. Same records as milne_local_error_profile, so effectivity(milne, truth) works.
#include <cmath>
#include <cstddef>
#include <limits>
#include <string>
#include <type_traits>
#include <utility>
#include <vector>

#include "stepcert/core/concepts.hpp"
#include "stepcert/core/error.hpp"
#include "stepcert/core/problem.hpp"
#include "stepcert/estimate/detail/adams_pece.hpp"
#include "stepcert/estimate/detail/local_error_walk.hpp"
#include "stepcert/estimate/local_error.hpp"
#include "stepcert/estimate/milne_device.hpp"
#include "stepcert/methods/adams_bashforth_moulton.hpp"
#include "stepcert/reference/reference_grid.hpp"
#include "stepcert/reference/reference_solution.hpp"
#include "stepcert/run/counted_rhs.hpp"
#include "stepcert/run/run.hpp"

namespace stepcert {

/// True local error of adams_bashforth_moulton<Steps> on the multistep steps of n uniform steps,
/// from a shared reference whose times include the grid t0 + j (t1 - t0)/n (reference_solution(p,
/// digits, uniform_times{G0}), G0 a multiple of n). Its cost is not counted in the profile's.
template <class T = void, problem_like P, std::size_t Steps, class RefState>
local_error_profile true_multistep_local_error_profile(const P& p, adams_bashforth_moulton_method<Steps> m, std::size_t n,
                                                       const reference_result<RefState>& reference,
                                                       const local_error_options& opt = {}) {
    using Tr = std::conditional_t<std::is_void_v<T>, typename P::scalar_type, T>;
    using S = rebind_state<typename P::state_type, Tr>;
    using W = wider_scalar_t<Tr, scalar_of<RefState>>;
    constexpr const char* who = "stepcert::true_multistep_local_error_profile";
    detail::require_rhs_in<P, Tr>(p);
    detail::require_multistep_steps(n, Steps, m.name(), who);
    local_error_profile out =
        detail::start_local_error_profile(p, m, n, opt, local_error_estimator::reference_truth, m.order(), who);
    const std::vector<std::size_t> at = detail::reference_grid_indices<Tr>(p, reference, n, who);
    const Tr t0 = static_cast<Tr>(p.t0());
    const Tr h = (static_cast<Tr>(p.t1()) - t0) / static_cast<Tr>(n);
    const typename P::rhs_type local_rhs = p.rhs();
    counted_rhs<typename P::rhs_type> rhs{&local_rhs, &out.cost.evaluations, opt.max_evaluations};
    // The reference at t_k in the working type (y0 itself at k = 0).
    auto reference_at = [&](std::size_t k) { return k == 0 ? convert_state<S>(p.y0()) : convert_state<S>(reference.states[at[k - 1]]); };
    S y = convert_state<S>(p.y0());
    S predicted = y, slope = y, corrected = y;
    std::vector<W> diff(state_size(y));
    detail::derivative_history<S, Steps> f(y);
    const detail::adams_pece_weights<Steps, Tr> w(h);
    // As in true_local_error_profile: the reference's vouched digits plus the rounding of its
    // states (history and start) to the working type.
    const double reference_uncertainty = std::pow(10.0, -reference.vouched_digits) +
                                         2.0 * static_cast<double>(std::numeric_limits<Tr>::epsilon());
    for (std::size_t k = 0; k + 1 < Steps; ++k) rhs(reference_at(k), f.push_front(), t0 + static_cast<Tr>(k) * h);
    for (std::size_t j = Steps - 1; j < n; ++j) {
        const Tr t = t0 + static_cast<Tr>(j) * h;
        y = reference_at(j);
        rhs(std::as_const(y), f.push_front(), t);
        detail::adams_pece_step(rhs, w, y, f, t, h, predicted, slope, corrected);
        const RefState& exact = reference.states[at[j]];
        for (std::size_t i = 0; i < diff.size(); ++i) diff[i] = static_cast<W>(corrected[i]) - static_cast<W>(exact[i]);
        detail::record_local_error(out, opt, t, h, diff, exact, who, reference_uncertainty);
    }
    out.cost.steps = n - Steps + 1;
    return out;
}

/// As above, computing the reference on the grid with `digits` significant digits first (in
/// Real, default default_reference_real); throws accuracy_unreachable when it cannot vouch for them.
template <class T = void, class Real = default_reference_real, problem_like P, std::size_t Steps>
local_error_profile true_multistep_local_error_profile(const P& p, adams_bashforth_moulton_method<Steps> m, std::size_t n,
                                                       int digits = 24, const local_error_options& opt = {}) {
    detail::require_multistep_steps(n, Steps, m.name(), "stepcert::true_multistep_local_error_profile");
    const auto reference = detail::vouched_uniform_reference<Real>(p, digits, n, "stepcert::true_multistep_local_error_profile");
    return true_multistep_local_error_profile<T>(p, m, n, reference, opt);
}

} // namespace stepcert
