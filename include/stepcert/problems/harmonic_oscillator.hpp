#pragma once
// Harmonic oscillator q' = p, p' = -ω² q, (q, p)(0) = (1, 0); exact q = cos ωt, p = -ω sin ωt.
// Separable (q' depends on p only, p' on q only), so symplectic methods apply; the energy
// (p² + ω² q²)/2 is conserved exactly.
#include <array>
#include <cmath>
#include <type_traits>

#include "stepcert/core/error.hpp"
#include "stepcert/core/problem.hpp"
#include "stepcert/problems/detail/real.hpp"

namespace stepcert::problems {

template <class T>
struct harmonic_oscillator_rhs {
    T omega;
    template <state S, class Time>
    void operator()(const S& y, S& dydt, const Time&) const {
        using U = scalar_of<S>;
        const U w = static_cast<U>(omega);
        dydt[0] = y[1];
        dydt[1] = -(w * w) * y[0];
    }
};

template <class T>
struct harmonic_oscillator_exact {
    T omega;
    template <class Time, state S>
    void operator()(const Time& t, S& y) const {
        using U = scalar_of<S>;
        using std::cos;
        using std::sin;
        const U w = static_cast<U>(omega);
        const U wt = w * static_cast<U>(t);
        y[0] = cos(wt);
        y[1] = -w * sin(wt);
    }
};

template <class T>
struct harmonic_oscillator_jacobian {
    T omega;
    template <state S, class Time, matrix_sink M>
    void operator()(const S&, const Time&, M& J) const {
        detail::set_entry(J, 0, 0, T(0));
        detail::set_entry(J, 0, 1, T(1));
        detail::set_entry(J, 1, 0, -omega * omega);
        detail::set_entry(J, 1, 1, T(0));
    }
};

/// Harmonic oscillator with angular frequency omega > 0 on [0, t1].
/// State: std::array<T, 2> = (q, p); marked separable. Exact solution and Jacobian attached.
template <class T = double>
auto harmonic_oscillator(std::type_identity_t<T> omega = T(1), std::type_identity_t<T> t1 = T(10)) {
    detail::require_real<T>();
    detail::require_finite(omega, "omega", "harmonic_oscillator");
    if (!(omega > 0))
        throw invalid_input("stepcert::problems::harmonic_oscillator: omega must be > 0 (got " +
                            detail::param_text(omega) + "); it is the angular frequency.");
    return make_problem("harmonic_oscillator(omega=" + detail::param_text(omega) + ")",
                        harmonic_oscillator_rhs<T>{omega}, std::array<T, 2>{T(1), T(0)}, T(0), t1)
        .with_exact(harmonic_oscillator_exact<T>{omega})
        .with_jacobian(harmonic_oscillator_jacobian<T>{omega})
        .as_separable();
}

} // namespace stepcert::problems
