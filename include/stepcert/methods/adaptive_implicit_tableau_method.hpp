#pragma once
// An adaptive method from an implicit tableau with embedded weights (SDIRK 4(3) in the
// catalogue): the stages by simplified Newton (detail/implicit_stages.hpp) to 1 % of the
// controller's tolerance, the error err = h sum_i (b_i - b_hat_i) f_i, accepted and rejected by
// Boost.Odeint's default error checker and step adjuster in stepcert's adaptive loop (as the
// explicit tableau pairs). A step whose Newton iteration fails is rejected and retried at a
// quarter of its length (common practice, no source); the loop's step-size guard bounds that.
#include <algorithm>
#include <cstddef>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

#include <boost/numeric/odeint/stepper/controlled_runge_kutta.hpp>
#include <boost/numeric/odeint/stepper/controlled_step_result.hpp>

#include "stepcert/core/error.hpp"
#include "stepcert/core/problem.hpp"
#include "stepcert/methods/derivative_sources.hpp"
#include "stepcert/methods/detail/adaptive_support.hpp"
#include "stepcert/methods/detail/controlled_loop.hpp"
#include "stepcert/methods/detail/implicit_stages.hpp"
#include "stepcert/methods/implicit_tableau_method.hpp"
#include "stepcert/methods/method.hpp"
#include "stepcert/methods/odeint_types.hpp"
#include "stepcert/tableau/tableau.hpp"

namespace stepcert {

namespace detail {

/// Offers odeint's try_step(rhs, in, dxdt, t, out, dt) for an implicit embedded tableau.
template <class S, class Jacobian>
class implicit_controlled_stepper {
public:
    using scalar = scalar_of<S>;

    template <class C>
    implicit_controlled_stepper(const tableau<C>& tab, std::size_t dim, const Jacobian& jac, newton_settings newton,
                                const controller_tolerance& tol, std::string_view label)
        : stages_(tab, dim, jac, newton, label), checker_(static_cast<scalar>(tol.atol), static_cast<scalar>(tol.rtol)),
          err_(state_traits<S>::make(dim)), scale_{tol.atol, tol.rtol, 0.01}, stepper_order_(tab.claimed_order),
          error_order_(std::min(tab.claimed_order, tab.claimed_embedded_order)) {}

    template <class Rhs, class T>
    boost::numeric::odeint::controlled_step_result try_step(Rhs& rhs, const S& in, const S& dxdt, T& t, S& out, T& dt) {
        const auto rec = stages_.step(rhs, in, t, dt, out, &err_, scale_);
        if (rec.end != newton_end::converged) {
            ++newton_failures_;
            dt = dt / 4;
            return boost::numeric::odeint::fail;
        }
        const scalar error = checker_.error(algebra_, in, dxdt, err_, dt);
        if (!(error <= scalar(1))) {  // NaN included: a NaN error never passes
            dt = (boost::math::isfinite)(error) ? adjuster_.decrease_step(dt, error, error_order_) : T(dt / 4);
            return boost::numeric::odeint::fail;
        }
        t += dt;
        dt = adjuster_.increase_step(dt, error, stepper_order_);
        return boost::numeric::odeint::success;
    }

    std::size_t newton_failures() const { return newton_failures_; }

private:
    using algebra = odeint_stepper::default_algebra<S>;
    using operations = odeint_stepper::default_operations<S>;
    implicit_stages<S, Jacobian> stages_;
    boost::numeric::odeint::default_error_checker<scalar, algebra, operations> checker_;
    boost::numeric::odeint::default_step_adjuster<scalar, scalar> adjuster_{};
    algebra algebra_{};
    S err_;
    newton_scale scale_;
    int stepper_order_, error_order_;
    std::size_t newton_failures_ = 0;
};

} // namespace detail

template <class C, class Jacobian = jacobian_by_differences>
struct embedded_implicit_rk_method : detail::adaptive_method_identity<embedded_implicit_rk_method<C, Jacobian>> {
    tableau<C> tab;
    std::string label_text;  ///< owned: name() must survive copies of the method
    Jacobian jacobian{};
    newton_settings newton{};

    std::string_view name() const { return label_text; }
    int stage_order() const { return stepcert::stage_order(tab, detail::stage_order_tolerance<C>()); }
    static constexpr std::string_view derivatives_source() { return implicit_rk_method<C, Jacobian>::derivatives_source(); }

    template <class Rhs, class S, class T, class Obs>
    void integrate_adaptive(Rhs rhs, S& y, T t0, const std::vector<T>& times, controller_tolerance tol, Obs obs,
                            run_stats& stats) const {
        detail::implicit_controlled_stepper<S, Jacobian> stepper(tab, state_size(y), jacobian, newton, tol, label_text);
        detail::controlled_loop(stepper, {name(), this->initial_step, tab.claimed_order}, rhs, y, t0, times, tol, obs, stats);
    }
};

namespace detail {
template <class C, class Jacobian>
embedded_implicit_rk_method<C, Jacobian> make_embedded_implicit(tableau<C> tab, Jacobian jac, newton_settings newton,
                                                                std::string_view who) {
    require_implicit_tableau(tab, who);
    if (!tab.has_embedded())
        throw unsupported_operation("stepcert::" + std::string(who) + ": tableau '" + tab.name +
                                    "' has no embedded weights, so it gives no error estimate to control the step with; "
                                    "use it with a fixed step (implicit_tableau_method).");
    embedded_implicit_rk_method<C, Jacobian> m;
    m.declared_order = tab.claimed_order;
    m.label_text = tab.name + " adaptive";
    m.tab = std::move(tab);
    m.jacobian = std::move(jac);
    m.newton = newton;
    return m;
}
} // namespace detail

/// An adaptive method from an implicit tableau with embedded weights; Jacobian by differences.
template <class C>
embedded_implicit_rk_method<C> adaptive_implicit_tableau_method(tableau<C> tab, newton_settings newton = {}) {
    return detail::make_embedded_implicit(std::move(tab), jacobian_by_differences{}, newton, "adaptive_implicit_tableau_method");
}

/// The same with the problem's own Jacobian when it has one (with_jacobian).
template <problem_like P, class C>
auto adaptive_implicit_tableau_method_for(const P& p, tableau<C> tab, newton_settings newton = {}) {
    if constexpr (P::has_jacobian)
        return detail::make_embedded_implicit(std::move(tab), p.jacobian(), newton, "adaptive_implicit_tableau_method_for");
    else
        return detail::make_embedded_implicit(std::move(tab), jacobian_by_differences{}, newton,
                                              "adaptive_implicit_tableau_method_for");
}

} // namespace stepcert
