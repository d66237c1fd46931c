#pragma once
// Rosenbrock 4 with step-size control and dense output: odeint's rosenbrock4_controller (embedded
// third-order error estimate, its own PI-type step rule) driven by stepcert's loop, so that
// rejected steps are counted, the step-size guard and the driver's evaluation budget bound every
// loop, and output times come from the method's dense output (odeint's calc_state) without
// cutting steps. Coefficients: rosenbrock_coefficients.hpp (corrected d4 by default).
#include <algorithm>
#include <cstddef>
#include <exception>
#include <limits>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

#include <boost/numeric/odeint/stepper/controlled_step_result.hpp>
#include <boost/numeric/odeint/stepper/rosenbrock4.hpp>
#include <boost/numeric/odeint/stepper/rosenbrock4_controller.hpp>

#include "stepcert/core/error.hpp"
#include "stepcert/core/problem.hpp"
#include "stepcert/core/state.hpp"
#include "stepcert/methods/detail/adaptive_support.hpp"
#include "stepcert/methods/method.hpp"
#include "stepcert/methods/rosenbrock_coefficients.hpp"
#include "stepcert/methods/rosenbrock_derivatives.hpp"

namespace stepcert {

/// Adaptive Rosenbrock 4 (declared order 4; the controller's error estimate is of order 3).
/// Jacobian and TimeDerivative as for rosenbrock4_method. Evaluations per attempted step: 6,
/// plus 2n for a differenced Jacobian, plus 2 for a differenced ∂f/∂t.
template <template <class> class Coefficients, class Jacobian = jacobian_by_differences,
          class TimeDerivative = time_derivative_by_differences>
struct rosenbrock4_adaptive_method
    : detail::adaptive_method_identity<rosenbrock4_adaptive_method<Coefficients, Jacobian, TimeDerivative>> {
    Jacobian jacobian{};
    TimeDerivative time_derivative{};

    static constexpr std::string_view derivatives_source() {
        return detail::rosenbrock_derivatives_source<Jacobian, TimeDerivative>();
    }

    template <class Rhs, class S, class T, class Obs>
    void integrate_adaptive(Rhs rhs, S& y, T t0, const std::vector<T>& times, controller_tolerance tol, Obs obs,
                            run_stats& stats) const {
        namespace odeint = boost::numeric::odeint;
        using std::min;
        using U = scalar_of<S>;
        using system_type = detail::rosenbrock_system<Rhs, S, Jacobian, TimeDerivative, T>;
        using vector = typename system_type::vector;
        using matrix = typename system_type::matrix;
        const std::string_view label = this->label;  // members of a dependent base
        const double initial_step = this->initial_step;
        detail::check_adaptive_arguments(label, t0, times, tol, initial_step);
        detail::check_tolerance_reachable(label, y, tol);
        const std::size_t n = state_size(y);
        system_type sys{&rhs, &jacobian, &time_derivative, state_traits<S>::make(n), state_traits<S>::make(n), label};
        const U gamma = Coefficients<U>().gamma;
        auto f = [&sys](const vector& x, vector& dxdt, const U& t) { sys.f(x, dxdt, t); };
        auto jac = [&sys](const vector& x, matrix& J, const U& t, vector& dfdt) {
            sys.jacobian_and_time_derivative(x, J, t, dfdt);
        };
        odeint::rosenbrock4_controller<odeint::rosenbrock4<U, Coefficients<U>>> controller(static_cast<U>(tol.atol),
                                                                                           static_cast<U>(tol.rtol));
        const T t_end = times.back();  // check_adaptive_arguments refuses an empty list
        const T resolution = detail::time_resolution(t0, t_end);
        S f0 = state_traits<S>::make(n);
        rhs(static_cast<const S&>(y), f0, t0);
        detail::require_finite_derivative(label, f0, t0);
        T dt = initial_step > 0.0 ? min(static_cast<T>(initial_step), t_end - t0)
                                  : detail::starting_step(rhs, y, f0, t0, t_end - t0, 4, tol);
        vector x0(n), x1(n), between(n);
        system_type::from_state(y, x0);
        T t = t0;
        std::size_t next = 0;
        obs(static_cast<const S&>(y), t0);
        while (next < times.size()) {
            const bool lands = !(t + dt < t_end - resolution);
            const T attempted = lands ? t_end - t : dt;
            U t_step = static_cast<U>(t), dt_step = static_cast<U>(attempted);
            odeint::controlled_step_result result = odeint::fail;
            try {
                result = controller.try_step(std::make_pair(f, jac), x0, t_step, x1, dt_step);
            } catch (const error&) {
                throw;
            } catch (const std::exception& e) {  // uBLAS's own checks (builds without NDEBUG)
                sys.check_given_derivatives(x0, static_cast<U>(t));
                if (sys.singular_pivot(x0, static_cast<U>(t), static_cast<U>(attempted), gamma) == 0)
                    throw method_failure("stepcert: method '" + std::string(label) + "': the linear algebra of the step at t = " +
                                         system_type::text(t) + " failed: " + e.what());
                x1[0] = std::numeric_limits<U>::quiet_NaN();  // a singular iteration matrix: retried shorter below
                result = odeint::success;
            }
            if (result != odeint::success) {
                if (!detail::all_finite_entries(x1)) sys.check_given_derivatives(x0, static_cast<U>(t));
                ++stats.rejected;
                dt = static_cast<T>(dt_step);
                detail::guard_step_size(label, dt, t, resolution);
                continue;
            }
            if (!detail::all_finite_entries(x1)) {  // a NaN the error norm did not catch, or a singular matrix: retry shorter
                sys.check_given_derivatives(x0, static_cast<U>(t));
                dt = attempted;
                detail::reject_non_finite_step(label, dt, t, resolution, stats);
                continue;
            }
            ++stats.steps;
            const T t_new = lands ? t_end : t + attempted;
            controller.stepper().prepare_dense_output();
            for (; next < times.size() && !(t_new < times[next]); ++next) {
                if (times[next] == t_new) {
                    system_type::to_state(x1, y);
                } else {
                    controller.stepper().calc_state(static_cast<U>(times[next]), between, x0, static_cast<U>(t), x1,
                                                    static_cast<U>(t_new));
                    system_type::to_state(between, y);
                }
                obs(static_cast<const S&>(y), times[next]);
            }
            std::swap(x0, x1);
            t = t_new;
            dt = static_cast<T>(dt_step);
        }
        system_type::to_state(x0, y);
    }
};

/// Adaptive Rosenbrock 4 (RODAS coefficients, corrected d4), Jacobian and ∂f/∂t by differences.
inline constexpr rosenbrock4_adaptive_method<rodas_coefficients> rosenbrock4_adaptive{{"Rosenbrock 4 (RODAS) adaptive", 4}};

/// The same with odeint's shipped coefficient set, for comparison.
inline constexpr rosenbrock4_adaptive_method<boost::numeric::odeint::default_rosenbrock_coefficients>
    rosenbrock4_adaptive_odeint_coefficients{{"Rosenbrock 4 (odeint's coefficients) adaptive", 4}};

/// Adaptive Rosenbrock 4 with the problem's own Jacobian when it has one, differences otherwise.
template <problem_like P>
auto rosenbrock4_adaptive_for(const P& p) {
    if constexpr (P::has_jacobian)
        return rosenbrock4_adaptive_method<rodas_coefficients, typename P::jacobian_type>{
            {"Rosenbrock 4 (RODAS) adaptive", 4}, p.jacobian()};
    else
        return rosenbrock4_adaptive;
}

} // namespace stepcert
