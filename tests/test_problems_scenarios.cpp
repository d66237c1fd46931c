// The scenario problems of our own (suspension_rig, small_satellite): they run without NaN,
// converge at RK4's order (so the data are smooth and non-stiff at the documented steps), keep
// their invariants, and their right-hand sides are generic (the same in cpp_bin_float_50).
#include "stepcert/reference/odeint_multiprecision.hpp"  // before odeint (Boost 1.81 fix)

#include <algorithm>
#include <array>
#include <cmath>
#include <complex>
#include <cstddef>
#include <vector>

#include <Eigen/Dense>
#include <boost/numeric/odeint/stepper/runge_kutta4.hpp>
#include <gtest/gtest.h>

#include "stepcert/problems/small_satellite.hpp"
#include "stepcert/problems/suspension_rig.hpp"
#include "test_problems_support.hpp"

namespace {

namespace pr = stepcert::problems;
using problems_test::mp;

/// n steps of odeint's classic RK4 over [t0, t1] in scalar U; calls visit(y, t) after each step
/// and returns the final state. Fails the test at the first non-finite state.
template <class U, class P, class Visit>
auto rk4_run(const P& p, std::size_t n, Visit visit) {
    using S = stepcert::rebind_state<typename P::state_type, U>;
    S y = stepcert::convert_state<S>(p.y0());
    boost::numeric::odeint::runge_kutta4<S, U> stepper;
    auto rhs = p.rhs();
    const U t0 = U(p.t0());
    const U h = (U(p.t1()) - t0) / U(n);
    for (std::size_t k = 0; k < n; ++k) {
        stepper.do_step(rhs, y, U(t0 + U(k) * h), h);
        const U t = U(t0 + U(k + 1) * h);
        if (!stepcert::all_finite(y)) {
            ADD_FAILURE() << p.name() << ": non-finite state at t = " << static_cast<double>(t);
            return y;
        }
        visit(y, t);
    }
    return y;
}

/// States after every n/60 of n RK4 steps (a grid common to n, 2n, 4n).
template <class P>
auto rk4_grid(const P& p, std::size_t n) {
    std::vector<typename P::state_type> out;
    std::size_t k = 0;
    rk4_run<double>(p, n, [&](const auto& y, double) {
        if (++k % (n / 60) == 0) out.push_back(y);
    });
    return out;
}

template <std::size_t N>
double max_difference(const std::array<double, N>& a, const std::array<double, N>& b) {
    double d = 0;
    for (std::size_t i = 0; i < N; ++i) d = std::max(d, std::abs(a[i] - b[i]));
    return d;
}

template <class S>
double max_difference(const std::vector<S>& a, const std::vector<S>& b) {
    double d = 0;
    for (std::size_t j = 0; j < a.size(); ++j) d = std::max(d, max_difference(a[j], b[j]));
    return d;
}

const auto ignore = [](const auto&, const auto&) {};

// Fact of the trade (common practice, no source): classic RK4's global error is O(h⁴), so on a
// smooth, resolved problem the differences of runs at h, h/2, h/4 shrink by about 2⁴ = 16
// (measured 17.1 and 16.7 here at these steps, derived).
TEST(SuspensionRig, RunsWithoutNaNAndConvergesAtFourthOrder) {
    const auto p = pr::suspension_rig();
    const auto g1 = rk4_grid(p, 600);
    const auto g2 = rk4_grid(p, 1200);
    const auto g4 = rk4_grid(p, 2400);
    ASSERT_EQ(g1.size(), 60u);
    const double ratio = max_difference(g1, g2) / max_difference(g2, g4);
    EXPECT_GT(ratio, 13.0);
    EXPECT_LT(ratio, 20.0);
    EXPECT_LT(max_difference(g2, g4), 1e-5);  // m and m/s, measured 5.6e-6
    // The bump moves the body by millimetres to centimetres, and the dampers settle it by t1.
    double peak = 0;
    for (const auto& y : g4) peak = std::max(peak, std::abs(y[0]));
    EXPECT_GT(peak, 1e-3);
    EXPECT_LT(peak, 0.1);
    EXPECT_LT(std::abs(g4.back()[0]), 0.01 * peak);
}

// The header's claim "eigenvalues below about 100 s⁻¹" along the trajectory (derived here with
// Eigen's general eigenvalue solver): explicit methods are stable with h below about 0.02 s.
TEST(SuspensionRig, IsNonStiffAtTheDefaultData) {
    const auto p = pr::suspension_rig();
    double largest = 0;
    rk4_run<double>(p, 1200, [&](const auto& y, double t) {
        Eigen::Matrix4d J;
        p.jacobian()(y, t, J);
        const Eigen::EigenSolver<Eigen::Matrix4d> es(J, false);
        for (int i = 0; i < 4; ++i) largest = std::max(largest, std::abs(es.eigenvalues()(i)));
    });
    EXPECT_GT(largest, 10.0);
    EXPECT_LT(largest, 100.0);
}

// Invariants of the axially symmetric J2 field (common practice, no source): the energy and the
// z-component of the angular momentum are conserved, while the orbital plane turns (L_x, L_y
// change). RK4's final states converge at fourth order (ratio about 16, measured 16.9, derived).
TEST(SmallSatellite, KeepsItsInvariantsAndItsPlaneTurns) {
    const auto p = pr::small_satellite();
    const auto y0 = p.y0();
    const double e0 = pr::small_satellite_energy(y0);
    const auto lz = [](const auto& y) { return y[0] * y[4] - y[1] * y[3]; };
    const auto lx = [](const auto& y) { return y[1] * y[5] - y[2] * y[4]; };
    double energy_drift = 0, lz_drift = 0;
    const auto y1 = rk4_run<double>(p, 3000, ignore);
    const auto y2 = rk4_run<double>(p, 6000, [&](const auto& y, double) {
        energy_drift = std::max(energy_drift, std::abs(pr::small_satellite_energy(y) - e0));
        lz_drift = std::max(lz_drift, std::abs(lz(y) - lz(y0)));
    });
    const auto y4 = rk4_run<double>(p, 12000, ignore);
    const double ratio = max_difference(y1, y2) / max_difference(y2, y4);
    EXPECT_GT(ratio, 13.0);
    EXPECT_LT(ratio, 20.0);
    EXPECT_LT(energy_drift, 1e-9);
    EXPECT_LT(lz_drift, 1e-9);
    EXPECT_GT(std::abs(lx(y4) - lx(y0)), 1e-3);  // J2 turns the plane: a visible effect
}

// Generic right-hand sides: the double-built problems evaluated in cpp_bin_float_50 agree with
// their double evaluation to rounding, and the problems built in cpp_bin_float_50 integrate.
TEST(Scenarios, RhsIsGenericInTheScalarType) {
    const auto rig = pr::suspension_rig();
    const std::array<double, 4> ys{0.02, -0.01, 0.3, -0.5};
    std::array<double, 4> fd{};
    std::array<mp, 4> fm{};
    auto r1 = rig.rhs();
    r1(ys, fd, 0.49);
    r1(stepcert::convert_state<std::array<mp, 4>>(ys), fm, mp(0.49));
    for (std::size_t i = 0; i < 4; ++i)
        EXPECT_NEAR(fd[i], static_cast<double>(fm[i]), 1e-14 * (1 + std::abs(fd[i]))) << i;

    const auto sat = pr::small_satellite();
    const std::array<double, 6> yq{1.1, -0.3, 0.4, 0.2, 0.7, -0.5};
    std::array<double, 6> gd{};
    std::array<mp, 6> gm{};
    auto r2 = sat.rhs();
    r2(yq, gd, 0.0);
    r2(stepcert::convert_state<std::array<mp, 6>>(yq), gm, mp(0));
    for (std::size_t i = 0; i < 6; ++i)
        EXPECT_NEAR(gd[i], static_cast<double>(gm[i]), 1e-15 * (1 + std::abs(gd[i]))) << i;

    // Built in cpp_bin_float_50: a short RK4 run matches the double one to double's rounding.
    const auto rig_mp = pr::suspension_rig<mp>(mp(1));
    const auto rig_d = pr::suspension_rig(1.0);
    const auto zm = rk4_run<mp>(rig_mp, 200, ignore);
    const auto zd = rk4_run<double>(rig_d, 200, ignore);
    for (std::size_t i = 0; i < 4; ++i) EXPECT_NEAR(zd[i], static_cast<double>(zm[i]), 1e-13) << i;
    const auto sat_mp = pr::small_satellite<mp>(mp(2));
    const auto qm = rk4_run<mp>(sat_mp, 100, ignore);
    const auto qd = rk4_run<double>(pr::small_satellite(2.0), 100, ignore);
    for (std::size_t i = 0; i < 6; ++i) EXPECT_NEAR(qd[i], static_cast<double>(qm[i]), 1e-13) << i;
}

} // namespace
