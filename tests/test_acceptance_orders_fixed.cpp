// Acceptance: every wrapped fixed-step method's order, fitted by order_study over the detected
// asymptotic range with a 95% confidence interval, matches its declared order on two problems
// with exact solutions:
//  - Kepler's problem e = 0.5 on [0, 20] (DETEST class D: Hull, Enright, Fellen, Sedgwick, SIAM J.
//    Numer. Anal. 9 (1972) 603–637; exact solution from Kepler's equation);
//  - the linear 3x3 system of problems/linear_system.hpp (exact solution by its eigen-decomposition,
//    checked against Eigen's matrix exponential in test_problems_linear).
// Declared orders are the methods' published design orders (Euler 1, midpoint 2, Kutta's RK4 4,
// Adams–Bashforth–Moulton k-step k, Cash–Karp 1990 5, Dormand–Prince 1980 5; Fehlberg 7(8) is in test_acceptance_orders_adaptive.cpp).
#include <cstdio>
#include <string>

#include <gtest/gtest.h>

#include "stepcert/stepcert.hpp"
#include "stepcert/testing/gtest.hpp"

// Helpers and tests in a namespace of this file: the acceptance files are compiled as one unity
// batch, where helpers of the same name in anonymous namespaces would silently overload each other.
namespace test_acceptance_orders_fixed {
using stepcert::step_ladder;
using stepcert::testing::converges_at_declared_order;

const auto kepler = stepcert::problems::kepler(0.5, 20.0);
const auto linear = stepcert::problems::linear_system(4.0);

template <class P, class M>
void expect_declared_order(const P& p, const M& m, step_ladder ladder) {
    const auto r = stepcert::order_study(p, m, ladder);
    EXPECT_TRUE(converges_at_declared_order(r, 0.2));
    EXPECT_TRUE(r.fit.has_interval()) << stepcert::study_table(r);
    // Orders are whole numbers: the whole 95% interval must round to the declared order, so the
    // study tells it from the orders next to it (derived). Measured widths 0.006 .. 0.23; with
    // three fitted points (one degree of freedom, Student's t 12.7) ABM4 on Kepler gave
    // [3.57, 4.20], so its ladder has eight levels (five points, [3.88, 3.99]).
    const double declared = static_cast<double>(m.order());
    EXPECT_GT(r.fit.lower, declared - 0.5) << stepcert::study_table(r);
    EXPECT_LT(r.fit.upper, declared + 0.5) << stepcert::study_table(r);
    std::printf("[ figures ] %s on %s: fitted %.3f, 95%% CI [%.3f, %.3f] over %zu levels\n", std::string(m.name()).c_str(),
                p.name().c_str(), r.fit.order, r.fit.lower, r.fit.upper, r.fit.points);
    EXPECT_EQ(r.basis, stepcert::error_basis::exact_solution);
}

TEST(AcceptanceOrders, ExplicitEuler) {
    // Kepler on [0, 2]: over 20 time units Euler has no correct digit before 10^5 steps.
    expect_declared_order(stepcert::problems::kepler(0.5, 2.0), stepcert::explicit_euler, {500, 2.0, 7});
    expect_declared_order(linear, stepcert::explicit_euler, {64, 2.0, 8});
}
TEST(AcceptanceOrders, ExplicitMidpoint) {
    expect_declared_order(kepler, stepcert::explicit_midpoint, {500, 2.0, 7});
    expect_declared_order(linear, stepcert::explicit_midpoint, {32, 2.0, 8});
}
TEST(AcceptanceOrders, ClassicRk4) {
    expect_declared_order(kepler, stepcert::classic_rk4, {200, 2.0, 7});
    expect_declared_order(linear, stepcert::classic_rk4, {16, 2.0, 7});
}
TEST(AcceptanceOrders, AdamsBashforthMoulton4) {
    expect_declared_order(kepler, stepcert::adams_bashforth_moulton<4>, {400, 2.0, 8});
    expect_declared_order(linear, stepcert::adams_bashforth_moulton<4>, {32, 2.0, 7});
}
TEST(AcceptanceOrders, CashKarp54) {
    expect_declared_order(kepler, stepcert::cash_karp54, {200, 2.0, 6});
    expect_declared_order(linear, stepcert::cash_karp54, {16, 2.0, 6});
}
TEST(AcceptanceOrders, DormandPrince54) {
    expect_declared_order(kepler, stepcert::dormand_prince54, {200, 2.0, 6});
    expect_declared_order(linear, stepcert::dormand_prince54, {16, 2.0, 6});
}
TEST(AcceptanceOrders, SymplecticRkn) {
    // Separable problems: Kepler (x, y, x', y') and the harmonic oscillator (q, p), exact cos/sin.
    expect_declared_order(kepler, stepcert::symplectic_rkn, {200, 2.0, 6});
    expect_declared_order(stepcert::problems::harmonic_oscillator(1.0, 10.0), stepcert::symplectic_rkn, {16, 2.0, 7});
}

} // namespace test_acceptance_orders_fixed
