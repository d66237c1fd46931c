#pragma once
// Kepler two-body problem with eccentricity e (DETEST problem class D):
//   x'' = -x/r³, y'' = -y/r³, r = √(x² + y²),
//   x(0) = 1 - e, y(0) = 0, x'(0) = 0, y'(0) = √((1+e)/(1-e)), usually on [0, 20].
// Source: T. E. Hull, W. H. Enright, B. M. Fellen, A. E. Sedgwick, "Comparing numerical methods
// for ordinary differential equations", SIAM J. Numer. Anal. 9 (1972) 603-637 (class D;
// definitions partly from memory).
// Exact solution: x = cos E - e, y = √(1-e²) sin E, where E - e sin E = t (Kepler's equation,
// solved by Newton's method in the caller's scalar type); velocities by differentiation with
// dE/dt = 1/(1 - e cos E).
#include <array>
#include <cmath>
#include <cstdint>
#include <limits>
#include <type_traits>
#include <utility>

#include <boost/math/constants/constants.hpp>
#include <boost/math/tools/roots.hpp>

#include "stepcert/core/error.hpp"
#include "stepcert/core/problem.hpp"
#include "stepcert/problems/detail/real.hpp"

namespace stepcert::problems {

/// Solves Kepler's equation E - e sin E = t (0 <= e < 1) to about U's epsilon and returns E
/// modulo 2π, in [-π - e, π + e]: all the exact solution needs are cos E and sin E, and the
/// reduction keeps Newton's relative stopping test meaningful at large t.
/// Throws accuracy_unreachable if Newton's method has not converged in 200 iterations.
template <class U>
U kepler_eccentric_anomaly(const U& e, const U& t) {
    using std::cos;
    using std::nearbyint;
    using std::sin;
    // E(t + 2πk) = E(t) + 2πk, so solve for t reduced to [-π, π].
    const U two_pi = boost::math::constants::two_pi<U>();
    const U tr = t - U(nearbyint(t / two_pi)) * two_pi;
    // f(E) = E - e sin E - tr is increasing (f' >= 1 - e > 0) and its root lies in [tr - e, tr + e];
    // the wider bracket [tr - 1, tr + 1] keeps the root strictly inside.
    auto f = [&](const U& E) { return std::pair<U, U>(E - e * sin(E) - tr, 1 - e * cos(E)); };
    // Newton converges quadratically: once the step is below 2^(-0.6 digits) relative, the
    // error after that step is far below one ulp (Boost.Math's advice for this parameter).
    const int digits = std::numeric_limits<U>::digits * 3 / 5;
    constexpr std::uintmax_t budget = 200;
    std::uintmax_t iterations = budget;
    const U guess = tr + e * sin(tr);
    const U E = boost::math::tools::newton_raphson_iterate(f, guess, U(tr - 1), U(tr + 1), digits, iterations);
    if (iterations >= budget)
        throw accuracy_unreachable("stepcert::problems::kepler: Newton's method on Kepler's equation did not "
                                   "converge in 200 iterations (t = " + detail::param_text(t) +
                                   "); use a smaller eccentricity or a shorter interval.");
    return E;
}

struct kepler_rhs {
    template <state S, class Time>
    void operator()(const S& y, S& dydt, const Time&) const {
        using U = scalar_of<S>;
        using std::sqrt;
        const U r2 = y[0] * y[0] + y[1] * y[1];
        const U inv_r3 = 1 / (r2 * sqrt(r2));
        dydt[0] = y[2];
        dydt[1] = y[3];
        dydt[2] = -y[0] * inv_r3;
        dydt[3] = -y[1] * inv_r3;
    }
};

template <class T>
struct kepler_exact {
    T eccentricity;
    template <class Time, state S>
    void operator()(const Time& time, S& y) const {
        using U = scalar_of<S>;
        using std::cos;
        using std::sin;
        using std::sqrt;
        const U e = static_cast<U>(eccentricity);
        const U E = kepler_eccentric_anomaly<U>(e, static_cast<U>(time));
        const U c = cos(E), s = sin(E);
        const U b = sqrt((1 - e) * (1 + e));
        const U dE = 1 / (1 - e * c);
        y[0] = c - e;
        y[1] = b * s;
        y[2] = -s * dE;
        y[3] = b * c * dE;
    }
};

struct kepler_jacobian {
    template <state S, class Time, matrix_sink M>
    void operator()(const S& y, const Time&, M& J) const {
        using U = scalar_of<S>;
        using std::sqrt;
        const U r2 = y[0] * y[0] + y[1] * y[1];
        const U inv_r3 = 1 / (r2 * sqrt(r2));
        const U inv_r5 = inv_r3 / r2;
        for (std::size_t i = 0; i < 4; ++i)
            for (std::size_t j = 0; j < 4; ++j) detail::set_entry(J, i, j, U(0));
        detail::set_entry(J, 0, 2, U(1));
        detail::set_entry(J, 1, 3, U(1));
        detail::set_entry(J, 2, 0, U(3 * y[0] * y[0] * inv_r5 - inv_r3));
        detail::set_entry(J, 2, 1, U(3 * y[0] * y[1] * inv_r5));
        detail::set_entry(J, 3, 0, U(3 * y[0] * y[1] * inv_r5));
        detail::set_entry(J, 3, 1, U(3 * y[1] * y[1] * inv_r5 - inv_r3));
    }
};

/// Kepler problem with eccentricity 0 <= e < 1 on [0, t1].
/// State: std::array<T, 4> = (x, y, x', y'), i.e. (q, p) with q = position, p = velocity;
/// marked separable. Exact solution and Jacobian attached.
template <class T = double>
auto kepler(std::type_identity_t<T> e, std::type_identity_t<T> t1 = T(20)) {
    detail::require_real<T>();
    detail::require_finite(e, "the eccentricity e", "kepler");
    if (!(e >= 0 && e < 1))
        throw invalid_input("stepcert::problems::kepler: the eccentricity must satisfy 0 <= e < 1 (got " +
                            detail::param_text(e) + "); e >= 1 is not a closed orbit.");
    using std::sqrt;
    const T vy0 = sqrt((1 + e) / (1 - e));
    return make_problem("kepler(e=" + detail::param_text(e) + ")", kepler_rhs{},
                        std::array<T, 4>{T(1 - e), T(0), T(0), vy0}, T(0), t1)
        .with_exact(kepler_exact<T>{e})
        .with_jacobian(kepler_jacobian{})
        .as_separable();
}

} // namespace stepcert::problems
