#pragma once
// Generic adaptive method over an odeint FSAL error stepper with dense output (calc_state), e.g.
// Dormand–Prince 5(4). The loop is odeint's integrate_times for dense-output steppers: steps
// are never cut at output times, states there come from the stepper's interpolant; only the
// last step is cut to end on the last output time. It drives controlled_runge_kutta::try_step
// itself (instead of dense_output_runge_kutta::do_step) so that rejected steps can be counted,
// every loop is bounded (step-size guard plus the driver's evaluation budget), and a NaN state
// stops the run with a message.
#include "stepcert/methods/odeint_types.hpp"

#include <algorithm>
#include <cstddef>
#include <string_view>
#include <utility>
#include <vector>

#include <boost/numeric/odeint/stepper/controlled_runge_kutta.hpp>
#include <boost/numeric/odeint/stepper/controlled_step_result.hpp>

#include "stepcert/methods/detail/adaptive_support.hpp"
#include "stepcert/methods/method.hpp"

namespace stepcert {

/// StepperFor<S>: an odeint FSAL error stepper with calc_state (odeint: runge_kutta_dopri5).
template <template <class State> class StepperFor, int StartingOrder>
struct odeint_dense_output : detail::adaptive_method_identity<odeint_dense_output<StepperFor, StartingOrder>> {

    template <class Rhs, class S, class T, class Obs>
    void integrate_adaptive(Rhs rhs, S& y, T t0, const std::vector<T>& times, controller_tolerance tol, Obs obs,
                            run_stats& stats) const {
        using std::min;
        namespace odeint = boost::numeric::odeint;
        using controlled = odeint::controlled_runge_kutta<StepperFor<S>>;
        const std::string_view label = this->label;  // members of a dependent base
        const double initial_step = this->initial_step;
        detail::check_adaptive_arguments(label, t0, times, tol, initial_step);
        detail::check_tolerance_reachable(label, y, tol);
        // As in odeint_rk_controller.hpp: the copied default stepper's scratch is written before use.
#if defined(__GNUC__) && !defined(__clang__)
#pragma GCC diagnostic push
#pragma GCC diagnostic ignored "-Wuninitialized"
#pragma GCC diagnostic ignored "-Wmaybe-uninitialized"
#endif
        controlled stepper(typename controlled::error_checker_type(static_cast<T>(tol.atol), static_cast<T>(tol.rtol)));
#if defined(__GNUC__) && !defined(__clang__)
#pragma GCC diagnostic pop
#endif
        const std::size_t n = state_size(y);
        const T t_end = times.empty() ? t0 : times.back();  // never empty here; keeps -Warray-bounds quiet
        const T resolution = detail::time_resolution(t0, t_end);
        // (x0, d0) at t: start of the step; (x1, d1) at t_new: its end; FSAL hands d1 to the next step.
        S x0 = y, d0 = state_traits<S>::make(n), x1 = state_traits<S>::make(n), d1 = state_traits<S>::make(n);
        rhs(static_cast<const S&>(x0), d0, t0);
        detail::require_finite_derivative(label, d0, t0);
        T dt = initial_step > 0.0 ? min(static_cast<T>(initial_step), t_end - t0)
                                  : detail::starting_step(rhs, x0, d0, t0, t_end - t0, StartingOrder, tol);
        T t = t0;
        std::size_t next = 0;
        obs(static_cast<const S&>(x0), t0);
        while (next < times.size()) {
            T try_dt = dt;
            const bool lands = !(t + try_dt < t_end - resolution);
            if (lands) try_dt = t_end - t;
            T t_new = t;
            const T attempted = try_dt;
            if (stepper.try_step(rhs, x0, d0, t_new, x1, d1, try_dt) != odeint::success) {
                ++stats.rejected;
                dt = try_dt;
                detail::guard_step_size(label, dt, t, resolution);
                continue;
            }
            if (!all_finite(x1)) {  // odeint accepted a NaN error estimate: retry shorter
                dt = attempted;
                detail::reject_non_finite_step(label, dt, t, resolution, stats);
                continue;
            }
            ++stats.steps;
            if (lands) t_new = t_end;
            for (; next < times.size() && !(t_new < times[next]); ++next) {
                if (times[next] == t_new) {
                    obs(static_cast<const S&>(x1), t_new);
                } else {
                    stepper.stepper().calc_state(times[next], y, x0, d0, t, x1, d1, t_new);
                    obs(static_cast<const S&>(y), times[next]);
                }
            }
            std::swap(x0, x1);
            std::swap(d0, d1);
            t = t_new;
            dt = try_dt;
        }
        y = x0;
    }
};

} // namespace stepcert
