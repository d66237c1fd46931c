#pragma once
// Adaptive Gragg–Bulirsch–Stoer extrapolation of fixed order: odeint's extrapolation_stepper
// (modified midpoint rule on the step sequence 2, 4, ..., Order, polynomial extrapolation,
// embedded error estimate of order Order - 2) under odeint's controlled_runge_kutta, driven by
// the methods' shared adaptive loop (steps cut to land on output times; no interpolation).
// reference_solution uses it because it measured cheaper than odeint's bulirsch_stoer at
// 25-35 digits (bench/bench_reference_cost.cpp, one Arenstorf period in cpp_bin_float_38):
// 31.8k evaluations against 38.2k at tolerance 1e-28, 41.5k against 73.3k at 1e-31, and
// 2.3 us per evaluation against 3.5 us (odeint's bulirsch_stoer driven by integrate_adaptive).
// Order 20 suits types of 20+ digits; in double and long double round-off in the extrapolation
// table grows with the order, and order 12 measured best there.
#include "stepcert/methods/odeint_types.hpp"

#include <boost/numeric/odeint/stepper/extrapolation_stepper.hpp>

#include "stepcert/core/state.hpp"
#include <boost/numeric/odeint/stepper/controlled_runge_kutta.hpp>
#include "stepcert/methods/odeint_controlled.hpp"

namespace stepcert {
namespace odeint_stepper {
template <unsigned short Order, class S, class Algebra = default_algebra<S>, class Operations = default_operations<S>>
using extrapolation =
    boost::numeric::odeint::extrapolation_stepper<Order, S, scalar_of<S>, S, scalar_of<S>, Algebra, Operations>;
} // namespace odeint_stepper

namespace detail {
/// Policy for odeint_controlled: controlled_runge_kutta around extrapolation_stepper<Order>.
template <unsigned short Order>
struct extrapolation_controller {
    static constexpr bool variable_order = false;
    static constexpr int starting_order = Order;

    template <class S>
    static auto make(const controller_tolerance& tol) {
        using controlled = boost::numeric::odeint::controlled_runge_kutta<odeint_stepper::extrapolation<Order, S>>;
        using T = scalar_of<S>;
        // controlled_runge_kutta copies a default-constructed stepper whose scratch states are not
        // yet written; for std::array of built-in floats g++ 12 then warns (maybe-uninitialized)
        // in some inlining contexts. The scratch is always written before it is read.
#if defined(__GNUC__) && !defined(__clang__)
#pragma GCC diagnostic push
#pragma GCC diagnostic ignored "-Wmaybe-uninitialized"
#endif
        return controlled(typename controlled::error_checker_type(static_cast<T>(tol.atol), static_cast<T>(tol.rtol)));
#if defined(__GNUC__) && !defined(__clang__)
#pragma GCC diagnostic pop
#endif
    }
};
} // namespace detail

/// Extrapolation of order 20 with step control: the reference's method for types of 20+ digits.
/// 110 evaluations per attempted step (the step sequence 2 + 4 + ... + 20), plus f at each accepted point.
inline constexpr odeint_controlled<detail::extrapolation_controller<20>> extrapolation20_adaptive{
    "GBS extrapolation order 20 (odeint extrapolation_stepper) adaptive", 20};

/// Extrapolation of order 12 with step control: the reference's method in double and long double.
inline constexpr odeint_controlled<detail::extrapolation_controller<12>> extrapolation12_adaptive{
    "GBS extrapolation order 12 (odeint extrapolation_stepper) adaptive", 12};

} // namespace stepcert
