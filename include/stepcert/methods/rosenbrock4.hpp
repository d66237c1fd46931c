#pragma once
// Rosenbrock's fourth-order method through odeint's rosenbrock4 stepper, at a fixed step: a
// linearly implicit method for stiff problems (one LU of I/(γh) − J per step, six evaluations
// of f per step, plus the Jacobian and ∂f/∂t). Coefficients: rosenbrock_coefficients.hpp (odeint's
// shipped set has a sign error; stepcert's default corrects it).
#include <cstddef>
#include <exception>
#include <string>
#include <string_view>
#include <utility>

#include <boost/numeric/odeint/stepper/rosenbrock4.hpp>

#include "stepcert/core/error.hpp"
#include "stepcert/core/problem.hpp"
#include "stepcert/core/state.hpp"
#include "stepcert/methods/detail/uniform_loop.hpp"
#include "stepcert/methods/method.hpp"
#include "stepcert/methods/rosenbrock_coefficients.hpp"
#include "stepcert/methods/rosenbrock_derivatives.hpp"

namespace stepcert {

/// Rosenbrock 4 at a fixed step, as a stepcert fixed-step method. Coefficients picks the
/// coefficient set; Jacobian is jacobian_by_differences or a callable jac(y, t, J) writing
/// ∂f/∂y into an n x n matrix through J(i, j) (a problem's with_jacobian form);
/// TimeDerivative is time_derivative_by_differences or a callable dfdt(y, t, v) writing ∂f/∂t.
/// Evaluations per step: 6, plus 2n for a differenced Jacobian, plus 2 for a differenced ∂f/∂t
/// (the run driver counts them all).
template <template <class> class Coefficients, class Jacobian = jacobian_by_differences,
          class TimeDerivative = time_derivative_by_differences>
struct rosenbrock4_method {
    static constexpr step_control control = step_control::fixed;
    std::string_view label;
    Jacobian jacobian{};
    TimeDerivative time_derivative{};

    std::string_view name() const { return label; }
    int order() const { return 4; }

    /// How ∂f/∂y and ∂f/∂t are formed, in words (for reports).
    static constexpr std::string_view derivatives_source() { return detail::rosenbrock_derivatives_source<Jacobian, TimeDerivative>(); }

    template <class Rhs, class S, class T, class Obs>
    void integrate_uniform(Rhs rhs, S& y, T t0, T h, std::size_t n, std::size_t stride, Obs obs) const {
        detail::check_uniform_arguments(label, h, n, stride);
        using U = scalar_of<S>;
        using system_type = detail::rosenbrock_system<Rhs, S, Jacobian, TimeDerivative, T>;
        using vector = typename system_type::vector;
        using matrix = typename system_type::matrix;
        const std::size_t dim = state_size(y);
        system_type sys{&rhs, &jacobian, &time_derivative, state_traits<S>::make(dim), state_traits<S>::make(dim), label};
        auto f = [&sys](const vector& x, vector& dxdt, const U& t) { sys.f(x, dxdt, t); };
        auto jac = [&sys](const vector& x, matrix& J, const U& t, vector& dfdt) {
            sys.jacobian_and_time_derivative(x, J, t, dfdt);
        };
        boost::numeric::odeint::rosenbrock4<U, Coefficients<U>> stepper;
        const U gamma = Coefficients<U>().gamma;
        vector x(dim), x_next(dim);
        system_type::from_state(y, x);
        obs(std::as_const(y), t0);
        std::size_t k = 0;
        for (std::size_t block = n / stride; block > 0; --block) {
            for (const std::size_t end = k + stride; k < end; ++k) {
                const U t = static_cast<U>(t0 + static_cast<T>(k) * h), dt = static_cast<U>(h);
                try {
                    stepper.do_step(std::make_pair(f, jac), x, t, x_next, dt);
                } catch (const error&) {
                    throw;
                } catch (const std::exception& e) {  // uBLAS's own checks (builds without NDEBUG)
                    sys.diagnose_failed_step(x, t, dt, gamma);
                    throw method_failure("stepcert: method '" + std::string(label) + "': the linear algebra of the step at t = " +
                                         system_type::text(t) + " failed: " + e.what());
                }
                if (!detail::all_finite_entries(x_next)) [[unlikely]]
                    sys.diagnose_failed_step(x, t, dt, gamma);
                x.swap(x_next);
            }
            system_type::to_state(x, y);
            obs(std::as_const(y), t0 + static_cast<T>(k) * h);
        }
    }
};

/// Rosenbrock 4 (RODAS coefficients, corrected d4), Jacobian and ∂f/∂t by differences.
inline constexpr rosenbrock4_method<rodas_coefficients> rosenbrock4_fixed{"Rosenbrock 4 (RODAS)"};

/// The same stepper with odeint's shipped coefficient set (d4 of the wrong sign), kept for
/// comparison: first order on right-hand sides that depend on t.
inline constexpr rosenbrock4_method<boost::numeric::odeint::default_rosenbrock_coefficients> rosenbrock4_fixed_odeint_coefficients{
    "Rosenbrock 4 (odeint's coefficients)"};

/// Rosenbrock 4 with the problem's own Jacobian when it has one (with_jacobian), differences
/// otherwise; ∂f/∂t by a central difference in t.
template <problem_like P>
auto rosenbrock4_fixed_for(const P& p) {
    if constexpr (P::has_jacobian)
        return rosenbrock4_method<rodas_coefficients, typename P::jacobian_type>{"Rosenbrock 4 (RODAS)", p.jacobian()};
    else
        return rosenbrock4_fixed;
}

/// Rosenbrock 4 with the problem's own Jacobian (if any) and the given ∂f/∂t, dfdt(y, t, v).
template <problem_like P, class TimeDerivative>
auto rosenbrock4_fixed_for(const P& p, TimeDerivative dfdt) {
    if constexpr (P::has_jacobian)
        return rosenbrock4_method<rodas_coefficients, typename P::jacobian_type, TimeDerivative>{"Rosenbrock 4 (RODAS)",
                                                                                                  p.jacobian(), std::move(dfdt)};
    else
        return rosenbrock4_method<rodas_coefficients, jacobian_by_differences, TimeDerivative>{"Rosenbrock 4 (RODAS)", {},
                                                                                                  std::move(dfdt)};
}

} // namespace stepcert
