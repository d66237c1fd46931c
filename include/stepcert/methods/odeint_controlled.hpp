#pragma once
// Generic adaptive method over an odeint controlled stepper (try_step); the loop, shared with
// the tableau-built adaptive methods, is detail::controlled_loop (odeint's integrate_times for
// controlled steppers, with the differences listed there).
#include <vector>

#include "stepcert/methods/detail/adaptive_support.hpp"
#include "stepcert/methods/detail/controlled_loop.hpp"
#include "stepcert/methods/method.hpp"

namespace stepcert {

/// Policy: `template <class S> static auto make(const controller_tolerance&)` builds the odeint
/// controlled stepper for state S; `starting_order` feeds the starting-step rule;
/// `variable_order` is true when the method has no single order.
template <class Policy>
struct odeint_controlled : detail::adaptive_method_identity<odeint_controlled<Policy>> {
    static constexpr bool variable_order = Policy::variable_order;

    template <class Rhs, class S, class T, class Obs>
    void integrate_adaptive(Rhs rhs, S& y, T t0, const std::vector<T>& times, controller_tolerance tol, Obs obs,
                            run_stats& stats) const {
        auto stepper = Policy::template make<S>(tol);
        detail::controlled_loop(stepper, {this->label, this->initial_step, Policy::starting_order}, rhs, y, t0, times, tol,
                                obs, stats);
    }
};

} // namespace stepcert
