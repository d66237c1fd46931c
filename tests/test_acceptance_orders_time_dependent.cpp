// Acceptance: every wrapped method converges at its declared order on a right-hand side that
// depends on t (the Kepler and linear acceptance problems do not, and a method's handling of t
// is where a defect hides: odeint's Rosenbrock 4 coefficient set loses three orders there, see
// test_stiff_rosenbrock.cpp).
//
// The problem is made here with a chosen solution g(t) (manufactured solution, common practice,
// no source): y' = A(t) (y - g(t)) + g'(t), y(0) = g(0), so y = g exactly, with a coupling A(t)
// that varies in t, g = (1 + sin 2t, exp(-t/5) cos t) on [0, 2]: a heat exchanger whose two
// loops are coupled through a valve that opens and closes (an invented scenario). Two components,
// so the order conditions of a system, not only those of a scalar equation, are exercised.
// Declared orders are the published design orders (as in test_acceptance_orders_fixed.cpp);
// Bulirsch–Stoer has none (variable order) and the symplectic method needs a separable,
// autonomous Hamiltonian, so neither is here.
#include <cmath>
#include <cstdio>
#include <string>
#include <vector>

#include <gtest/gtest.h>

#include "stepcert/methods/rosenbrock4.hpp"
#include "stepcert/methods/rosenbrock4_adaptive.hpp"
#include "stepcert/stepcert.hpp"
#include "stepcert/testing/gtest.hpp"

namespace test_acceptance_orders_time_dependent {
using stepcert::step_ladder;
using stepcert::tolerance_ladder;
using stepcert::testing::converges_at_declared_order;

struct valve_exchanger_rhs {
    template <class S, class Time>
    void operator()(const S& y, S& dydt, const Time& time) const {
        using U = stepcert::scalar_of<S>;
        using std::cos;
        using std::exp;
        using std::sin;
        const U t = static_cast<U>(time);
        const U g0 = 1 + sin(2 * t), g1 = exp(-t / 5) * cos(t);
        const U dg0 = 2 * cos(2 * t), dg1 = -exp(-t / 5) * (cos(t) / 5 + sin(t));
        const U a01 = 1 + sin(t) / 2, a10 = cos(3 * t) / 2;
        dydt[0] = -2 * (y[0] - g0) + a01 * (y[1] - g1) + dg0;
        dydt[1] = a10 * (y[0] - g0) - 3 * (y[1] - g1) + dg1;
    }
};

struct valve_exchanger_exact {
    template <class Time, class S>
    void operator()(const Time& time, S& y) const {
        using U = stepcert::scalar_of<S>;
        using std::cos;
        using std::exp;
        using std::sin;
        const U t = static_cast<U>(time);
        y[0] = 1 + sin(2 * t);
        y[1] = exp(-t / 5) * cos(t);
    }
};

const auto exchanger = stepcert::make_problem("valve-coupled exchanger (manufactured, depends on t)", valve_exchanger_rhs{},
                                              std::vector<double>{1.0, 1.0}, 0.0, 2.0)
                           .with_exact(valve_exchanger_exact{});

template <class T = void, class M>
void expect_declared_order(const M& m, step_ladder ladder) {
    const auto r = stepcert::order_study<T>(exchanger, m, ladder);
    EXPECT_TRUE(converges_at_declared_order(r, 0.2)) << stepcert::study_table(r);
    EXPECT_EQ(r.basis, stepcert::error_basis::exact_solution);
    std::printf("[ figures ] %s on the t-dependent exchanger: fitted %.3f, 95%% CI [%.3f, %.3f] over %zu levels\n",
                std::string(m.name()).c_str(), r.fit.order, r.fit.lower, r.fit.upper, r.fit.points);
}

// Adaptive runs are judged at t1 only: the largest error over a grid of dense-output points
// wanders with where the steps fall (measured: local orders 3.5 .. 5.9 for Dormand–Prince over
// 1e-6 .. 1e-11), while the error at t1 settles.
template <class T = void, class M>
void expect_declared_order(const M& m, tolerance_ladder ladder, double tolerance) {
    stepcert::study_options final_only;
    final_only.adaptive_grid_points = 1;
    const auto r = stepcert::order_study<T>(exchanger, m, ladder, final_only);
    EXPECT_TRUE(converges_at_declared_order(r, tolerance)) << stepcert::study_table(r);
    std::printf("[ figures ] %s on the t-dependent exchanger: fitted %.3f, 95%% CI [%.3f, %.3f] over %zu levels\n",
                std::string(m.name()).c_str(), r.fit.order, r.fit.lower, r.fit.upper, r.fit.points);
}

TEST(AcceptanceOrdersTimeDependent, FixedStepExplicit) {
    expect_declared_order(stepcert::explicit_euler, {16, 2.0, 8});
    expect_declared_order(stepcert::explicit_midpoint, {16, 2.0, 8});
    expect_declared_order(stepcert::classic_rk4, {8, 2.0, 7});
    expect_declared_order(stepcert::cash_karp54, {8, 2.0, 6});
    expect_declared_order(stepcert::dormand_prince54, {8, 2.0, 6});
}

#if defined(STEPCERT_HAVE_FLOAT128)  // GCC
TEST(AcceptanceOrdersTimeDependent, Fehlberg78InMultiprecision) {
    // In double the error reaches round-off (2e-16 at 64 steps) before the local orders settle
    // (8.63, 8.39, 8.22 from 4 steps on, measured); in float128 the range is long.
    expect_declared_order<stepcert::float128>(stepcert::fehlberg78, {8, 2.0, 6});
    // Adaptive, against the mean step: local orders 7.99 .. 8.50 over 1e-15 .. 1e-19, fitted 8.34
    // (measured), hence 0.4; a lost order or a t-handling defect shows as a whole order or more.
    expect_declared_order<stepcert::float128>(stepcert::fehlberg78_adaptive, {1e-12, 10.0, 8}, 0.4);
}
#endif

TEST(AcceptanceOrdersTimeDependent, AdamsBashforthMoulton) {
    expect_declared_order(stepcert::adams_bashforth_moulton<2>, {16, 2.0, 8});
    expect_declared_order(stepcert::adams_bashforth_moulton<4>, {16, 2.0, 7});
}

TEST(AcceptanceOrdersTimeDependent, Rosenbrock4) {
    // Corrected coefficient set (stepcert's default). With odeint's shipped set the adaptive study
    // fits 1.006 here (measured; local orders 1.00 .. 1.04 over 1e-5 .. 1e-11).
    expect_declared_order(stepcert::rosenbrock4_fixed, {8, 2.0, 7});
    expect_declared_order(stepcert::rosenbrock4_adaptive, {1e-5, 10.0, 7}, 0.2);
}

TEST(AcceptanceOrdersTimeDependent, Adaptive) {
    expect_declared_order(stepcert::dormand_prince54_adaptive, {1e-6, 10.0, 6}, 0.3);
    expect_declared_order(stepcert::cash_karp54_adaptive, {1e-6, 10.0, 6}, 0.3);
}

} // namespace test_acceptance_orders_time_dependent
