#pragma once
// A fixed-step method from any explicit Butcher tableau: tableau_method(tab) runs through
// run_uniform and every study exactly as the odeint wrappers do, in whatever scalar type the
// run uses (the coefficients are converted once per run from the tableau's own type, e.g. exact
// cpp_rational to cpp_bin_float_50, so no double rounding enters a multiprecision run). Its
// declared order is the claimed order of the tableau; check_order_conditions tells whether the
// algebra agrees. Stages k_i = f(t + c_i h, y + h sum_{j<i} a_ij k_j), y += h sum_i b_i k_i.
#include <cstddef>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

#include "stepcert/core/error.hpp"
#include "stepcert/core/state.hpp"
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
        using U = scalar_of<S>;
        detail::check_uniform_arguments(tab.name, h, n, stride);
        const tableau<U> w = tab.template as<U>();
        const std::size_t s = w.stages(), dim = state_size(y);
        // Nonzero entries of A per row, so sparse tableaus (RK4) cost no more than written out.
        std::vector<std::vector<std::size_t>> nz(s);
        for (std::size_t i = 0; i < s; ++i)
            for (std::size_t j = 0; j < i; ++j)
                if (w.a[i][j] != 0) nz[i].push_back(j);
        std::vector<S> k(s, state_traits<S>::make(dim));
        S stage = state_traits<S>::make(dim);
        detail::uniform_loop(
            [&](S& x, const T& t, const T& dt) {
                for (std::size_t i = 0; i < s; ++i) {
                    for (std::size_t e = 0; e < dim; ++e) {
                        U acc = U(0);
                        for (std::size_t j : nz[i]) acc += w.a[i][j] * k[j][e];
                        stage[e] = x[e] + dt * acc;
                    }
                    rhs(static_cast<const S&>(stage), k[i], t + w.c[i] * dt);
                }
                for (std::size_t e = 0; e < dim; ++e) {
                    U acc = U(0);
                    for (std::size_t i = 0; i < s; ++i) acc += w.b[i] * k[i][e];
                    x[e] += dt * acc;
                }
            },
            y, t0, h, n, stride, obs);
    }
};

/// A fixed-step method from an explicit tableau (validated: shape, and explicit).
template <class C>
explicit_tableau_method<C> tableau_method(tableau<C> tab) {
    tab.validate_shape();
    if (!tab.is_explicit())
        throw unsupported_operation("stepcert::tableau_method: tableau '" + tab.name +
                                    "' is implicit (a_ij != 0 for some j >= i); only explicit tableaus can be stepped here.");
    return explicit_tableau_method<C>{std::move(tab)};
}

} // namespace stepcert
