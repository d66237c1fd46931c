#pragma once
// One step of an explicit embedded pair built from a tableau, with its error estimate, and the
// same step under odeint's step-size control. The propagated solution uses b; the estimate is
// err = h sum_i (b_i - b_hat_i) k_i, the difference of the two solutions, which estimates the
// local error of the lower-order one (of order min(p, p_hat) + 1 in h). The controlled stepper
// uses Boost.Odeint's own default_error_checker and default_step_adjuster, so with the
// coefficients of odeint's Cash–Karp or Dormand–Prince it accepts and rejects the same steps.
#include "stepcert/methods/odeint_types.hpp"

#include <algorithm>
#include <cstddef>
#include <string>

#include <boost/numeric/odeint/stepper/controlled_runge_kutta.hpp>
#include <boost/numeric/odeint/stepper/controlled_step_result.hpp>

#include "stepcert/core/error.hpp"
#include "stepcert/core/state.hpp"
#include "stepcert/methods/detail/explicit_stages.hpp"
#include "stepcert/methods/method.hpp"
#include "stepcert/tableau/tableau.hpp"

namespace stepcert {

/// One step with error estimate from an explicit tableau with embedded weights, in the scalar
/// type of S (coefficients converted once from the tableau's own type).
template <class S>
class tableau_error_stepper {
public:
    using scalar = scalar_of<S>;

    template <class C>
    tableau_error_stepper(const tableau<C>& tab, std::size_t dim)
        : stages_((detail::require_explicit_tableau(tab, "tableau_error_stepper", true), tab), dim),
          order_(tab.claimed_order), embedded_order_(tab.claimed_embedded_order) {}

    /// Claimed order of the propagated weights b, and of the embedded weights.
    int order() const { return order_; }
    int embedded_order() const { return embedded_order_; }
    /// The orders odeint's step adjuster takes: grow with the propagated order, shrink with the
    /// lower of the two (as odeint's Cash–Karp 5(4), Dormand–Prince 5(4) and Fehlberg 7(8)).
    int stepper_order() const { return order_; }
    int error_order() const { return std::min(order_, embedded_order_); }
    bool first_same_as_last() const { return stages_.fsal(); }

    /// out = x + h sum b_i k_i, err = h sum (b_i - b_hat_i) k_i; dxdt must be f(t, x).
    /// s - 1 evaluations of rhs. out and err must have the size of x and must not alias it.
    template <class Rhs, class T>
    void do_step(Rhs& rhs, const S& x, const S& dxdt, const T& t, S& out, const T& dt, S& err) {
        stages_.first_derivative() = dxdt;
        stages_.evaluate_stages(rhs, x, t, dt);
        stages_.combine(stages_.weights(), &x, dt, out);
        stages_.combine(stages_.error_weights(), nullptr, dt, err);
    }

    /// After do_step of a first-same-as-last pair: f(t + h, out), already evaluated as the last stage.
    bool derivative_at_end(S& dxdt) const {
        if (!stages_.fsal()) return false;
        dxdt = stages_.last_derivative();
        return true;
    }

private:
    detail::explicit_stages<S> stages_;
    int order_;
    int embedded_order_;
};

/// tableau_error_stepper under Boost.Odeint's default error checker
/// (max_i |err_i| / (atol + rtol (|y_i| + h |y'_i|)) <= 1 accepts) and default step adjuster.
/// Offers odeint's try_step(rhs, in, dxdt, t, out, dt), so it runs in stepcert's adaptive loop.
template <class S>
class tableau_controlled_stepper {
public:
    using scalar = scalar_of<S>;

    template <class C>
    tableau_controlled_stepper(const tableau<C>& tab, std::size_t dim, const controller_tolerance& tol)
        : stepper_(tab, dim), checker_(static_cast<scalar>(tol.atol), static_cast<scalar>(tol.rtol)),
          err_(state_traits<S>::make(dim)) {}

    template <class Rhs, class T>
    boost::numeric::odeint::controlled_step_result try_step(Rhs& rhs, const S& in, const S& dxdt, T& t, S& out, T& dt) {
        stepper_.do_step(rhs, in, dxdt, t, out, dt, err_);
        const scalar error = checker_.error(algebra_, in, dxdt, err_, dt);
        if (error > scalar(1)) {
            dt = adjuster_.decrease_step(dt, error, stepper_.error_order());
            return boost::numeric::odeint::fail;
        }
        t += dt;
        dt = adjuster_.increase_step(dt, error, stepper_.stepper_order());
        return boost::numeric::odeint::success;
    }

    bool derivative_at_end(S& dxdt) const { return stepper_.derivative_at_end(dxdt); }
    const tableau_error_stepper<S>& stepper() const { return stepper_; }

private:
    using algebra = odeint_stepper::default_algebra<S>;
    using operations = odeint_stepper::default_operations<S>;
    tableau_error_stepper<S> stepper_;
    boost::numeric::odeint::default_error_checker<scalar, algebra, operations> checker_;
    boost::numeric::odeint::default_step_adjuster<scalar, scalar> adjuster_{};
    algebra algebra_{};
    S err_;
};

} // namespace stepcert
