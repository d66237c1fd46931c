#pragma once
// The adaptive loop around a controlled stepper (anything with odeint's
// try_step(rhs, in, dxdt, t, out, dt)). It is odeint's integrate_times for controlled steppers:
// a step that would pass an output time is cut to end on it, and after an accepted step the
// larger of the old and the proposed step size is kept, so the accepted steps match odeint's
// step for step. Differences, all on purpose: f(t, y) is evaluated once per accepted point and
// reused by rejected attempts (odeint re-evaluates it), or taken from the stepper when it has
// one at the new point (first same as last); accepted and rejected steps are counted; every loop
// is bounded (step-size guard, plus the driver's evaluation budget); a NaN state stops the run
// with a message.
#include <algorithm>
#include <concepts>
#include <cstddef>
#include <string_view>
#include <utility>
#include <vector>

#include <boost/numeric/odeint/stepper/controlled_step_result.hpp>

#include "stepcert/methods/detail/adaptive_support.hpp"
#include "stepcert/methods/method.hpp"

namespace stepcert::detail {

/// A controlled stepper that, after an accepted step, may hand over f at the new state:
/// bool derivative_at_end(S& dxdt) copies it and returns true, or returns false.
template <class Stepper, class S>
concept hands_over_end_derivative = requires(Stepper& st, S& dxdt) {
    { st.derivative_at_end(dxdt) } -> std::convertible_to<bool>;
};

struct controlled_loop_setup {
    std::string_view label;
    double initial_step;  ///< 0: Hairer–Nørsett–Wanner starting step
    int starting_order;   ///< the order fed to the starting-step rule
};

template <class Stepper, class Rhs, class S, class T, class Obs>
void controlled_loop(Stepper& stepper, const controlled_loop_setup& setup, Rhs& rhs, S& y, T t0,
                     const std::vector<T>& times, const controller_tolerance& tol, Obs& obs, run_stats& stats) {
    using std::max;
    using std::min;
    namespace odeint = boost::numeric::odeint;
    const std::string_view label = setup.label;
    check_adaptive_arguments(label, t0, times, tol, setup.initial_step);
    check_tolerance_reachable(label, y, tol);
    const T t_end = times.empty() ? t0 : times.back();  // never empty here; keeps -Warray-bounds quiet
    const T resolution = time_resolution(t0, t_end);
    S dxdt = state_traits<S>::make(state_size(y));
    S y_new = state_traits<S>::make(state_size(y));
    rhs(static_cast<const S&>(y), dxdt, t0);
    require_finite_derivative(label, dxdt, t0);
    T dt = setup.initial_step > 0.0 ? min(static_cast<T>(setup.initial_step), t_end - t0)
                                    : starting_step(rhs, y, dxdt, t0, t_end - t0, setup.starting_order, tol);
    bool dxdt_current = true;
    T t = t0;
    obs(static_cast<const S&>(y), t0);
    for (const T& target : times) {
        while (target - t > resolution) {
            T try_dt = min(dt, target - t);
            const bool lands = !(try_dt < target - t);
            const T t_before = t;
            if (!dxdt_current) rhs(static_cast<const S&>(y), dxdt, t);
            dxdt_current = true;
            const T attempted = try_dt;
            if (stepper.try_step(rhs, y, dxdt, t, y_new, try_dt) == odeint::success) {
                if (!all_finite(y_new)) {  // odeint accepted a NaN error estimate: retry shorter
                    t = t_before;
                    dt = attempted;
                    reject_non_finite_step(label, dt, t, resolution, stats);
                    continue;
                }
                std::swap(y, y_new);
                ++stats.steps;
                if constexpr (hands_over_end_derivative<Stepper, S>)
                    dxdt_current = stepper.derivative_at_end(dxdt);
                else
                    dxdt_current = false;
                if (lands) t = target;
                // As odeint's integrate_times: never below the step before, so a step cut
                // short by an output time does not shrink the next one.
                dt = max(dt, try_dt);
            } else {
                ++stats.rejected;
                dt = try_dt;
                guard_step_size(label, dt, t, resolution);
            }
        }
        t = target;
        obs(static_cast<const S&>(y), target);
    }
}

} // namespace stepcert::detail
