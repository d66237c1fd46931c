#pragma once
// Dahlquist's test equation y' = λ y, y(0) = 1, exact y = e^{λ t} (real λ).
// The scalar problem on which linear stability is defined; with λ < 0 and |λ| h beyond
// a method's stability interval the numerical solution grows while the exact one decays.
#include <array>
#include <cmath>
#include <type_traits>

#include "stepcert/core/problem.hpp"
#include "stepcert/problems/detail/real.hpp"

namespace stepcert::problems {

template <class T>
struct dahlquist_rhs {
    T lambda;
    template <state S, class Time>
    void operator()(const S& y, S& dydt, const Time&) const {
        dydt[0] = static_cast<scalar_of<S>>(lambda) * y[0];
    }
};

template <class T>
struct dahlquist_exact {
    T lambda;
    template <class Time, state S>
    void operator()(const Time& t, S& y) const {
        using U = scalar_of<S>;
        using std::exp;
        y[0] = exp(static_cast<U>(lambda) * static_cast<U>(t));
    }
};

template <class T>
struct dahlquist_jacobian {
    T lambda;
    template <state S, class Time, matrix_sink M>
    void operator()(const S&, const Time&, M& J) const {
        detail::set_entry(J, 0, 0, lambda);
    }
};

/// y' = λ y on [0, t1], y(0) = 1. State: std::array<T, 1>. Exact solution and Jacobian attached.
template <class T = double>
auto dahlquist(std::type_identity_t<T> lambda, std::type_identity_t<T> t1 = T(1)) {
    detail::require_real<T>();
    detail::require_finite(lambda, "lambda", "dahlquist");
    return make_problem("dahlquist(lambda=" + detail::param_text(lambda) + ")", dahlquist_rhs<T>{lambda},
                        std::array<T, 1>{T(1)}, T(0), t1)
        .with_exact(dahlquist_exact<T>{lambda})
        .with_jacobian(dahlquist_jacobian<T>{lambda});
}

} // namespace stepcert::problems
