#pragma once
// Fehlberg 7(8) (E. Fehlberg, NASA TR R-287, 1968) through odeint's runge_kutta_fehlberg78:
// thirteen stages, thirteen evaluations per step. Both variants advance with the eighth-order
// solution; the adaptive one controls the step with the embedded seventh-order one.
#include "stepcert/methods/odeint_types.hpp"

#include <boost/numeric/odeint/stepper/runge_kutta_fehlberg78.hpp>

#include "stepcert/methods/odeint_controlled.hpp"
#include "stepcert/methods/odeint_fixed_step.hpp"
#include "stepcert/methods/odeint_rk_controller.hpp"

namespace stepcert {
namespace odeint_stepper {
template <class S, class Algebra = default_algebra<S>, class Operations = default_operations<S>>
using fehlberg78 = boost::numeric::odeint::runge_kutta_fehlberg78<S, scalar_of<S>, S, scalar_of<S>, Algebra, Operations>;
} // namespace odeint_stepper

namespace detail {
template <class S>
using odeint_fehlberg78_default = odeint_stepper::fehlberg78<S>;
}

/// Fehlberg 7(8) with a fixed step: order 8, 13 evaluations per step.
inline constexpr odeint_fixed_step<detail::odeint_fehlberg78_default> fehlberg78{"Fehlberg 7(8)", 8};

/// Fehlberg 7(8) with odeint's step control: order 8; 13 evaluations per accepted step, 12 per rejected one.
inline constexpr odeint_controlled<odeint_rk_controller<detail::odeint_fehlberg78_default, 8>> fehlberg78_adaptive{
    "Fehlberg 7(8) adaptive", 8};

} // namespace stepcert
