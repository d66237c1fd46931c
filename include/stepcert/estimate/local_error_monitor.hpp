#pragma once
// A production run's local errors at almost no cost: local_error_monitor wraps one of Boost.Odeint's
// embedded error steppers (runge_kutta_cash_karp54, runge_kutta_dopri5, runge_kutta_fehlberg78, or
// any with do_step(system, x, t, dt, xerr)) as a plain odeint stepper. Each do_step advances as the
// wrapped stepper does and appends the embedded estimate of that step to a profile the caller
// owns, so the monitor goes into odeint's integrate_const / integrate_n_steps unchanged (odeint
// copies steppers; the copies all write to the same profile). The estimate is that of the pair's
// lower-order solution (see embedded_local_error.hpp). A non-finite estimate is recorded as +inf.
#include "stepcert/methods/odeint_types.hpp"

#include <cmath>
#include <cstddef>
#include <string>

#include <boost/numeric/odeint/stepper/stepper_categories.hpp>

#include "stepcert/core/error.hpp"
#include "stepcert/core/norm.hpp"
#include "stepcert/core/state.hpp"
#include "stepcert/estimate/local_error.hpp"

namespace stepcert {

template <class ErrorStepper>
class local_error_monitor {
public:
    using stepper_type = ErrorStepper;
    using state_type = typename ErrorStepper::state_type;
    using deriv_type = typename ErrorStepper::deriv_type;
    using value_type = typename ErrorStepper::value_type;
    using time_type = typename ErrorStepper::time_type;
    using algebra_type = typename ErrorStepper::algebra_type;
    using operations_type = typename ErrorStepper::operations_type;
    using order_type = typename ErrorStepper::order_type;
    using stepper_category = boost::numeric::odeint::stepper_tag;

    /// Records into `log` (which must outlive the monitor and its copies), measured in `norm`
    /// relative to the state after each step.
    explicit local_error_monitor(local_error_profile& log, weighted_norm norm = {}) : log_(&log) {
        norm.validate();
        log.estimator = local_error_estimator::embedded_pair;
        log.order = static_cast<int>(ErrorStepper::error_order_value);
        log.power = log.order + 1;
        log.norm = norm;
    }

    /// odeint passes steppers by value. A copy starts with a fresh stepper: an explicit error
    /// stepper holds only scratch (and, first same as last, a derivative it recomputes when fresh),
    /// and copying scratch that was never written is what g++ warns about.
    local_error_monitor(const local_error_monitor& other) : log_(other.log_) {}
    local_error_monitor& operator=(const local_error_monitor&) = delete;

    order_type order() const { return stepper_.order(); }
    ErrorStepper& stepper() { return stepper_; }

    template <class System, class StateInOut>
    void do_step(System system, StateInOut& x, time_type t, time_type dt) {
        if (state_size(xerr_) != state_size(x)) xerr_ = state_traits<state_type>::make(state_size(x));
        stepper_.do_step(system, x, t, dt, xerr_);
        const double estimate = log_->norm.of_difference(xerr_, x);
        const double hd = static_cast<double>(dt);
        if (hd != last_h_) {  // h^(p+1) once per step size, not once per step
            last_h_ = hd;
            last_h_power_ = std::pow(hd, log_->power);
        }
        log_->steps.push_back({static_cast<double>(t), hd, estimate, estimate / last_h_power_});
        ++log_->cost.steps;
    }

private:
    ErrorStepper stepper_;
    local_error_profile* log_;
    state_type xerr_{};
    double last_h_ = 0.0;
    double last_h_power_ = 1.0;
};

} // namespace stepcert
