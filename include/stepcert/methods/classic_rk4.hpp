#pragma once
// Classic fourth-order Runge–Kutta through odeint's runge_kutta4.
#include "stepcert/methods/odeint_types.hpp"

#include <boost/numeric/odeint/stepper/runge_kutta4.hpp>

#include "stepcert/methods/odeint_fixed_step.hpp"

namespace stepcert {
namespace odeint_stepper {
template <class S, class Algebra = default_algebra<S>, class Operations = default_operations<S>>
using rk4 = boost::numeric::odeint::runge_kutta4<S, scalar_of<S>, S, scalar_of<S>, Algebra, Operations>;
} // namespace odeint_stepper

namespace detail {
template <class S>
using odeint_rk4 = odeint_stepper::rk4<S>;
}

/// Classic fourth-order Runge–Kutta (Kutta 1901), odeint's runge_kutta4; 4 evaluations per step.
inline constexpr odeint_fixed_step<detail::odeint_rk4> classic_rk4{"classic RK4", 4};

} // namespace stepcert
