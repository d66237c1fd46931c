#pragma once
// Scenario of our own (invented data, no closed form): a quarter-car suspension rig driving
// over a smooth bump. A sprung mass (a quarter of the body) sits on a progressive spring and an
// asymmetric damper above an unsprung mass (wheel, hub), which rests on a linear tyre spring:
//
//   d = zs - zu,  v = vs - vu,  spring  Fs = ks d + k3 d³  (stiffens with deflection),
//   damper  Fd = c(v) v,  c(v) = (c_bump + c_rebound)/2 + (c_rebound - c_bump)/2 · tanh(v / v_smooth),
//   tyre    Ft = kt (r(t) - zu),  road bump  r(t) = h exp(-((t - t_c)/w)²),
//   ms vs' = -Fs - Fd,  mu vu' = Fs + Fd + Ft.
//
// Displacements are measured from static equilibrium (gravity drops out). The damper is softer
// in compression (bump) than in extension (rebound), as is usual for road vehicles. The bump is
// C^∞, so convergence orders are not spoiled by a kink in the input, and the damper's blend is
// wide (0.3 m/s), so classic RK4 is in its asymptotic range from h = 0.01 s on. At the default
// data the Jacobian's eigenvalues have modulus below about 100 s⁻¹: non-stiff for explicit
// methods with h below about 0.02 s.
#include <array>
#include <cmath>
#include <concepts>
#include <type_traits>

#include "stepcert/core/error.hpp"
#include "stepcert/core/problem.hpp"
#include "stepcert/problems/detail/real.hpp"

namespace stepcert::problems {

/// Rig data in integers of the stated units, so every scalar type reads them exactly.
struct suspension_data {
    long long sprung_mass_kg = 300;
    long long unsprung_mass_kg = 40;
    long long spring_n_per_m = 20000;          ///< ks
    long long spring_cubic_n_per_m3 = 2000000; ///< k3: +25 % stiffness at 5 cm deflection
    long long tyre_n_per_m = 180000;           ///< kt
    long long damper_bump_ns_per_m = 1500;     ///< compression (v < 0)
    long long damper_rebound_ns_per_m = 3500;  ///< extension (v > 0)
    long long damper_smoothing_mm_per_s = 300; ///< v_smooth of the tanh blend
    long long bump_height_mm = 40;             ///< h
    long long bump_centre_ms = 500;            ///< t_c
    long long bump_width_ms = 50;              ///< w (about 0.6 m of road at 12 m/s)
};

/// The rig's coefficients in SI units, in scalar U.
template <class U>
struct suspension_coefficients {
    U ms, mu, ks, k3, kt, c_mean, c_half_diff, v_smooth, h, tc, w;

    static suspension_coefficients from(const suspension_data& d) {
        using detail::ratio;
        return {ratio<U>(d.sprung_mass_kg, 1), ratio<U>(d.unsprung_mass_kg, 1), ratio<U>(d.spring_n_per_m, 1),
                ratio<U>(d.spring_cubic_n_per_m3, 1), ratio<U>(d.tyre_n_per_m, 1),
                ratio<U>(d.damper_bump_ns_per_m + d.damper_rebound_ns_per_m, 2),
                ratio<U>(d.damper_rebound_ns_per_m - d.damper_bump_ns_per_m, 2),
                ratio<U>(d.damper_smoothing_mm_per_s, 1000), ratio<U>(d.bump_height_mm, 1000),
                ratio<U>(d.bump_centre_ms, 1000), ratio<U>(d.bump_width_ms, 1000)};
    }

    U road(const U& t) const {
        using std::exp;
        const U s = (t - tc) / w;
        return h * exp(-s * s);
    }
};

template <class T>
struct suspension_rig_rhs {
    suspension_data data;
    suspension_coefficients<T> cached = suspension_coefficients<T>::from(data);

    template <state S, class Time>
    void operator()(const S& y, S& dydt, const Time& time) const {
        using U = scalar_of<S>;
        if constexpr (std::same_as<U, T>)
            evaluate(cached, y, dydt, static_cast<U>(time));
        else
            evaluate(suspension_coefficients<U>::from(data), y, dydt, static_cast<U>(time));
    }

private:
    template <class U, class S>
    static void evaluate(const suspension_coefficients<U>& k, const S& y, S& dydt, const U& t) {
        using std::tanh;
        const U d = y[0] - y[1];
        const U v = y[2] - y[3];
        const U fs = k.ks * d + k.k3 * d * d * d;
        const U fd = (k.c_mean + k.c_half_diff * tanh(v / k.v_smooth)) * v;
        const U ft = k.kt * (k.road(t) - y[1]);
        dydt[0] = y[2];
        dydt[1] = y[3];
        dydt[2] = -(fs + fd) / k.ms;
        dydt[3] = (fs + fd + ft) / k.mu;
    }
};

struct suspension_rig_jacobian {
    suspension_data data;

    template <state S, class Time, matrix_sink M>
    void operator()(const S& y, const Time&, M& J) const {
        using U = scalar_of<S>;
        using std::tanh;
        const auto k = suspension_coefficients<U>::from(data);
        const U d = y[0] - y[1];
        const U v = y[2] - y[3];
        const U th = tanh(v / k.v_smooth);
        const U dfs = k.ks + 3 * k.k3 * d * d;                                      // dFs/dd
        const U dfd = k.c_mean + k.c_half_diff * (th + v * (1 - th * th) / k.v_smooth);  // dFd/dv
        for (std::size_t i = 0; i < 4; ++i)
            for (std::size_t j = 0; j < 4; ++j) detail::set_entry(J, i, j, U(0));
        detail::set_entry(J, 0, 2, U(1));
        detail::set_entry(J, 1, 3, U(1));
        detail::set_entry(J, 2, 0, U(-dfs / k.ms));
        detail::set_entry(J, 2, 1, U(dfs / k.ms));
        detail::set_entry(J, 2, 2, U(-dfd / k.ms));
        detail::set_entry(J, 2, 3, U(dfd / k.ms));
        detail::set_entry(J, 3, 0, U(dfs / k.mu));
        detail::set_entry(J, 3, 1, U(-(dfs + k.kt) / k.mu));
        detail::set_entry(J, 3, 2, U(dfd / k.mu));
        detail::set_entry(J, 3, 3, U(-dfd / k.mu));
    }
};

/// Quarter-car rig starting at rest on [0, t1] seconds (bump centred at 0.5 s by default).
/// State: std::array<T, 4> = (zs, zu, vs, vu) in m and m/s (sprung and unsprung displacement,
/// then their velocities). Not separable (the damper couples velocities). Jacobian attached;
/// no exact solution.
template <class T = double>
auto suspension_rig(std::type_identity_t<T> t1 = T(3), const suspension_data& data = {}) {
    detail::require_real<T>();
    if (data.sprung_mass_kg <= 0 || data.unsprung_mass_kg <= 0 || data.spring_n_per_m <= 0 ||
        data.spring_cubic_n_per_m3 < 0 || data.tyre_n_per_m <= 0 || data.damper_bump_ns_per_m <= 0 ||
        data.damper_rebound_ns_per_m <= 0 || data.damper_smoothing_mm_per_s <= 0 || data.bump_width_ms <= 0)
        throw invalid_input("stepcert::problems::suspension_rig: masses, stiffnesses, damping rates, the damper "
                            "smoothing speed and the bump width must be positive (the cubic spring term may be 0).");
    return make_problem("suspension_rig", suspension_rig_rhs<T>{data}, std::array<T, 4>{}, T(0), t1)
        .with_jacobian(suspension_rig_jacobian{data});
}

} // namespace stepcert::problems
