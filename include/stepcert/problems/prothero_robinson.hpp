#pragma once
// Prothero-Robinson problem y' = λ (y - g(t)) + g'(t), y(0) = g(0), with g(t) = sin t:
// the exact solution is y = g(t) for every λ. With λ << 0 the problem is stiff, and methods
// may show an order below their classical one (order reduction).
// Source: A. Prothero, A. Robinson, "On the stability and accuracy of one-step methods for
// solving stiff systems of ordinary differential equations", Math. Comp. 28 (1974) 145-162
// (from memory).
#include <array>
#include <cmath>
#include <type_traits>

#include "stepcert/core/problem.hpp"
#include "stepcert/problems/detail/real.hpp"

namespace stepcert::problems {

template <class T>
struct prothero_robinson_rhs {
    T lambda;
    template <state S, class Time>
    void operator()(const S& y, S& dydt, const Time& time) const {
        using U = scalar_of<S>;
        using std::cos;
        using std::sin;
        const U t = static_cast<U>(time);
        dydt[0] = static_cast<U>(lambda) * (y[0] - sin(t)) + cos(t);
    }
};

struct prothero_robinson_exact {
    template <class Time, state S>
    void operator()(const Time& time, S& y) const {
        using U = scalar_of<S>;
        using std::sin;
        y[0] = sin(static_cast<U>(time));
    }
};

template <class T>
struct prothero_robinson_jacobian {
    T lambda;
    template <state S, class Time, matrix_sink M>
    void operator()(const S&, const Time&, M& J) const {
        detail::set_entry(J, 0, 0, lambda);
    }
};

/// Prothero-Robinson problem with stiffness parameter lambda (real; stiff when lambda << 0)
/// on [0, t1], y(0) = 0. State: std::array<T, 1>. Exact solution (sin t) and Jacobian attached.
template <class T = double>
auto prothero_robinson(std::type_identity_t<T> lambda, std::type_identity_t<T> t1 = T(2)) {
    detail::require_real<T>();
    detail::require_finite(lambda, "lambda", "prothero_robinson");
    return make_problem("prothero_robinson(lambda=" + detail::param_text(lambda) + ")",
                        prothero_robinson_rhs<T>{lambda}, std::array<T, 1>{T(0)}, T(0), t1)
        .with_exact(prothero_robinson_exact{})
        .with_jacobian(prothero_robinson_jacobian<T>{lambda});
}

} // namespace stepcert::problems
