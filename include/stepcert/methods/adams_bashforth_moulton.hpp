#pragma once
// Adams–Bashforth–Moulton predictor-corrector through odeint's adams_bashforth_moulton<Steps>:
// a Steps-step Adams–Bashforth predictor and a Steps-value Adams–Moulton corrector, one
// correction (PECE), order Steps. Two evaluations per step once started.
// Start-up: odeint fills the history itself, inside the first Steps - 1 calls of do_step,
// with one-step Runge–Kutta steps of the same size h (its initializing stepper). Those calls
// are ordinary steps of the run: the observer sees their results at the usual times and the
// step count n includes them. odeint's default start-up method is classic RK4 (order 4); its
// local error O(h^5) would cap the order of Steps >= 5 at 5, so for Steps >= 5 stepcert starts
// with Fehlberg 7(8) instead (13 evaluations per start-up step; RK4 costs 4).
#include "stepcert/methods/odeint_types.hpp"

#include <array>
#include <cstddef>
#include <string>
#include <string_view>
#include <type_traits>

#include <boost/numeric/odeint/stepper/adams_bashforth_moulton.hpp>
#include <boost/numeric/odeint/stepper/runge_kutta4.hpp>
#include <boost/numeric/odeint/stepper/runge_kutta_fehlberg78.hpp>
#include <boost/numeric/odeint/util/resizer.hpp>

#include "stepcert/core/error.hpp"
#include "stepcert/methods/detail/uniform_loop.hpp"
#include "stepcert/methods/method.hpp"

namespace stepcert {
namespace odeint_stepper {

/// The one-step method that fills the multistep history: RK4 (odeint's default) up to 4 steps,
/// Fehlberg 7(8) above, so the start-up never lowers the order.
template <std::size_t Steps, class S, class Algebra = default_algebra<S>, class Operations = default_operations<S>>
using adams_start_up = std::conditional_t<
    (Steps <= 4),
    boost::numeric::odeint::runge_kutta4<S, scalar_of<S>, S, scalar_of<S>, Algebra, Operations>,
    boost::numeric::odeint::runge_kutta_fehlberg78<S, scalar_of<S>, S, scalar_of<S>, Algebra, Operations>>;

template <std::size_t Steps, class S, class Algebra = default_algebra<S>, class Operations = default_operations<S>>
using adams_bashforth_moulton =
    boost::numeric::odeint::adams_bashforth_moulton<Steps, S, scalar_of<S>, S, scalar_of<S>, Algebra, Operations,
                                                    boost::numeric::odeint::initially_resizer,
                                                    adams_start_up<Steps, S, Algebra, Operations>>;
} // namespace odeint_stepper

/// Evaluations the first Steps - 1 (start-up) steps cost each: 4 (RK4) or 13 (Fehlberg 7(8)).
template <std::size_t Steps>
inline constexpr std::size_t adams_start_up_evaluations = Steps <= 4 ? 4 : 13;

template <std::size_t Steps>
struct adams_bashforth_moulton_method {
    static_assert(Steps >= 1 && Steps <= 8, "stepcert::adams_bashforth_moulton<Steps>: odeint supports 1 to 8 steps.");
    static constexpr step_control control = step_control::fixed;
    static constexpr std::size_t steps = Steps;

    std::string_view name() const {
        static constexpr std::array<std::string_view, 9> names{
            "", "Adams-Bashforth-Moulton 1", "Adams-Bashforth-Moulton 2", "Adams-Bashforth-Moulton 3",
            "Adams-Bashforth-Moulton 4", "Adams-Bashforth-Moulton 5", "Adams-Bashforth-Moulton 6",
            "Adams-Bashforth-Moulton 7", "Adams-Bashforth-Moulton 8"};
        return names[Steps];
    }
    int order() const { return static_cast<int>(Steps); }

    template <class Rhs, class S, class T, class Obs>
    void integrate_uniform(Rhs rhs, S& y, T t0, T h, std::size_t n, std::size_t stride, Obs obs) const {
        detail::check_uniform_arguments(name(), h, n, stride);
        if (n < Steps)
            throw invalid_input("stepcert: method '" + std::string(name()) + "' needs at least " + std::to_string(Steps) +
                                " steps (its " + std::to_string(Steps - 1) +
                                " start-up steps and one multistep step), got n = " + std::to_string(n) +
                                "; use more steps or fewer multistep steps.");
        odeint_stepper::adams_bashforth_moulton<Steps, S> stepper;
        detail::uniform_loop([&](S& x, const T& t, const T& dt) { stepper.do_step(rhs, x, t, dt); }, y, t0, h, n,
                             stride, obs);
    }
};

/// adams_bashforth_moulton<Steps>: fixed step, order Steps (1..8); see the header comment for
/// the start-up. Evaluations: (Steps - 1) * adams_start_up_evaluations<Steps> + 2 (n - Steps + 1).
template <std::size_t Steps>
inline constexpr adams_bashforth_moulton_method<Steps> adams_bashforth_moulton{};

} // namespace stepcert
