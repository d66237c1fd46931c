// Dormand–Prince 5(4) with step control and dense output through run_adaptive, in double and in
// cpp_bin_float_50: the driver against Boost.Odeint's dense_output_runge_kutta under its own
// integrate_times, evaluation counts, output times that cut no steps, accuracy.
#include <vector>

#include <gtest/gtest.h>

#include "stepcert/methods/cash_karp54.hpp"
#include "stepcert/methods/dormand_prince54.hpp"
#include "stepcert/run/run.hpp"

#include <boost/numeric/odeint/stepper/generation.hpp>

#include "test_methods_adaptive_support.hpp"
#include "test_methods_support.hpp"

namespace {
using namespace methods_test;

static_assert(stepcert::adaptive_method<decltype(stepcert::dormand_prince54_adaptive)>);

template <class T>
class DenseDormandPrince : public ::testing::Test {};
using Scalars = ::testing::Types<double, mp50>;
TYPED_TEST_SUITE(DenseDormandPrince, Scalars);

TYPED_TEST(DenseDormandPrince, DenseDormandPrinceAgreesWithOdeintDenseOutput) {
    // Driver check, not a check of the method: dormand_prince54_adaptive wraps odeint's
    // dense_output_runge_kutta<controlled dopri5>, compared here with the same stepper under
    // odeint's own integrate_times (interpolated outputs agree to round-off, accepted steps
    // match). The method is checked independently against the exact solution below and by
    // stepcert's Dormand–Prince tableau stepper (test_methods_tableau.cpp).
    using T = TypeParam;
    using S = std::vector<T>;
    const auto p = rigid_body_problem(8.0);
    const auto times = output_times<T>(13, 8.0);
    const double dt0 = 0.3;
    const double tol = std::is_same_v<T, double> ? 1e-9 : 1e-14;
    const auto direct = odeint_run<T>(p, odeint::make_dense_output(T(tol), T(tol), odeint::runge_kutta_dopri5<S, T, S, T>()),
                                      times, dt0);
    const auto ours = stepcert::run_adaptive<T>(p, stepcert::dormand_prince54_adaptive.with_initial_step(dt0), {tol, tol}, times);
    ASSERT_EQ(ours.states.size(), direct.states.size());
    for (std::size_t i = 0; i < ours.states.size(); ++i)
        EXPECT_LE(max_distance(ours.states[i], direct.states[i]), 64 * eps<T>()) << "output " << i;
    EXPECT_EQ(ours.stats.steps, direct.steps);
    // 7 stages, first-same-as-last: 6 evaluations per attempt plus the first derivative.
    EXPECT_EQ(ours.stats.evaluations, 1 + 6 * (ours.stats.steps + ours.stats.rejected));
    EXPECT_GT(ours.stats.rejected, 0u);
}

TYPED_TEST(DenseDormandPrince, DenseOutputCutsNoSteps) {
    // With dense output the step sequence does not depend on the output times; a controlled
    // stepper without it (Cash–Karp here) must cut a step at every output time.
    using T = TypeParam;
    const auto p = rigid_body_problem(8.0);
    const stepcert::controller_tolerance tol{1e-8, 1e-8};
    const auto one = stepcert::run_adaptive<T>(p, stepcert::dormand_prince54_adaptive, tol);
    const auto many = stepcert::run_adaptive<T>(p, stepcert::dormand_prince54_adaptive, tol, output_times<T>(100, 8.0));
    EXPECT_EQ(one.stats.steps, many.stats.steps);
    EXPECT_EQ(one.stats.rejected, many.stats.rejected);
    EXPECT_EQ(one.stats.evaluations, many.stats.evaluations);
    EXPECT_EQ(max_distance(one.final_state(), many.final_state()), 0.0);
    EXPECT_EQ(many.states.size(), 101u);
    const auto ck_one = stepcert::run_adaptive<T>(p, stepcert::cash_karp54_adaptive, tol);
    const auto ck_many = stepcert::run_adaptive<T>(p, stepcert::cash_karp54_adaptive, tol, output_times<T>(100, 8.0));
    EXPECT_GE(ck_many.stats.steps, 100u);
    EXPECT_GT(ck_many.stats.steps, ck_one.stats.steps);
}

TYPED_TEST(DenseDormandPrince, DenseErrorFollowsTheTolerance) {
    // Exact solution: Jacobi elliptic functions (Boost.Math). Global error within 100x the
    // tolerance, and 1000x tighter tolerance buys at least 100x smaller error (common practice,
    // no source: global error ~ tol^(p/(p+1))).
    using T = TypeParam;
    using S = std::vector<T>;
    const auto p = rigid_body_problem(8.0);
    S exact = stepcert::convert_state<S>(p.y0());
    p.exact()(T(8), exact);
    const double loose = std::is_same_v<T, double> ? 1e-7 : 1e-15;
    auto error = [&](double tol) {
        return max_distance(stepcert::run_adaptive<T>(p, stepcert::dormand_prince54_adaptive, {tol, tol}).final_state(), exact);
    };
    const double e1 = error(loose), e2 = error(loose * 1e-3);
    EXPECT_LT(e1, 100 * loose);
    EXPECT_LT(e2, e1 / 100);
    EXPECT_GT(e2, 0.0);
}

TYPED_TEST(DenseDormandPrince, DenseAutomaticStartingStepCostsOneEvaluation) {
    // Hairer–Nørsett–Wanner starting-step rule: one extra evaluation, on top of the first
    // derivative and 6 per attempt.
    using T = TypeParam;
    const auto dp = stepcert::run_adaptive<T>(rigid_body_problem(8.0), stepcert::dormand_prince54_adaptive, {1e-9, 1e-9});
    EXPECT_EQ(dp.stats.evaluations, 2 + 6 * (dp.stats.steps + dp.stats.rejected));
}

} // namespace
