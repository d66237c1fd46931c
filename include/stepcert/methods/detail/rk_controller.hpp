#pragma once
// Policy for odeint_controlled: odeint's controlled_runge_kutta around an embedded error stepper,
// with odeint's default error checker: error_i / (atol + rtol (|y_i| + h |y'_i|)) <= 1.
#include "stepcert/methods/odeint_types.hpp"

#include <boost/numeric/odeint/stepper/controlled_runge_kutta.hpp>

#include "stepcert/core/state.hpp"
#include "stepcert/methods/method.hpp"

namespace stepcert::detail {

template <template <class State> class StepperFor, int StartingOrder>
struct rk_controller {
    static constexpr bool variable_order = false;
    static constexpr int starting_order = StartingOrder;

    template <class S>
    static auto make(const controller_tolerance& tol) {
        using controlled = boost::numeric::odeint::controlled_runge_kutta<StepperFor<S>>;
        using T = scalar_of<S>;
        return controlled(typename controlled::error_checker_type(static_cast<T>(tol.atol), static_cast<T>(tol.rtol)));
    }
};

} // namespace stepcert::detail
