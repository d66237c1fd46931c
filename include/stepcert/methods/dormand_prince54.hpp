#pragma once
// Dormand–Prince 5(4) (J. R. Dormand, P. J. Prince, J. Comput. Appl. Math. 6 (1980) 19–26)
// through odeint's runge_kutta_dopri5: seven stages, the last one first-same-as-last, so six
// new evaluations per step plus one for the very first derivative. Both variants advance with
// the fifth-order solution; the adaptive one uses dense output, so output times cut no steps.
#include "stepcert/methods/odeint_types.hpp"

#include <boost/numeric/odeint/stepper/runge_kutta_dopri5.hpp>

#include "stepcert/methods/odeint_dense_output.hpp"
#include "stepcert/methods/odeint_fixed_step.hpp"

namespace stepcert {
namespace odeint_stepper {
template <class S, class Algebra = default_algebra<S>, class Operations = default_operations<S>>
using dopri5 = boost::numeric::odeint::runge_kutta_dopri5<S, scalar_of<S>, S, scalar_of<S>, Algebra, Operations>;
} // namespace odeint_stepper

namespace detail {
template <class S>
using odeint_dopri5_default = odeint_stepper::dopri5<S>;
}

/// Dormand–Prince 5(4) with a fixed step: order 5, 6 evaluations per step + 1 at the start.
inline constexpr odeint_fixed_step<detail::odeint_dopri5_default> dormand_prince54{"Dormand-Prince 5(4)", 5};

/// Dormand–Prince 5(4) with step control and dense output: order 5; 6 evaluations per step
/// attempt (accepted or rejected) + 1 at the start (+ 1 for the automatic starting step).
inline constexpr odeint_dense_output<detail::odeint_dopri5_default, 5> dormand_prince54_adaptive{
    "Dormand-Prince 5(4) adaptive", 5};

} // namespace stepcert
