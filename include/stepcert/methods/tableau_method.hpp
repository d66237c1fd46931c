#pragma once
// A fixed-step method from any explicit Butcher tableau: tableau_method(tab) runs through
// run_uniform and every study exactly as the odeint wrappers do, in whatever scalar type the
// run uses (the coefficients are converted once per run from the tableau's own type, e.g. exact
// cpp_rational to cpp_bin_float_50, so no double rounding enters a multiprecision run). Its
// declared order is the claimed order of the tableau; check_order_conditions tells whether the
// algebra agrees. Stages k_i = f(t + c_i h, y + h sum_{j<i} a_ij k_j), y += h sum_i b_i k_i.
// A first-same-as-last tableau (Dormand–Prince) reuses its last stage as the next step's first:
// s - 1 evaluations per step plus one at the start, as odeint's own FSAL steppers.
#include <cstddef>
#include <string>
#include <string_view>
#include <utility>

#include "stepcert/core/error.hpp"
#include "stepcert/core/state.hpp"
#include "stepcert/methods/detail/explicit_stages.hpp"
#include "stepcert/methods/detail/uniform_loop.hpp"
#include "stepcert/methods/method.hpp"
#include "stepcert/tableau/tableau.hpp"

namespace stepcert {

template <class C>
struct explicit_tableau_method {
    static constexpr step_control control = step_control::fixed;
    tableau<C> tab;

    std::string_view name() const { return tab.name; }
    int order() const { return tab.claimed_order; }

    template <class Rhs, class S, class T, class Obs>
    void integrate_uniform(Rhs rhs, S& y, T t0, T h, std::size_t n, std::size_t stride, Obs obs) const {
        detail::check_uniform_arguments(tab.name, h, n, stride);
        detail::explicit_stages<S> st(tab, state_size(y));
        bool first_known = false;  // k_0 = f(t, y) carried over from the last stage (FSAL)
        detail::uniform_loop(
            [&](S& x, const T& t, const T& dt) {
                if (!first_known) rhs(static_cast<const S&>(x), st.first_derivative(), t);
                st.evaluate_stages(rhs, x, t, dt);
                st.combine(st.weights(), &x, dt, x);
                if (st.fsal()) st.carry_last_to_first();
                first_known = st.fsal();
            },
            y, t0, h, n, stride, obs);
    }
};

/// A fixed-step method from an explicit tableau (validated: shape, and explicit).
template <class C>
explicit_tableau_method<C> tableau_method(tableau<C> tab) {
    detail::require_explicit_tableau(tab, "tableau_method", false);
    return explicit_tableau_method<C>{std::move(tab)};
}

} // namespace stepcert
