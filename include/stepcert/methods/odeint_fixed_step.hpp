#pragma once
// Generic wrapper of an odeint one-step stepper as a stepcert fixed-step method.
// The loop is the one a user would write around do_step: no extra copies, no virtual calls.
#include <cstddef>
#include <string_view>

#include "stepcert/methods/detail/uniform_loop.hpp"
#include "stepcert/methods/method.hpp"

namespace stepcert {

/// StepperFor<State> names the odeint stepper for a given state type (see odeint_types.hpp;
/// any alias with one state parameter works, e.g. one that picks another odeint algebra).
/// The right-hand-side evaluations per step are the stepper's stage count; the run driver counts them.
template <template <class State> class StepperFor>
struct odeint_fixed_step {
    static constexpr step_control control = step_control::fixed;
    std::string_view label;
    int declared_order;

    std::string_view name() const { return label; }
    int order() const { return declared_order; }

    template <class Rhs, class S, class T, class Obs>
    void integrate_uniform(Rhs rhs, S& y, T t0, T h, std::size_t n, std::size_t stride, Obs obs) const {
        detail::check_uniform_arguments(label, h, n, stride);
        StepperFor<S> stepper;
        detail::uniform_loop([&](S& x, const T& t, const T& dt) { stepper.do_step(rhs, x, t, dt); }, y, t0, h, n,
                             stride, obs);
    }
};

} // namespace stepcert
