#pragma once
// Generic wrapper of an odeint one-step stepper as a stepcert fixed-step method.
// The loop is the one a user would write around do_step: no extra copies, no virtual calls.
#include <cstddef>
#include <string_view>

#include "stepcert/methods/method.hpp"

namespace stepcert {

/// StepperFor<State> names the odeint stepper for a given state type.
template <template <class State> class StepperFor>
struct odeint_fixed_step {
    static constexpr step_control control = step_control::fixed;
    std::string_view label;
    int declared_order;

    std::string_view name() const { return label; }
    int order() const { return declared_order; }

    template <class Rhs, class S, class T, class Obs>
    void integrate_uniform(Rhs rhs, S& y, T t0, T h, std::size_t n, std::size_t stride, Obs obs) const {
        StepperFor<S> stepper;
        obs(y, t0);
        for (std::size_t k = 1; k <= n; ++k) {
            // t from the step index, not by accumulation, so no drift over long runs.
            stepper.do_step(rhs, y, t0 + static_cast<T>(k - 1) * h, h);
            if (k % stride == 0) obs(static_cast<const S&>(y), t0 + static_cast<T>(k) * h);
        }
    }
};

} // namespace stepcert
