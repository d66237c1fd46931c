#pragma once
// Step doubling inside a production run: step_doubling_monitor wraps any Boost.Odeint stepper
// with do_step(system, x, t, dt) (runge_kutta4, runge_kutta_cash_karp54, runge_kutta_dopri5, ...)
// as a plain odeint stepper for integrate_const / integrate_n_steps. Each do_step advances exactly
// as the wrapped stepper does, then takes the same step again as two halves with a second copy of
// the stepper and records 2^p/(2^p - 1) (y_h - y_h/2) (see step_doubling.hpp) in a profile the
// caller owns. The run itself is unchanged; the price is the two half steps, about twice the
// run's own cost (three times the evaluations), so it suits checks and audits rather than every
// production run — an embedded pair's monitor (local_error_monitor) is nearly free. A stepper
// that reuses its last stage (first same as last) is reset before each pair of half steps, which
// costs it one evaluation more. A non-finite estimate is recorded as +inf.
#include "stepcert/methods/odeint_types.hpp"

#include <cmath>
#include <cstddef>

#include <boost/numeric/odeint/stepper/stepper_categories.hpp>

#include "stepcert/core/norm.hpp"
#include "stepcert/core/state.hpp"
#include "stepcert/estimate/local_error.hpp"

namespace stepcert {

namespace detail {
/// The order of the solution a stepper propagates: stepper_order_value for error steppers
/// (order_value is their error order's partner there), else order_value.
template <class Stepper>
constexpr int propagated_order() {
    if constexpr (requires { Stepper::stepper_order_value; })
        return static_cast<int>(Stepper::stepper_order_value);
    else
        return static_cast<int>(Stepper::order_value);
}
} // namespace detail

template <class Stepper>
class step_doubling_monitor {
public:
    using stepper_type = Stepper;
    using state_type = typename Stepper::state_type;
    using deriv_type = typename Stepper::deriv_type;
    using value_type = typename Stepper::value_type;
    using time_type = typename Stepper::time_type;
    using algebra_type = typename Stepper::algebra_type;
    using operations_type = typename Stepper::operations_type;
    using order_type = typename Stepper::order_type;
    using stepper_category = boost::numeric::odeint::stepper_tag;

    static_assert(detail::propagated_order<Stepper>() >= 1,
                  "stepcert::step_doubling_monitor: the wrapped odeint stepper declares no positive order_value; "
                  "step doubling scales by 2^p / (2^p - 1) and needs p >= 1.");

    static_assert(!requires { Stepper::steps; },
                  "stepcert::step_doubling_monitor: a multistep stepper's step depends on its history, so it cannot "
                  "be retaken as two halves; for Adams-Bashforth-Moulton use adams_milne_monitor (Milne's device).");

    /// Records into `log` (which must outlive the monitor and its copies), measured in `norm`
    /// relative to the state after each step.
    explicit step_doubling_monitor(local_error_profile& log, weighted_norm norm = {}) : log_(&log) {
        norm.validate();
        log.estimator = local_error_estimator::step_doubling;
        log.order = detail::propagated_order<Stepper>();
        log.power = log.order + 1;
        log.norm = norm;
        const double two_p = std::exp2(log.order);
        factor_ = two_p / (two_p - 1.0);
    }

    /// odeint passes steppers by value. A copy starts with fresh steppers: an explicit Runge–Kutta
    /// stepper holds only scratch (and, first same as last, a derivative it recomputes when
    /// fresh), and copying scratch that was never written is what g++ warns about.
    step_doubling_monitor(const step_doubling_monitor& other) : log_(other.log_), factor_(other.factor_) {}
    step_doubling_monitor& operator=(const step_doubling_monitor&) = delete;

    order_type order() const { return whole_.order(); }

    template <class System, class StateInOut>
    void do_step(System system, StateInOut& x, time_type t, time_type dt) {
        halved_ = x;
        whole_.do_step(system, x, t, dt);
        if constexpr (requires { halves_.reset(); }) halves_.reset();
        const time_type half = dt / 2;
        halves_.do_step(system, halved_, t, half);
        halves_.do_step(system, halved_, t + half, half);
        for (std::size_t i = 0; i < state_size(x); ++i) halved_[i] = factor_ * (x[i] - halved_[i]);
        const double estimate = log_->norm.of_difference(halved_, x);
        const double hd = static_cast<double>(dt);
        log_->steps.push_back({static_cast<double>(t), hd, estimate, estimate / std::pow(hd, log_->power)});
        log_->cost.steps += 3;
    }

private:
    Stepper whole_;   ///< the production run's stepper
    Stepper halves_;  ///< its copy for the half steps (its own first-same-as-last memory)
    local_error_profile* log_;
    state_type halved_{};
    value_type factor_ = 1;
};

} // namespace stepcert
