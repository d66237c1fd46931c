#pragma once
// Milne's device inside a production run: adams_milne_monitor<Steps, State> is an
// Adams–Bashforth–Moulton PECE stepper for Boost.Odeint's integrate_const / integrate_n_steps that
// takes exactly the steps odeint's adams_bashforth_moulton<Steps> takes (same start-up stepper,
// coefficient tables and sums: estimate/detail/adams_pece.hpp) and records each multistep step's
// local error estimate (milne_device.hpp) in a profile the caller owns. The predictor is a
// by-product of every PECE step, so the estimate costs a subtraction and a norm per step.
// Start-up steps are not recorded (they have no predictor). The step size must stay constant,
// as the Adams coefficients assume; a change is refused, not silently mis-stepped.
#include "stepcert/methods/odeint_types.hpp"

#include <cmath>
#include <cstddef>
#include <optional>
#include <string>
#include <utility>

#include <boost/numeric/odeint/stepper/stepper_categories.hpp>
#include <boost/numeric/odeint/util/unwrap_reference.hpp>

#include "stepcert/core/error.hpp"
#include "stepcert/core/norm.hpp"
#include "stepcert/core/state.hpp"
#include "stepcert/estimate/detail/adams_pece.hpp"
#include "stepcert/estimate/local_error.hpp"
#include "stepcert/estimate/milne_device.hpp"

namespace stepcert {

template <std::size_t Steps, class State>
class adams_milne_monitor {
    static_assert(Steps >= 1 && Steps <= 8, "stepcert::adams_milne_monitor<Steps>: odeint's Adams methods have 1 to 8 steps.");

public:
    using state_type = State;
    using deriv_type = State;
    using value_type = scalar_of<State>;
    using time_type = value_type;
    using algebra_type = odeint_stepper::default_algebra<State>;
    using operations_type = odeint_stepper::default_operations<State>;
    using order_type = unsigned short;
    using stepper_category = boost::numeric::odeint::stepper_tag;

    /// Records into `log` (which must outlive the monitor and its copies), measured in `norm`
    /// relative to the state after each step.
    explicit adams_milne_monitor(local_error_profile& log, weighted_norm norm = {}) : log_(&log) {
        norm.validate();
        log.estimator = local_error_estimator::milne_device;
        log.order = static_cast<int>(Steps);
        log.power = log.order + 1;
        log.norm = norm;
    }

    /// odeint passes steppers by value: a copy keeps the history and starts with a fresh start-up
    /// stepper (it holds only scratch; copying scratch never written is what g++ warns about).
    adams_milne_monitor(const adams_milne_monitor& other)
        : log_(other.log_), history_(other.history_), weights_(other.weights_), predicted_(other.predicted_),
          slope_(other.slope_), corrected_(other.corrected_), h_(other.h_), factor_(other.factor_),
          power_h_(other.power_h_), taken_(other.taken_) {}
    adams_milne_monitor& operator=(const adams_milne_monitor&) = delete;

    order_type order() const { return static_cast<order_type>(Steps); }

    template <class System>
    void do_step(System system, State& x, time_type t, time_type dt) {
        typename boost::numeric::odeint::unwrap_reference<System>::type& rhs = system;
        if (!history_) {
            h_ = dt;
            history_.emplace(x);
            weights_.emplace(dt);
            predicted_ = slope_ = corrected_ = x;
        } else if (dt != h_) {
            throw invalid_input("stepcert::adams_milne_monitor: the step changed from " + detail::time_text(h_) + " to " +
                                detail::time_text(dt) + " at t = " + detail::time_text(t) +
                                "; Adams-Bashforth-Moulton with fixed coefficients needs one constant step.");
        }
        State& newest = history_->push_front();
        rhs(std::as_const(x), newest, t);
        if (taken_ + 1 < Steps) {  // start-up, as odeint's adams_bashforth takes it
            start_up_.do_step_dxdt_impl(rhs, x, std::as_const(newest), t, dt);
            ++taken_;
            return;
        }
        detail::adams_pece_step(rhs, *weights_, x, *history_, t, dt, predicted_, slope_, corrected_);
        for (std::size_t i = 0; i < state_size(x); ++i) predicted_[i] = factor_ * (corrected_[i] - predicted_[i]);
        std::swap(x, corrected_);
        const double estimate = log_->norm.of_difference(predicted_, x);
        const double hd = static_cast<double>(dt);
        if (!(power_h_ > 0.0)) power_h_ = std::pow(hd, log_->power);
        log_->steps.push_back({static_cast<double>(t), hd, estimate, estimate / power_h_});
        ++log_->cost.steps;
        ++taken_;
    }

private:
    local_error_profile* log_;
    std::optional<detail::derivative_history<State, Steps>> history_;
    std::optional<detail::adams_pece_weights<Steps, value_type>> weights_;
    odeint_stepper::adams_start_up<Steps, State> start_up_;
    State predicted_{}, slope_{}, corrected_{};
    value_type h_{};
    value_type factor_ = detail::milne_device_factor<value_type>(Steps);
    double power_h_ = 0.0;
    std::size_t taken_ = 0;
};

} // namespace stepcert
