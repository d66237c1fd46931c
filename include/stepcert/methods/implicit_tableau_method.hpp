#pragma once
// A fixed-step method from any implicit Butcher tableau (A not strictly lower triangular):
// diagonally implicit tableaus are solved stage by stage, fully implicit ones all stages at once,
// by simplified Newton iterations (detail/implicit_stages.hpp) iterated to round-off, so a
// study sees the method's truncation error and not the iteration's. Runs in double and in
// Boost.Multiprecision floats (coefficients converted once per run from the tableau's own type).
// The Jacobian is the problem's own (implicit_tableau_method_for) or central differences, 2n
// evaluations per step; every evaluation is counted by the run driver.
// A step whose iteration fails is refused with method_failure naming t, h and what was seen.
#include <cstddef>
#include <limits>
#include <string>
#include <string_view>
#include <utility>

#include "stepcert/core/error.hpp"
#include "stepcert/core/problem.hpp"
#include "stepcert/core/state.hpp"
#include "stepcert/methods/derivative_sources.hpp"
#include "stepcert/methods/detail/implicit_stages.hpp"
#include "stepcert/methods/detail/uniform_loop.hpp"
#include "stepcert/methods/method.hpp"
#include "stepcert/tableau/stage_order.hpp"
#include "stepcert/tableau/tableau.hpp"

namespace stepcert {

namespace detail {
/// Exact tableaus (rationals) decide C(q) exactly; floating ones within 64 eps.
template <class C>
C stage_order_tolerance() {
    if constexpr (std::numeric_limits<C>::is_exact)
        return C(0);
    else
        return C(64) * std::numeric_limits<C>::epsilon();
}
} // namespace detail

template <class C, class Jacobian = jacobian_by_differences>
struct implicit_rk_method {
    static constexpr step_control control = step_control::fixed;
    tableau<C> tab;
    Jacobian jacobian{};
    newton_settings newton{};

    std::string_view name() const { return tab.name; }
    int order() const { return tab.claimed_order; }
    /// The stage order q of the tableau (C(q), stage_order.hpp): on stiff problems the order an
    /// order study sees can fall towards it; the study says so in its verdict.
    int stage_order() const { return stepcert::stage_order(tab, detail::stage_order_tolerance<C>()); }

    /// How ∂f/∂y is formed, in words (for reports).
    static constexpr std::string_view derivatives_source() {
        if constexpr (std::is_same_v<Jacobian, jacobian_by_differences>)
            return "Jacobian by central differences of the right-hand side";
        else
            return "the given Jacobian";
    }

    template <class Rhs, class S, class T, class Obs>
    void integrate_uniform(Rhs rhs, S& y, T t0, T h, std::size_t n, std::size_t stride, Obs obs) const {
        detail::check_uniform_arguments(tab.name, h, n, stride);
        using U = scalar_of<S>;
        const std::size_t dim = state_size(y);
        detail::implicit_stages<S, Jacobian> stages(tab, dim, jacobian, newton, tab.name);
        S y_new = state_traits<S>::make(dim);
        // Iterated to round-off in a norm relative to the state (detail::newton_scale).
        const detail::newton_scale scale{-1.0, 1.0, static_cast<double>(U(10) * std::numeric_limits<U>::epsilon())};
        detail::uniform_loop(
            [&](S& x, const T& t, const T& dt) {
                const auto rec = stages.step(rhs, static_cast<const S&>(x), t, dt, y_new, nullptr, scale);
                if (rec.end == detail::newton_end::non_finite_start) {
                    // f is not finite at the stages' first guess, near the current state: the run
                    // driver sees the non-finite state and locates where the model fails.
                    for (std::size_t k = 0; k < dim; ++k) x[k] = std::numeric_limits<U>::quiet_NaN();
                    return;
                }
                if (rec.end != detail::newton_end::converged)
                    throw method_failure(detail::implicit_stages<S, Jacobian>::failure_text(
                        tab.name, rec, static_cast<double>(t), static_cast<double>(dt)));
                std::swap(x, y_new);
            },
            y, t0, h, n, stride, obs);
    }
};

namespace detail {
template <class C>
void require_implicit_tableau(const tableau<C>& tab, std::string_view who) {
    tab.validate_shape();
    if (tab.is_explicit())
        throw unsupported_operation("stepcert::" + std::string(who) + ": tableau '" + tab.name +
                                    "' is explicit; use tableau_method for it (no Newton iteration is needed).");
}
} // namespace detail

/// A fixed-step method from an implicit tableau, Jacobian by central differences.
template <class C>
implicit_rk_method<C> implicit_tableau_method(tableau<C> tab, newton_settings newton = {}) {
    detail::require_implicit_tableau(tab, "implicit_tableau_method");
    return implicit_rk_method<C>{std::move(tab), {}, newton};
}

/// The same with the problem's own Jacobian when it has one (with_jacobian).
template <problem_like P, class C>
auto implicit_tableau_method_for(const P& p, tableau<C> tab, newton_settings newton = {}) {
    detail::require_implicit_tableau(tab, "implicit_tableau_method_for");
    if constexpr (P::has_jacobian)
        return implicit_rk_method<C, typename P::jacobian_type>{std::move(tab), p.jacobian(), newton};
    else
        return implicit_rk_method<C>{std::move(tab), {}, newton};
}

} // namespace stepcert
