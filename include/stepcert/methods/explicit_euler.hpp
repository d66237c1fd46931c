#pragma once
// Explicit Euler through odeint's euler stepper: order 1, one evaluation per step.
#include "stepcert/methods/odeint_types.hpp"

#include <boost/numeric/odeint/stepper/euler.hpp>

#include "stepcert/methods/odeint_fixed_step.hpp"

namespace stepcert {
namespace odeint_stepper {
template <class S, class Algebra = default_algebra<S>, class Operations = default_operations<S>>
using euler = boost::numeric::odeint::euler<S, scalar_of<S>, S, scalar_of<S>, Algebra, Operations>;
} // namespace odeint_stepper

namespace detail {
template <class S>
using odeint_euler_default = odeint_stepper::euler<S>;
}

/// Explicit (forward) Euler, y_{n+1} = y_n + h f(t_n, y_n); order 1, 1 evaluation per step.
inline constexpr odeint_fixed_step<detail::odeint_euler_default> explicit_euler{"explicit Euler", 1};

} // namespace stepcert
