#pragma once
// Arenstorf orbit of the restricted three-body problem (a small body moving with the Earth and
// the Moon in the rotating frame), one period. Mass ratio μ = 0.012277471, μ' = 1 - μ:
//   y1'' = y1 + 2 y2' - μ' (y1 + μ)/D1 - μ (y1 - μ')/D2,
//   y2'' = y2 - 2 y1' - μ' y2/D1 - μ y2/D2,
//   D1 = ((y1 + μ)² + y2²)^{3/2},  D2 = ((y1 - μ')² + y2²)^{3/2},
//   y1(0) = 0.994, y1'(0) = 0, y2(0) = 0, y2'(0) = v0, and after one period T the orbit is back at y(0).
// Published: v0 = -2.00158510637908252240537862224, T = 17.0652165601579625588917206249
// (E. Hairer, S. P. Nørsett, G. Wanner, Solving Ordinary Differential Equations I, 2nd ed.,
// Springer 1993, §II.0). With these constants the orbit closes only to 4.564e-27 (max norm, in
// y2'; measured as below), however exactly it is integrated.
// Recomputed (derived by us: 100-digit MPFR, Newton shooting on the two half-period symmetry
// conditions, Bulirsch-Stoer at tolerance 1e-45; given here to 40 significant digits):
// v0 = -2.001585106379082522405378622238858647377, T = 17.06521656015796255889172062483835451737.
// As given they close the orbit to 3.6e-37 (max norm, in y1'; measured with 100-digit MPFR
// Bulirsch-Stoer at tolerances 1e-45, 1e-50 and 1e-55, which agree to 7e-45): T rounded to 40
// digits, about 1.1e-39 from the true period, times |y'(0)| (y1'' = -315.5) accounts for it.
// A 50-digit integration shows less: 1.7e-32 at tolerance 1e-33, 4.6e-35 at 1e-36 (its own error).
// There is no closed form: the only exact value is the return to y(0) at t = T, offered by
// arenstorf_period_end_state(), not as an exact solution.
#include <array>
#include <cmath>
#include <concepts>
#include <type_traits>

#include "stepcert/core/problem.hpp"
#include "stepcert/problems/detail/real.hpp"

namespace stepcert::problems {

/// Which initial velocity and period to use.
enum class arenstorf_constants {
    published,   ///< Hairer, Nørsett, Wanner (1993): closes to 4.6e-27
    recomputed,  ///< our 40-digit recomputation (derived): closes to 3.6e-37
};

/// μ = 0.012277471 = 12277471 / 10⁹, correctly rounded in T.
template <class T = double>
T arenstorf_mass_ratio() {
    detail::require_real<T>();
    return detail::ratio<T>(12277471, 1000000000);
}

/// The period T after which the orbit returns to its initial state.
template <class T = double>
T arenstorf_period(arenstorf_constants which = arenstorf_constants::published) {
    detail::require_real<T>();
    return which == arenstorf_constants::published ? detail::decimal<T>("17.0652165601579625588917206249")
                                                   : detail::decimal<T>("17.06521656015796255889172062483835451737");
}

/// Initial state (y1, y2, y1', y2') = (0.994, 0, 0, v0), built from decimal strings in T.
template <class T = double>
std::array<T, 4> arenstorf_initial_state(arenstorf_constants which = arenstorf_constants::published) {
    detail::require_real<T>();
    const T v0 = which == arenstorf_constants::published
                     ? detail::decimal<T>("-2.00158510637908252240537862224")
                     : detail::decimal<T>("-2.001585106379082522405378622238858647377");
    return {detail::ratio<T>(994, 1000), T(0), T(0), v0};
}

/// The exact state at t = arenstorf_period(which): the initial state again. The published
/// constants make this true only to 4.6e-27, the recomputed ones to 3.6e-37 (max norm).
template <class T = double>
std::array<T, 4> arenstorf_period_end_state(arenstorf_constants which = arenstorf_constants::published) {
    return arenstorf_initial_state<T>(which);
}

template <class T>
struct arenstorf_rhs {
    T mu = arenstorf_mass_ratio<T>();  // cached in the problem's scalar; other scalars rebuild it

    template <state S, class Time>
    void operator()(const S& y, S& dydt, const Time&) const {
        using U = scalar_of<S>;
        if constexpr (std::same_as<U, T>)
            evaluate<U>(mu, y, dydt);
        else
            evaluate<U>(arenstorf_mass_ratio<U>(), y, dydt);
    }

private:
    template <class U, class S>
    static void evaluate(const U& m, const S& y, S& dydt) {
        using std::sqrt;
        const U m1 = 1 - m;
        const U a1 = y[0] + m, a2 = y[0] - m1;
        const U r1sq = a1 * a1 + y[1] * y[1];
        const U r2sq = a2 * a2 + y[1] * y[1];
        const U d1 = r1sq * sqrt(r1sq);
        const U d2 = r2sq * sqrt(r2sq);
        dydt[0] = y[2];
        dydt[1] = y[3];
        dydt[2] = y[0] + 2 * y[3] - m1 * a1 / d1 - m * a2 / d2;
        dydt[3] = y[1] - 2 * y[2] - m1 * y[1] / d1 - m * y[1] / d2;
    }
};

struct arenstorf_jacobian {
    template <state S, class Time, matrix_sink M>
    void operator()(const S& y, const Time&, M& J) const {
        using U = scalar_of<S>;
        using std::sqrt;
        const U m = arenstorf_mass_ratio<U>();
        const U m1 = 1 - m;
        const U a1 = y[0] + m, a2 = y[0] - m1;
        const U r1sq = a1 * a1 + y[1] * y[1];
        const U r2sq = a2 * a2 + y[1] * y[1];
        const U i3 = 1 / (r1sq * sqrt(r1sq)), i5 = i3 / r1sq;  // 1/r1³, 1/r1⁵
        const U k3 = 1 / (r2sq * sqrt(r2sq)), k5 = k3 / r2sq;  // 1/r2³, 1/r2⁵
        const U cross = 3 * y[1] * (m1 * a1 * i5 + m * a2 * k5);
        for (std::size_t i = 0; i < 4; ++i)
            for (std::size_t j = 0; j < 4; ++j) detail::set_entry(J, i, j, U(0));
        detail::set_entry(J, 0, 2, U(1));
        detail::set_entry(J, 1, 3, U(1));
        detail::set_entry(J, 2, 0, U(1 - m1 * (i3 - 3 * a1 * a1 * i5) - m * (k3 - 3 * a2 * a2 * k5)));
        detail::set_entry(J, 2, 1, cross);
        detail::set_entry(J, 2, 3, U(2));
        detail::set_entry(J, 3, 0, cross);
        detail::set_entry(J, 3, 1, U(1 - m1 * (i3 - 3 * y[1] * y[1] * i5) - m * (k3 - 3 * y[1] * y[1] * k5)));
        detail::set_entry(J, 3, 2, U(-2));
    }
};

/// One period of the Arenstorf orbit, [0, arenstorf_period<T>(which)].
/// State: std::array<T, 4> = (y1, y2, y1', y2'). Not separable (Coriolis terms).
/// Jacobian attached; no exact solution (see arenstorf_period_end_state). Build it in a
/// multiprecision T when the initial state must carry more than double's 16 digits.
template <class T = double>
auto arenstorf_orbit(arenstorf_constants which = arenstorf_constants::published) {
    detail::require_real<T>();
    const char* label = which == arenstorf_constants::published ? "arenstorf_orbit(published)"
                                                                : "arenstorf_orbit(recomputed)";
    return make_problem(label, arenstorf_rhs<T>{}, arenstorf_initial_state<T>(which), T(0),
                        arenstorf_period<T>(which))
        .with_jacobian(arenstorf_jacobian{});
}

} // namespace stepcert::problems
