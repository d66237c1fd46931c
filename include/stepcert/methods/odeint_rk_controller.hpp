#pragma once
// Policy for odeint_controlled: odeint's controlled_runge_kutta around an embedded error stepper,
// with odeint's default error checker: error_i / (atol + rtol (|y_i| + h |y'_i|)) <= 1.
// Public so that a controlled method can be rebuilt on another odeint algebra:
//   template <class S> using ck = stepcert::odeint_stepper::cash_karp54<S, my_algebra>;
//   stepcert::odeint_controlled<stepcert::odeint_rk_controller<ck, 5>> m{"Cash-Karp (my algebra)", 5};
#include "stepcert/methods/odeint_types.hpp"

#include <boost/numeric/odeint/stepper/controlled_runge_kutta.hpp>

#include "stepcert/core/state.hpp"
#include "stepcert/methods/method.hpp"

namespace stepcert {

template <template <class State> class StepperFor, int StartingOrder>
struct odeint_rk_controller {
    static constexpr bool variable_order = false;
    static constexpr int starting_order = StartingOrder;

    template <class S>
    static auto make(const controller_tolerance& tol) {
        using controlled = boost::numeric::odeint::controlled_runge_kutta<StepperFor<S>>;
        using T = scalar_of<S>;
        // controlled_runge_kutta copies a default-constructed stepper whose scratch states are not
        // written yet; for std::array states g++ 12 then warns that they are used uninitialized.
        // The scratch is always written before it is read.
#if defined(__GNUC__) && !defined(__clang__)
#pragma GCC diagnostic push
#pragma GCC diagnostic ignored "-Wuninitialized"
#pragma GCC diagnostic ignored "-Wmaybe-uninitialized"
#endif
        return controlled(typename controlled::error_checker_type(static_cast<T>(tol.atol), static_cast<T>(tol.rtol)));
#if defined(__GNUC__) && !defined(__clang__)
#pragma GCC diagnostic pop
#endif
    }
};

} // namespace stepcert
