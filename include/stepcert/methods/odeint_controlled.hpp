#pragma once
// Generic adaptive method over an odeint controlled stepper (try_step). The loop is odeint's
// integrate_times for controlled steppers: a step that would pass an output time is cut to end
// on it, and after an accepted step the larger of the old and the proposed step size is kept,
// so the accepted steps match odeint's step for step. Differences, all on purpose: f(t, y) is
// evaluated once per accepted point and reused by rejected attempts (odeint re-evaluates it),
// accepted and rejected steps are counted, every loop is bounded (step-size guard, plus the
// driver's evaluation budget), and a NaN state stops the run with a message.
#include <algorithm>
#include <utility>
#include <cstddef>
#include <string_view>
#include <vector>

#include <boost/numeric/odeint/stepper/controlled_step_result.hpp>

#include "stepcert/methods/detail/adaptive_support.hpp"
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
        using std::max;
        using std::min;
        namespace odeint = boost::numeric::odeint;
        const std::string_view label = this->label;  // members of a dependent base
        const double initial_step = this->initial_step;
        detail::check_adaptive_arguments(label, t0, times, tol, initial_step);
        detail::check_tolerance_reachable(label, y, tol);
        auto stepper = Policy::template make<S>(tol);
        const T t_end = times.empty() ? t0 : times.back();  // never empty here; keeps -Warray-bounds quiet
        const T resolution = detail::time_resolution(t0, t_end);
        S dxdt = state_traits<S>::make(state_size(y));
        S y_new = state_traits<S>::make(state_size(y));
        rhs(static_cast<const S&>(y), dxdt, t0);
        detail::require_finite_derivative(label, dxdt, t0);
        T dt = initial_step > 0.0 ? min(static_cast<T>(initial_step), t_end - t0)
                                  : detail::starting_step(rhs, y, dxdt, t0, t_end - t0, Policy::starting_order, tol);
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
                        detail::reject_non_finite_step(label, dt, t, resolution, stats);
                        continue;
                    }
                    std::swap(y, y_new);
                    ++stats.steps;
                    dxdt_current = false;
                    if (lands) t = target;
                    // As odeint's integrate_times: never below the step before, so a step cut
                    // short by an output time does not shrink the next one.
                    dt = max(dt, try_dt);
                } else {
                    ++stats.rejected;
                    dt = try_dt;
                    detail::guard_step_size(label, dt, t, resolution);
                }
            }
            t = target;
            obs(static_cast<const S&>(y), target);
        }
    }
};

} // namespace stepcert
