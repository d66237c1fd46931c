// Methods built from an explicit tableau, in double and in cpp_bin_float_50 (coefficients
// converted exactly from cpp_rational). Fixed step: agreement with Boost.Odeint's own Euler, RK4,
// Cash–Karp, Dormand–Prince and Fehlberg 7(8) steppers on the same steps (the independent check of
// the methods stepcert wraps from odeint), observed order equal to the algebraic order.
// Adaptive (embedded pairs): the same accepted steps and states as Boost.Odeint's own controlled
// Cash–Karp, Dormand–Prince and Fehlberg 7(8) under its integrate_times; evaluation counts with
// and without first-same-as-last reuse; the error estimate of one step; bad tableaus and
// non-finite right-hand sides. Order studies at the algebraic order: test_acceptance_orders_tableau.
#include <algorithm>
#include <cmath>
#include <iostream>
#include <limits>
#include <string>
#include <vector>

#include <gtest/gtest.h>

#include <boost/multiprecision/cpp_int.hpp>
#include <boost/numeric/odeint/stepper/euler.hpp>
#include <boost/numeric/odeint/stepper/generation.hpp>
#include <boost/numeric/odeint/stepper/runge_kutta_cash_karp54.hpp>
#include <boost/numeric/odeint/stepper/runge_kutta_dopri5.hpp>
#include <boost/numeric/odeint/stepper/runge_kutta_fehlberg78.hpp>

#include "stepcert/methods/adaptive_tableau_method.hpp"
#include "stepcert/methods/classic_rk4.hpp"
#include "stepcert/methods/dormand_prince54.hpp"
#include "stepcert/methods/tableau_method.hpp"
#include "stepcert/run/run.hpp"
#include "stepcert/tableau/catalogue.hpp"

#include "test_methods_adaptive_support.hpp"
#include "test_methods_odeint_direct.hpp"
#include "test_methods_support.hpp"

namespace {
using namespace methods_test;
using boost::multiprecision::cpp_rational;
namespace odeint = boost::numeric::odeint;
namespace tb = stepcert::tableaus;

static_assert(stepcert::fixed_step_method<stepcert::explicit_tableau_method<cpp_rational>>);

template <class T>
class TableauMethod : public ::testing::Test {};
using Scalars = ::testing::Types<double, mp50>;
TYPED_TEST_SUITE(TableauMethod, Scalars);

TYPED_TEST(TableauMethod, AgreesWithOdeintSteppers) {
    // Outside reference: Boost.Odeint's euler, runge_kutta4, runge_kutta_cash_karp54,
    // runge_kutta_dopri5 (fifth-order weights) and runge_kutta_fehlberg78 (eighth-order weights)
    // under integrate_n_steps, against stepcert's own tableau stepper with the published
    // coefficients (tableau/catalogue.hpp): the independent check of the stage arithmetic of the
    // methods stepcert also wraps from odeint. The same coefficients in a different order of
    // summation: agreement to a few units of round-off (measured, Euler / Cash–Karp / Fehlberg:
    // 0 / 2 / 4 eps in double, 0 / 3.5 / 7.5 eps in 50 digits).
    using T = TypeParam;
    using S = std::vector<T>;
    const std::size_t n = 24;
    const auto p = rigid_body_problem();
    auto direct = [&](auto stepper) { return odeint_n_steps<T>(p, stepper, n); };
    auto distance = [&](const auto& tab, auto stepper) {
        const auto ours = stepcert::run_uniform<T>(p, stepcert::tableau_method(tab), n);
        const double d = max_distance(ours.final_state(), direct(stepper));
        std::cout << "[ measured ] " << tab.name << ": " << d / eps<T>() << " eps from odeint\n";
        return d;
    };
    EXPECT_LE(distance(tb::explicit_euler<cpp_rational>(), odeint::euler<S, T, S, T>()), 16 * eps<T>());
    EXPECT_LE(distance(tb::cash_karp54<cpp_rational>(), odeint::runge_kutta_cash_karp54<S, T, S, T>()), 16 * eps<T>());
    EXPECT_LE(distance(tb::fehlberg78<cpp_rational>(), odeint::runge_kutta_fehlberg78<S, T, S, T>()), 16 * eps<T>());
    const auto rk4 = stepcert::run_uniform<T>(p, stepcert::tableau_method(tb::classic_rk4<cpp_rational>()), n);
    EXPECT_LE(max_distance(rk4.final_state(), direct(odeint::runge_kutta4<S, T, S, T>())), 16 * eps<T>());
    const auto dp = stepcert::run_uniform<T>(p, stepcert::tableau_method(tb::dormand_prince54<cpp_rational>()), n);
    EXPECT_LE(max_distance(dp.final_state(), direct(odeint::runge_kutta_dopri5<S, T, S, T>())), 16 * eps<T>());
    // Stage count: 4 evaluations per RK4 step; Dormand–Prince's seventh stage is f at the new
    // state (first same as last), so 6 per step plus one at the start, as odeint's dopri5.
    EXPECT_EQ(rk4.stats.evaluations, 4 * n);
    EXPECT_EQ(dp.stats.evaluations, 6 * n + 1);
}

TYPED_TEST(TableauMethod, ObservedOrderIsTheAlgebraicOrder) {
    // Order p: global error O(h^p) (common practice, no source). Halving sequences on the rigid
    // body (exact solution by Jacobi elliptic functions, Boost.Math).
    using T = TypeParam;
    const auto p = rigid_body_problem();
    auto check = [&](const auto& tab, std::size_t n0) {
        const auto orders = observed_orders<T>(p, stepcert::tableau_method(tab), n0, 4);
        EXPECT_NEAR(orders.back(), tab.claimed_order, 0.15) << tab.name;
    };
    check(tb::kutta3<cpp_rational>(), 40);
    check(tb::three_eighths_rule<cpp_rational>(), 40);
    check(tb::bogacki_shampine32<cpp_rational>(), 40);
    check(tb::fehlberg45<cpp_rational>(), 20);
}

TEST(TableauMethodInput, ImplicitTableausAreRefused) {
    EXPECT_THROW(stepcert::tableau_method(tb::backward_euler<cpp_rational>()), stepcert::unsupported_operation);
    auto broken = tb::classic_rk4<double>();
    broken.c.pop_back();
    EXPECT_THROW(stepcert::tableau_method(broken), stepcert::invalid_input);
}

// ---- Adaptive: embedded pairs under step control ----

static_assert(stepcert::adaptive_method<stepcert::embedded_tableau_method<cpp_rational>>);
static_assert(stepcert::adaptive_method<stepcert::embedded_tableau_method<double>>);

template <class T>
class TableauAdaptive : public ::testing::Test {};
TYPED_TEST_SUITE(TableauAdaptive, Scalars);

TYPED_TEST(TableauAdaptive, SameStepsAsOdeintControlledSteppers) {
    // Outside reference: Boost.Odeint's controlled_runge_kutta (make_controlled) around its own
    // runge_kutta_cash_karp54, runge_kutta_dopri5 (the FSAL variant) and runge_kutta_fehlberg78,
    // driven by its integrate_times from the same first trial step. Same error checker and step
    // adjuster, same coefficients summed in another order: the accepted steps are the same and
    // the states agree to round-off that accumulates with the steps. Measured: double, 92 / 25 /
    // 111 steps, at most 12 / 6 / 37 eps; 50 digits, 894 / 89 / 1076 steps, at most 122 / 20 /
    // 142 eps. Bound: (16 + steps) eps.
    using T = TypeParam;
    using S = std::vector<T>;
    const auto p = rigid_body_problem(8.0);
    const auto times = output_times<T>(7, 8.0);
    const double dt0 = 0.3;
    const double tol = std::is_same_v<T, double> ? 1e-9 : 1e-14;
    auto check = [&](const auto& tab, auto stepper) -> stepcert::run_stats {
        const auto m = stepcert::adaptive_tableau_method(tab).with_initial_step(dt0);
        const auto direct = odeint_run<T>(p, odeint::make_controlled(T(tol), T(tol), stepper), times, dt0);
        const auto ours = stepcert::run_adaptive<T>(p, m, {tol, tol}, times);
        EXPECT_EQ(ours.states.size(), direct.states.size()) << m.name();
        for (std::size_t i = 0; i < std::min(ours.states.size(), direct.states.size()); ++i)
            EXPECT_LE(max_distance(ours.states[i], direct.states[i]), (16.0 + ours.stats.steps) * eps<T>())
                << m.name() << ", output " << i;
        EXPECT_EQ(ours.stats.steps, direct.steps) << m.name();
        EXPECT_GT(ours.stats.rejected, 0u) << m.name() << ": the large first trial step should be rejected";
        return ours.stats;
    };
    const auto ck = check(tb::cash_karp54<cpp_rational>(), odeint::runge_kutta_cash_karp54<S, T, S, T>());
    const auto f78 = check(tb::fehlberg78<cpp_rational>(), odeint::runge_kutta_fehlberg78<S, T, S, T>());
    const auto dp = check(tb::dormand_prince54<cpp_rational>(), odeint::runge_kutta_dopri5<S, T, S, T>());
    // Evaluations: f(t0, y0) once; s - 1 per attempt; and f at each new point but the last one,
    // except for Dormand–Prince, whose seventh stage is that value (first same as last).
    EXPECT_EQ(ck.evaluations, 6 * ck.steps + 5 * ck.rejected);
    EXPECT_EQ(f78.evaluations, 13 * f78.steps + 12 * f78.rejected);
    EXPECT_EQ(dp.evaluations, 1 + 6 * (dp.steps + dp.rejected));
}

TYPED_TEST(TableauAdaptive, ErrorFollowsTheTolerance) {
    // Exact solution: Jacobi elliptic functions (Boost.Math). Bogacki–Shampine 3(2), which
    // odeint does not have, under step control: the error stays within a modest multiple of the
    // tolerance, and a 1000x tighter tolerance buys at least 100x less error (common practice,
    // no source: with error-per-step control the global error goes as tol^(p/(p+1)) or better).
    using T = TypeParam;
    using S = std::vector<T>;
    const auto p = rigid_body_problem(8.0);
    S exact = stepcert::convert_state<S>(p.y0());
    p.exact()(T(8), exact);
    const auto m = stepcert::adaptive_tableau_method(tb::bogacki_shampine32<cpp_rational>());
    EXPECT_EQ(m.name(), "Bogacki-Shampine 3(2) adaptive");
    EXPECT_EQ(m.order(), 3);
    const double loose = std::is_same_v<T, double> ? 1e-6 : 1e-12;
    const auto r1 = stepcert::run_adaptive<T>(p, m, {loose, loose});
    const auto r2 = stepcert::run_adaptive<T>(p, m, {loose * 1e-3, loose * 1e-3});
    const double e1 = max_distance(r1.final_state(), exact), e2 = max_distance(r2.final_state(), exact);
    EXPECT_LT(e1, 100 * loose);
    EXPECT_LT(e2, e1 / 100);
    EXPECT_GT(e2, 0.0);
    // First same as last: 3 evaluations per attempt, plus f(t0, y0) and the starting-step probe.
    EXPECT_EQ(r1.stats.evaluations, 2 + 3 * (r1.stats.steps + r1.stats.rejected));
}

TEST(TableauErrorStepper, OneStepEstimatesTheLowerOrderLocalError) {
    // y' = y, y(0) = 1, one step of h: the exact value is e^h (std::exp). The propagated
    // fifth-order Dormand–Prince solution has local error O(h^6), the embedded fourth-order one
    // O(h^5), so err = y5 - y4 matches the true error of y4 to relative O(h), and halving h
    // divides it by about 2^5 (common practice, no source).
    auto rhs = [](const std::vector<double>& y, std::vector<double>& d, double) { d[0] = y[0]; };
    auto estimate = [&](double h) {
        stepcert::tableau_error_stepper<std::vector<double>> st(tb::dormand_prince54<cpp_rational>(), 1);
        EXPECT_TRUE(st.first_same_as_last());
        EXPECT_EQ(st.stepper_order(), 5);
        EXPECT_EQ(st.error_order(), 4);
        std::vector<double> y{1.0}, dydt{1.0}, out(1), err(1), end(1);
        st.do_step(rhs, y, dydt, 0.0, out, h, err);
        const double y4 = out[0] - err[0];
        EXPECT_NEAR(err[0] / (std::exp(h) - y4), 1.0, 2 * h);
        EXPECT_LT(std::abs(std::exp(h) - out[0]), std::abs(err[0]) * 10 * h);
        EXPECT_TRUE(st.derivative_at_end(end));
        EXPECT_EQ(end[0], out[0]);  // f(y) = y at the new state, evaluated as the last stage
        return err[0];
    };
    const double e1 = estimate(0.1), e2 = estimate(0.05);
    EXPECT_NEAR(e1 / e2, 32.0, 32.0 * 0.1);
    // Without first same as last (Cash–Karp) there is no derivative to hand over.
    stepcert::tableau_error_stepper<std::vector<double>> ck(tb::cash_karp54<double>(), 1);
    std::vector<double> d(1);
    EXPECT_FALSE(ck.derivative_at_end(d));
}

TEST(TableauAdaptiveInput, TableausThatCannotControlAStepAreRefused) {
    EXPECT_THROW(stepcert::adaptive_tableau_method(tb::classic_rk4<cpp_rational>()), stepcert::unsupported_operation);
    EXPECT_THROW(stepcert::adaptive_tableau_method(tb::implicit_midpoint<double>()), stepcert::unsupported_operation);
    auto broken = tb::cash_karp54<double>();
    broken.b_embedded->pop_back();
    EXPECT_THROW(stepcert::adaptive_tableau_method(broken), stepcert::invalid_input);
    try {
        (void)stepcert::adaptive_tableau_method(tb::heun2<double>());
        FAIL() << "expected unsupported_operation";
    } catch (const stepcert::unsupported_operation& e) {
        EXPECT_NE(std::string(e.what()).find("no embedded weights"), std::string::npos) << e.what();
    }
}

TEST(TableauAdaptiveInput, NonFiniteRightHandSideAndBadTolerancesAreTypedErrors) {
    auto rhs = [](const auto& y, auto& dydt, auto t) {
        dydt[0] = t > 0.5 ? std::numeric_limits<double>::quiet_NaN() : -static_cast<double>(y[0]);
    };
    const auto p = stepcert::make_problem("NaN after 0.5", rhs, std::vector<double>{1.0}, 0.0, 1.0);
    const auto dp = stepcert::adaptive_tableau_method(tb::dormand_prince54<double>());
    const auto bs = stepcert::adaptive_tableau_method(tb::bogacki_shampine32<double>());
    EXPECT_THROW((void)stepcert::run_adaptive(p, dp, {1e-8, 1e-8}), stepcert::non_finite_value);
    EXPECT_THROW((void)stepcert::run_adaptive(p, bs, {1e-8, 1e-8}), stepcert::non_finite_value);
    EXPECT_THROW((void)stepcert::run_adaptive(rigid_body_problem(), dp, {0.0, 0.0}), stepcert::invalid_input);
    EXPECT_THROW((void)stepcert::run_adaptive(rigid_body_problem(), dp, {1e-30, 1e-30}), stepcert::accuracy_unreachable);
    // The method owns its name: a copy outlives the original.
    auto copy = [] { return stepcert::adaptive_tableau_method(tb::fehlberg45<double>()).with_initial_step(0.01); }();
    EXPECT_EQ(copy.name(), "Fehlberg 4(5) adaptive");
}

} // namespace
