#pragma once
// Scenario of our own (invented data, no closed form): a small satellite in a low, inclined,
// slightly eccentric orbit about an oblate planet, gravity with the J2 (flattening) term:
//
//   r'' = -r/|r|³ - (3/2) J2 / |r|⁵ · ( x (1 - 5z²/|r|²),  y (1 - 5z²/|r|²),  z (3 - 5z²/|r|²) ).
//
// Units: length in planet radii R, time in sqrt(R³/GM), so GM = 1 and R = 1. For the invented
// planet (R = 6400 km, GM = 4.0e5 km³/s²) the time unit is about 810 s. Invented data:
// J2 = 3/2000; start at r = (6/5, 0, 0) (1280 km altitude, the perigee), velocity 51/50 of the circular speed
// √(5/6), in a plane inclined by arccos(3/5) ≈ 53.1° (a 3-4-5 triangle keeps it exact):
// v = (51/50) √(5/6) · (0, 3/5, 4/5). Orbital period about 8.8 time units; the J2 term turns the
// orbital plane slowly (nodal regression), so the orbit does not close.
// The force has the potential V = -1/|r| + (J2/2) (3z²/|r|² - 1)/|r|³, so the energy
// |v|²/2 + V is conserved (small_satellite_energy); the system is separable (q = r, p = v).
#include <array>
#include <cmath>
#include <concepts>
#include <type_traits>

#include "stepcert/core/problem.hpp"
#include "stepcert/problems/detail/real.hpp"

namespace stepcert::problems {

/// J2 of the invented planet, 3/2000, in U.
template <class U>
U small_satellite_j2() {
    return detail::ratio<U>(3, 2000);
}

template <class T>
struct small_satellite_rhs {
    T j2 = small_satellite_j2<T>();

    template <state S, class Time>
    void operator()(const S& y, S& dydt, const Time&) const {
        using U = scalar_of<S>;
        if constexpr (std::same_as<U, T>)
            evaluate<U>(j2, y, dydt);
        else
            evaluate<U>(small_satellite_j2<U>(), y, dydt);
    }

private:
    template <class U, class S>
    static void evaluate(const U& j2c, const S& y, S& dydt) {
        using std::sqrt;
        const U r2 = y[0] * y[0] + y[1] * y[1] + y[2] * y[2];
        const U inv_r3 = 1 / (r2 * sqrt(r2));
        const U zz = 5 * y[2] * y[2] / r2;
        const U k = 3 * j2c * inv_r3 / (2 * r2);  // (3/2) J2 / r⁵
        dydt[0] = y[3];
        dydt[1] = y[4];
        dydt[2] = y[5];
        dydt[3] = -y[0] * (inv_r3 + k * (1 - zz));
        dydt[4] = -y[1] * (inv_r3 + k * (1 - zz));
        dydt[5] = -y[2] * (inv_r3 + k * (3 - zz));
    }
};

/// Initial state (x, y, z, vx, vy, vz) of small_satellite(), exact up to the square root.
template <class T = double>
std::array<T, 6> small_satellite_initial_state() {
    detail::require_real<T>();
    using std::sqrt;
    const T speed = detail::ratio<T>(51, 50) * sqrt(detail::ratio<T>(5, 6));
    return {detail::ratio<T>(6, 5), T(0), T(0), T(0), speed * 3 / 5, speed * 4 / 5};
}

/// Energy |v|²/2 - 1/|r| + (J2/2)(3z²/|r|² - 1)/|r|³: conserved along exact solutions.
template <state S>
scalar_of<S> small_satellite_energy(const S& y) {
    using U = scalar_of<S>;
    using std::sqrt;
    const U r2 = y[0] * y[0] + y[1] * y[1] + y[2] * y[2];
    const U r = sqrt(r2);
    const U v2 = y[3] * y[3] + y[4] * y[4] + y[5] * y[5];
    return v2 / 2 - 1 / r + small_satellite_j2<U>() / 2 * (3 * y[2] * y[2] / r2 - 1) / (r2 * r);
}

/// Small satellite with J2 on [0, t1] (default 30 time units, about 3.4 revolutions).
/// State: std::array<T, 6> = (x, y, z, vx, vy, vz); marked separable. No exact solution, no Jacobian.
template <class T = double>
auto small_satellite(std::type_identity_t<T> t1 = T(30)) {
    detail::require_real<T>();
    return make_problem("small_satellite", small_satellite_rhs<T>{}, small_satellite_initial_state<T>(), T(0), t1)
        .as_separable();
}

} // namespace stepcert::problems
