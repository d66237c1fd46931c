#pragma once
#include <boost/numeric/odeint/stepper/runge_kutta4.hpp>

#include "stepcert/methods/odeint_fixed_step.hpp"
#include "stepcert/core/state.hpp"

namespace stepcert {
namespace detail {
template <class S>
using odeint_rk4 = boost::numeric::odeint::runge_kutta4<S, scalar_of<S>, S, scalar_of<S>>;
}
/// Classic fourth-order Runge–Kutta (Kutta 1901), odeint's runge_kutta4; 4 evaluations per step.
inline constexpr odeint_fixed_step<detail::odeint_rk4> classic_rk4{"classic RK4", 4};
} // namespace stepcert
