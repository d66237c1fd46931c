#pragma once
// Cash–Karp 5(4) (J. R. Cash, A. H. Karp, ACM TOMS 16 (1990) 201–222) through odeint's
// runge_kutta_cash_karp54: six stages, six evaluations per step. Both variants advance with
// the fifth-order solution; the adaptive one controls the step with the embedded fourth-order one.
#include "stepcert/methods/odeint_types.hpp"

#include <boost/numeric/odeint/stepper/runge_kutta_cash_karp54.hpp>

#include "stepcert/methods/odeint_controlled.hpp"
#include "stepcert/methods/odeint_fixed_step.hpp"
#include "stepcert/methods/odeint_rk_controller.hpp"

namespace stepcert {
namespace odeint_stepper {
template <class S, class Algebra = default_algebra<S>, class Operations = default_operations<S>>
using cash_karp54 = boost::numeric::odeint::runge_kutta_cash_karp54<S, scalar_of<S>, S, scalar_of<S>, Algebra, Operations>;
} // namespace odeint_stepper

namespace detail {
template <class S>
using odeint_cash_karp54_default = odeint_stepper::cash_karp54<S>;
}

/// Cash–Karp 5(4) with a fixed step: order 5, 6 evaluations per step.
inline constexpr odeint_fixed_step<detail::odeint_cash_karp54_default> cash_karp54{"Cash-Karp 5(4)", 5};

/// Cash–Karp 5(4) with odeint's step control: order 5; 6 evaluations per accepted step, 5 per rejected one.
inline constexpr odeint_controlled<odeint_rk_controller<detail::odeint_cash_karp54_default, 5>> cash_karp54_adaptive{
    "Cash-Karp 5(4) adaptive", 5};

} // namespace stepcert
