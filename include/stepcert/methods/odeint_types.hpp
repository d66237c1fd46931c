#pragma once
// Stepper type aliases over odeint share these defaults. The multiprecision fix comes first,
// before any odeint header, so every wrapper works in double and in Boost.Multiprecision.
#include "stepcert/reference/odeint_multiprecision.hpp"

#include <boost/numeric/odeint/algebra/algebra_dispatcher.hpp>
#include <boost/numeric/odeint/algebra/operations_dispatcher.hpp>
#include <boost/numeric/odeint/util/is_resizeable.hpp>

#include "stepcert/core/state.hpp"

namespace stepcert::detail {

/// True when the state's size is fixed by its type (state_traits<S>::fixed_size, if declared).
template <class S>
constexpr bool fixed_size_state() {
    if constexpr (requires { state_traits<S>::fixed_size; })
        return static_cast<bool>(state_traits<S>::fixed_size);
    else
        return false;
}

/// odeint's algebra for S. odeint sizes a stepper's scratch states on the first step only if
/// is_resizeable<S> says so; a state of run-time size it does not know as resizable would be
/// stepped with empty scratch states, writing out of bounds. Refused here, once: a function
/// template's body is instantiated once per S, however many steppers name the type (a
/// static_assert in a class would leave the class invalid, and Clang would then report every
/// later use of its members as another error).
template <class S>
auto odeint_algebra_for() {
    static_assert(fixed_size_state<S>() || boost::numeric::odeint::is_resizeable<S>::value,
                  "stepcert: odeint does not resize this state type (boost::numeric::odeint::is_resizeable<S> is "
                  "false), so its steppers' scratch states would stay empty and a step would write out of bounds. "
                  "For Eigen vectors include <stepcert/core/state_eigen.hpp>, for uBLAS vectors "
                  "<stepcert/core/state_ublas.hpp>; for your own type specialize is_resizeable (odeint's "
                  "'adapt your own state types'), or declare state_traits<S>::fixed_size = true if its size "
                  "never changes.");
    return typename boost::numeric::odeint::algebra_dispatcher<S>::algebra_type{};
}

template <class S>
auto odeint_operations_for() {
    return typename boost::numeric::odeint::operations_dispatcher<S>::operations_type{};
}

} // namespace stepcert::detail

/// odeint stepper types for a stepcert state S (value and time type scalar_of<S>). Each alias
/// takes an optional odeint Algebra and Operations, so a method can be rebuilt on another
/// algebra: template <class S> using my_rk4 = stepcert::odeint_stepper::rk4<S, my_algebra>;
namespace stepcert::odeint_stepper {

template <class S>
using default_algebra = decltype(detail::odeint_algebra_for<S>());

template <class S>
using default_operations = decltype(detail::odeint_operations_for<S>());

} // namespace stepcert::odeint_stepper
