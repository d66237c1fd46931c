// Cash–Karp 5(4) and Fehlberg 7(8) with odeint's step control through run_adaptive, in double
// and in cpp_bin_float_50: the driver against Boost.Odeint's own integrate_times, step and
// evaluation counts, accuracy against exact solutions; for all three adaptive Runge–Kutta
// methods bounded loops and bad inputs. Dormand–Prince with dense output: test_methods_adaptive_dense.cpp.
#include <cmath>
#include <limits>
#include <string>
#include <vector>

#include <gtest/gtest.h>

#include "stepcert/methods/cash_karp54.hpp"
#include "stepcert/methods/dormand_prince54.hpp"
#include "stepcert/methods/fehlberg78.hpp"
#include "stepcert/run/run.hpp"

#include <boost/numeric/odeint/stepper/generation.hpp>

#include "test_methods_adaptive_support.hpp"
#include "test_methods_support.hpp"

namespace {
using namespace methods_test;
namespace odeint = boost::numeric::odeint;

static_assert(stepcert::adaptive_method<decltype(stepcert::cash_karp54_adaptive)>);
static_assert(stepcert::adaptive_method<decltype(stepcert::dormand_prince54_adaptive)>);
static_assert(stepcert::adaptive_method<decltype(stepcert::fehlberg78_adaptive)>);
static_assert(!stepcert::has_variable_order_v<decltype(stepcert::fehlberg78_adaptive)>);

template <class T>
class AdaptiveRungeKutta : public ::testing::Test {};
using Scalars = ::testing::Types<double, mp50>;
TYPED_TEST_SUITE(AdaptiveRungeKutta, Scalars);

TYPED_TEST(AdaptiveRungeKutta, ControlledStepsAgreeWithOdeintIntegrateTimes) {
    // Driver check, not a check of the methods: the wrappers run odeint's controlled_runge_kutta,
    // compared here with the same controller under odeint's own integrate_times from the same
    // first trial step (the methods are checked independently by stepcert's embedded tableau
    // steppers, test_methods_tableau.cpp, TableauAdaptive, and against the exact solution below).
    // Same arithmetic, so the states agree to round-off and the
    // accepted steps match. odeint re-evaluates f(t, y) for every attempt, stepcert once per
    // accepted point, so odeint's evaluation count exceeds ours by exactly the rejected steps.
    using T = TypeParam;
    using S = std::vector<T>;
    const auto p = rigid_body_problem(8.0);
    const auto times = output_times<T>(7, 8.0);
    const double dt0 = 0.3;
    const double tol = std::is_same_v<T, double> ? 1e-9 : 1e-14;
    auto check = [&](const auto& method, auto stepper, std::size_t stages) {
        const auto direct = odeint_run<T>(p, odeint::make_controlled(T(tol), T(tol), stepper), times, dt0);
        const auto ours = stepcert::run_adaptive<T>(p, method.with_initial_step(dt0), {tol, tol}, times);
        ASSERT_EQ(ours.states.size(), direct.states.size());
        for (std::size_t i = 0; i < ours.states.size(); ++i)
            EXPECT_LE(max_distance(ours.states[i], direct.states[i]), 16 * eps<T>()) << method.name() << ", output " << i;
        EXPECT_EQ(ours.stats.steps, direct.steps) << method.name();
        EXPECT_EQ(ours.stats.evaluations, stages * ours.stats.steps + (stages - 1) * ours.stats.rejected) << method.name();
        EXPECT_EQ(direct.evaluations - ours.stats.evaluations, ours.stats.rejected) << method.name();
        EXPECT_GT(ours.stats.rejected, 0u) << method.name() << ": the large first trial step should be rejected";
    };
    check(stepcert::cash_karp54_adaptive, odeint::runge_kutta_cash_karp54<S, T, S, T>(), 6);
    check(stepcert::fehlberg78_adaptive, odeint::runge_kutta_fehlberg78<S, T, S, T>(), 13);
}

TYPED_TEST(AdaptiveRungeKutta, ErrorFollowsTheTolerance) {
    // Exact solution: Jacobi elliptic functions (Boost.Math). A controller that works keeps the
    // global error within a modest multiple of the tolerance, and 1000x tighter tolerance buys
    // at least 100x smaller error (common practice, no source: global error ~ tol^(p/(p+1))).
    using T = TypeParam;
    using S = std::vector<T>;
    const auto p = rigid_body_problem(8.0);
    S exact = stepcert::convert_state<S>(p.y0());
    p.exact()(T(8), exact);
    const double loose = std::is_same_v<T, double> ? 1e-7 : 1e-15;
    auto error = [&](const auto& method, double tol) {
        return max_distance(stepcert::run_adaptive<T>(p, method, {tol, tol}).final_state(), exact);
    };
    auto check = [&](const auto& method) {
        const double e1 = error(method, loose), e2 = error(method, loose * 1e-3);
        EXPECT_LT(e1, 100 * loose) << method.name();
        EXPECT_LT(e2, e1 / 100) << method.name();
        EXPECT_GT(e2, 0.0) << method.name();
    };
    check(stepcert::cash_karp54_adaptive);
    check(stepcert::fehlberg78_adaptive);
}

TYPED_TEST(AdaptiveRungeKutta, AutomaticStartingStepCostsOneEvaluation) {
    // Hairer–Nørsett–Wanner starting-step rule: one extra evaluation on top of the step counts.
    using T = TypeParam;
    const auto p = rigid_body_problem(8.0);
    const stepcert::controller_tolerance tol{1e-9, 1e-9};
    const auto ck = stepcert::run_adaptive<T>(p, stepcert::cash_karp54_adaptive, tol);
    EXPECT_EQ(ck.stats.evaluations, 1 + 6 * ck.stats.steps + 5 * ck.stats.rejected);
    const auto f78 = stepcert::run_adaptive<T>(p, stepcert::fehlberg78_adaptive, tol);
    EXPECT_EQ(f78.stats.evaluations, 1 + 13 * f78.stats.steps + 12 * f78.stats.rejected);
}

TEST(AdaptiveRungeKutta_Errors, BadArgumentsAreTypedErrors) {
    const auto p = rigid_body_problem();
    EXPECT_THROW((void)stepcert::run_adaptive(p, stepcert::dormand_prince54_adaptive, {0.0, 0.0}), stepcert::invalid_input);
    EXPECT_THROW((void)stepcert::run_adaptive(p, stepcert::cash_karp54_adaptive, {-1e-6, 1e-6}), stepcert::invalid_input);
    EXPECT_THROW((void)stepcert::run_adaptive(p, stepcert::fehlberg78_adaptive, {1e-6, 1e-6}, {2.0, 1.0}), stepcert::invalid_input);
    EXPECT_THROW((void)stepcert::run_adaptive(p, stepcert::fehlberg78_adaptive.with_initial_step(-0.1), {1e-6, 1e-6}),
                 stepcert::invalid_input);
    // Called directly, without the driver's checks.
    std::vector<double> y{0.0, 1.0, 1.0};
    auto rhs = [&p](const std::vector<double>& x, std::vector<double>& d, double t) { p.rhs()(x, d, t); };
    auto obs = [](const std::vector<double>&, double) {};
    stepcert::run_stats stats;
    const std::vector<double> none, backwards{1.0, 0.5}, before_start{-1.0};
    EXPECT_THROW(stepcert::dormand_prince54_adaptive.integrate_adaptive(rhs, y, 0.0, none, {1e-6, 1e-6}, obs, stats),
                 stepcert::invalid_input);
    EXPECT_THROW(stepcert::cash_karp54_adaptive.integrate_adaptive(rhs, y, 0.0, backwards, {1e-6, 1e-6}, obs, stats),
                 stepcert::invalid_input);
    EXPECT_THROW(stepcert::cash_karp54_adaptive.integrate_adaptive(rhs, y, 0.0, before_start, {1e-6, 1e-6}, obs, stats),
                 stepcert::invalid_input);
}

TEST(AdaptiveRungeKutta_Errors, NaNFromTheRightHandSideStopsTheRun) {
    // odeint's controllers accept a NaN error estimate (NaN > 1 is false); stepcert stops.
    auto rhs = [](const auto& y, auto& dydt, auto t) {
        dydt[0] = t > 0.5 ? std::numeric_limits<double>::quiet_NaN() : -static_cast<double>(y[0]);
    };
    const auto p = stepcert::make_problem("NaN after 0.5", rhs, std::vector<double>{1.0}, 0.0, 1.0);
    EXPECT_THROW((void)stepcert::run_adaptive(p, stepcert::dormand_prince54_adaptive, {1e-8, 1e-8}), stepcert::non_finite_value);
    EXPECT_THROW((void)stepcert::run_adaptive(p, stepcert::cash_karp54_adaptive, {1e-8, 1e-8}), stepcert::non_finite_value);
    EXPECT_THROW((void)stepcert::run_adaptive(p, stepcert::fehlberg78_adaptive, {1e-8, 1e-8}), stepcert::non_finite_value);
    auto nan_at_start = [](const auto&, auto& dydt, auto) { dydt[0] = std::numeric_limits<double>::quiet_NaN(); };
    const auto q = stepcert::make_problem("NaN at t0", nan_at_start, std::vector<double>{1.0}, 0.0, 1.0);
    try {
        (void)stepcert::run_adaptive(q, stepcert::dormand_prince54_adaptive, {1e-8, 1e-8});
        FAIL() << "expected non_finite_value";
    } catch (const stepcert::non_finite_value& e) {
        EXPECT_NE(std::string(e.what()).find("at t0"), std::string::npos) << e.what();
    }
}

TEST(AdaptiveRungeKutta_Errors, LoopsAreBounded) {
    // y' = y^2, y(0) = 1 blows up at t = 1: asked to reach t = 2, the step size collapses and
    // the run must stop with a typed error instead of looping.
    auto blow_up = [](const auto& y, auto& dydt, auto) { dydt[0] = y[0] * y[0]; };
    const auto p = stepcert::make_problem("blow-up", blow_up, std::vector<double>{1.0}, 0.0, 2.0);
    for (int which = 0; which < 3; ++which) {
        try {
            if (which == 0) (void)stepcert::run_adaptive(p, stepcert::dormand_prince54_adaptive, {1e-8, 1e-8});
            if (which == 1) (void)stepcert::run_adaptive(p, stepcert::cash_karp54_adaptive, {1e-8, 1e-8});
            if (which == 2) (void)stepcert::run_adaptive(p, stepcert::fehlberg78_adaptive, {1e-8, 1e-8});
            FAIL() << "method " << which << " passed a singularity";
        } catch (const stepcert::accuracy_unreachable& e) {
            EXPECT_NE(std::string(e.what()).find("step size fell"), std::string::npos) << e.what();
        } catch (const stepcert::non_finite_value& e) {
            EXPECT_NE(std::string(e.what()).find("between t ="), std::string::npos) << e.what();
        }
    }
    // The evaluation budget bounds every loop as well.
    stepcert::run_options small_budget;
    small_budget.max_evaluations = 200;
    EXPECT_THROW((void)stepcert::run_adaptive(rigid_body_problem(), stepcert::dormand_prince54_adaptive, {1e-12, 1e-12}, {},
                                              small_budget),
                 stepcert::budget_exhausted);
    // A tolerance below the round-off of double cannot be met: typed error up front (the
    // embedded error estimate alone would let the run creep on with tiny steps). The same
    // tolerance is fine in 50 digits.
    EXPECT_THROW((void)stepcert::run_adaptive(rigid_body_problem(), stepcert::cash_karp54_adaptive, {1e-30, 1e-30}),
                 stepcert::accuracy_unreachable);
    EXPECT_THROW((void)stepcert::run_adaptive(rigid_body_problem(), stepcert::dormand_prince54_adaptive, {0.0, 1e-17}),
                 stepcert::accuracy_unreachable);
    EXPECT_NO_THROW((void)stepcert::run_adaptive<mp50>(rigid_body_problem(0.5), stepcert::fehlberg78_adaptive, {1e-30, 1e-30}));
}

} // namespace
