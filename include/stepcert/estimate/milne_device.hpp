#pragma once
// Milne's device for adams_bashforth_moulton<Steps> (PECE, predictor and corrector both of order
// p = Steps). With exact history, y(t+h) - y_p = C h^(p+1) y^(p+1) + ... and y(t+h) - y_c =
// C* h^(p+1) y^(p+1) + ..., so the corrector's local error in stepcert's sign (computed - exact) is
//   y_c - y(t+h) ~ -C*/(C - C*) (y_c - y_p)        (Steps = 4: +19/270 (y_c - y_p))
// (Milne's device: Hairer, Nørsett, Wanner, Solving ODEs I, §III.1 — from memory; the factor is
// usually quoted as C*/(C - C*) = -19/270 for the other sign, exact - computed). The estimate
// costs nothing beyond the run: y_p is a by-product of every PECE step.
// PECE evaluates the corrector at y_p instead of y(t+h), which adds h c_0 df/dy (y_p - y(t+h)) =
// O(h^(p+2)) to y_c, unequally to the estimate and to the true error: the effectivity is
// 1 + O(h ||df/dy||), not 1 + O(h^p).
// Records: only the multistep steps j = Steps-1, ..., n-1 (the start-up steps have no
// predictor), so the profile has n - Steps + 1 records; record i is the step from t_(Steps-1+i).
// The profile belongs to the method's own run (the same steps as run_uniform).
#include <cstddef>
#include <string>
#include <string_view>
#include <type_traits>

#include "stepcert/core/concepts.hpp"
#include "stepcert/core/error.hpp"
#include "stepcert/core/problem.hpp"
#include "stepcert/estimate/detail/adams_pece.hpp"
#include "stepcert/estimate/detail/local_error_walk.hpp"
#include "stepcert/estimate/local_error.hpp"
#include "stepcert/methods/adams_bashforth_moulton.hpp"
#include "stepcert/run/counted_rhs.hpp"
#include "stepcert/run/run.hpp"

namespace stepcert {

template <class M>
struct is_adams_bashforth_moulton : std::false_type {};
template <std::size_t Steps>
struct is_adams_bashforth_moulton<adams_bashforth_moulton_method<Steps>> : std::true_type {};

/// Methods with a predictor and a corrector of the same order, the pair Milne's device needs.
template <class M>
concept adams_predictor_corrector = is_adams_bashforth_moulton<std::remove_cvref_t<M>>::value;

namespace detail {
/// The start-up steps and one multistep step at least.
inline void require_multistep_steps(std::size_t n, std::size_t steps, std::string_view method, std::string_view who) {
    if (n < steps)
        throw invalid_input(std::string(who) + ": method '" + std::string(method) + "' needs at least " +
                            std::to_string(steps) + " steps (" + std::to_string(steps - 1) +
                            " start-up steps without a predictor, then multistep steps), got n = " + std::to_string(n) +
                            "; use more steps.");
}

/// The factor that turns y_c - y_p into the corrector's local error, computed - exact.
template <class T>
T milne_device_factor(std::size_t steps) {
    const auto c = adams_pece_error_constants<T>(steps);
    return -c.corrector / (c.predictor - c.corrector);
}
} // namespace detail

/// Per-step local error of adams_bashforth_moulton<Steps>'s run of n uniform steps on p's
/// interval, estimated by Milne's device, in scalar T (default: the problem's). n >= Steps.
template <class T = void, problem_like P, std::size_t Steps>
local_error_profile milne_local_error_profile(const P& p, adams_bashforth_moulton_method<Steps> m, std::size_t n,
                                              const local_error_options& opt = {}) {
    using Tr = std::conditional_t<std::is_void_v<T>, typename P::scalar_type, T>;
    using S = rebind_state<typename P::state_type, Tr>;
    constexpr const char* who = "stepcert::milne_local_error_profile";
    detail::require_rhs_in<P, Tr>(p);
    detail::require_multistep_steps(n, Steps, m.name(), who);
    local_error_profile out =
        detail::start_local_error_profile(p, m, n, opt, local_error_estimator::milne_device, m.order(), who);
    const Tr t0 = static_cast<Tr>(p.t0());
    const Tr h = (static_cast<Tr>(p.t1()) - t0) / static_cast<Tr>(n);
    const typename P::rhs_type local_rhs = p.rhs();
    counted_rhs<typename P::rhs_type> rhs{&local_rhs, &out.cost.evaluations, opt.max_evaluations};
    const Tr factor = detail::milne_device_factor<Tr>(Steps);
    S y = convert_state<S>(p.y0());
    S diff = y;
    detail::adams_pece_run<Steps>(rhs, y, t0, h, n, [&](const Tr& t, const S& predicted, const S& corrected) {
        for (std::size_t i = 0; i < state_size(diff); ++i) diff[i] = factor * (corrected[i] - predicted[i]);
        detail::record_local_error(out, opt, t, h, diff, corrected, who);
    });
    out.cost.steps = n;
    return out;
}

namespace detail {
/// What the refusing overload below returns: not a profile, so a requires-expression can tell it apart.
struct not_an_adams_predictor_corrector {};
} // namespace detail

/// Any other method: refused at compile time. Declared rather than left out so that the message
/// below, not a list of candidates, is what a caller sees.
template <class T = void, problem_like P, class M>
    requires(!adams_predictor_corrector<M>)
detail::not_an_adams_predictor_corrector milne_local_error_profile(const P&, const M&, std::size_t,
                                                                   const local_error_options& = {}) {
    static_assert(adams_predictor_corrector<M>,
                  "stepcert::milne_local_error_profile: Milne's device compares a predictor with a corrector of "
                  "the same order; it needs stepcert::adams_bashforth_moulton<Steps>. For a one-step method use "
                  "step_doubling_profile, or embedded_local_error_profile for an embedded pair.");
    return {};
}

} // namespace stepcert
