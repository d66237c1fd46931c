#pragma once
// Concepts for the callables users hand to stepcert. make_problem and the methods check
// them with static_assert so that a wrong signature fails at the user's call, in one line.
#include <concepts>
#include <cstddef>

#include "stepcert/core/state.hpp"

namespace stepcert {

/// rhs(y, dydt, t): writes f(t, y) into dydt.
template <class F, class S>
concept rhs_for = state<S> && requires(F& f, const S& y, S& dydt, scalar_of<S> t) {
    f(y, dydt, t);
};

/// exact(t, y): writes the exact solution at t into y (generic in the scalar type).
template <class F, class S>
concept exact_solution_for = state<S> && requires(const F& f, scalar_of<S> t, S& y) {
    f(t, y);
};

/// step(rhs, y, t, h): advances y from t to t + h in place (an in-house one-step method).
template <class F, class Rhs, class S>
concept one_step_function_for = state<S> && requires(const F& f, Rhs& rhs, S& y, scalar_of<S> t) {
    f(rhs, y, t, t);
};

/// Observer called by the run drivers at output points: obs(y, t).
template <class F, class S>
concept observer_for = state<S> && requires(F& f, const S& y, scalar_of<S> t) {
    f(y, t);
};

} // namespace stepcert
