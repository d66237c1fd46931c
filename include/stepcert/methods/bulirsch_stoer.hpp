#pragma once
// Bulirsch–Stoer extrapolation (modified midpoint + polynomial extrapolation, Deuflhard's order
// and step control) through odeint's controlled bulirsch_stoer. It changes its extrapolation
// order from step to step, so it has no single order: order() is 0 and variable_order is true,
// and order studies must skip the order comparison for it. It steps to every output time
// (odeint's bulirsch_stoer_dense_out does not expose its rejected steps); ask for few output
// times when cost matters. Its actual error runs well above the tolerance (10-300x measured,
// ../shared/reference-values.md §12): ask for about 1000x tighter than the accuracy wanted.
#include "stepcert/methods/odeint_types.hpp"

#include <boost/numeric/odeint/stepper/bulirsch_stoer.hpp>

#include "stepcert/core/state.hpp"
#include "stepcert/methods/method.hpp"
#include "stepcert/methods/odeint_controlled.hpp"

namespace stepcert {
namespace odeint_stepper {
template <class S, class Algebra = default_algebra<S>, class Operations = default_operations<S>>
using bulirsch_stoer = boost::numeric::odeint::bulirsch_stoer<S, scalar_of<S>, S, scalar_of<S>, Algebra, Operations>;
} // namespace odeint_stepper

namespace detail {
template <class S>
using odeint_bulirsch_stoer_default = odeint_stepper::bulirsch_stoer<S>;

/// Policy for odeint_controlled; odeint's error scale is atol + rtol (|y_i| + h |y'_i|) as for Runge–Kutta.
template <template <class State> class StepperFor>
struct bulirsch_stoer_controller {
    static constexpr bool variable_order = true;
    static constexpr int starting_order = 8;  // for the starting-step rule only

    template <class S>
    static auto make(const controller_tolerance& tol) {
        using T = scalar_of<S>;
        return StepperFor<S>(static_cast<T>(tol.atol), static_cast<T>(tol.rtol));
    }
};
} // namespace detail

/// Bulirsch–Stoer with odeint's order and step control; variable order (order() == 0).
/// Evaluations per step vary with the extrapolation order used; f(t, y) at a step's start is
/// reused by its rejected attempts.
inline constexpr odeint_controlled<detail::bulirsch_stoer_controller<detail::odeint_bulirsch_stoer_default>>
    bulirsch_stoer_adaptive{"Bulirsch-Stoer adaptive", 0};

} // namespace stepcert
