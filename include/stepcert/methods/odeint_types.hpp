#pragma once
// Stepper type aliases over odeint share these defaults. The multiprecision fix comes first,
// before any odeint header, so every wrapper works in double and in Boost.Multiprecision.
#include "stepcert/reference/odeint_multiprecision.hpp"

#include <boost/numeric/odeint/algebra/algebra_dispatcher.hpp>
#include <boost/numeric/odeint/algebra/operations_dispatcher.hpp>

#include "stepcert/core/state.hpp"

/// odeint stepper types for a stepcert state S (value and time type scalar_of<S>). Each alias
/// takes an optional odeint Algebra and Operations, so a method can be rebuilt on another
/// algebra: template <class S> using my_rk4 = stepcert::odeint_stepper::rk4<S, my_algebra>;
namespace stepcert::odeint_stepper {

template <class S>
using default_algebra = typename boost::numeric::odeint::algebra_dispatcher<S>::algebra_type;

template <class S>
using default_operations = typename boost::numeric::odeint::operations_dispatcher<S>::operations_type;

} // namespace stepcert::odeint_stepper
