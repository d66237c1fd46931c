// Order studies without any reference: Richardson's observed order from differences of
// successive levels must find the same order as a study against the exact solution.
#include <algorithm>
#include <array>
#include <cmath>
#include <string>

#include <gtest/gtest.h>

#include "stepcert/methods/classic_rk4.hpp"
#include "stepcert/methods/explicit_midpoint.hpp"
#include "stepcert/methods/one_step_method.hpp"
#include "stepcert/study/order_study.hpp"
#include "test_study_support.hpp"

namespace {

using study_test::kepler_exact_double;
auto kepler_half_double_exact() { return study_test::kepler_with_double_exact(); }

stepcert::study_options differences() {
    stepcert::study_options o;
    o.basis = stepcert::error_basis::successive_differences;
    return o;
}

// Midpoint-rule typo: the second stage evaluated at y + h k1 instead of y + h/2 k1, weights
// (0, 1) unchanged. Then sum b_i c_i = 1 != 1/2 (derived): first order only.
const auto midpoint_typo = stepcert::one_step_method("midpoint (c2 typo)", 2, [](auto& rhs, auto& y, auto t, auto h) {
    using S = std::remove_cvref_t<decltype(y)>;
    S k1 = y, tmp = y;
    rhs(static_cast<const S&>(y), k1, t);
    for (std::size_t i = 0; i < y.size(); ++i) tmp[i] = y[i] + h * k1[i];
    rhs(static_cast<const S&>(tmp), k1, t + h / 2);
    for (std::size_t i = 0; i < y.size(); ++i) y[i] += h * k1[i];
});

} // namespace

TEST(RichardsonBasis, ClassicRK4OrderWithoutReference) {
    const auto r = stepcert::order_study(kepler_half_double_exact(), stepcert::classic_rk4, stepcert::step_ladder{50, 2.0, 15}, differences());
    ASSERT_TRUE(r.fitted()) << r.verdict_text;
    EXPECT_EQ(r.basis, stepcert::error_basis::successive_differences);
    EXPECT_NE(r.basis_detail.find("Richardson"), std::string::npos) << r.basis_detail;
    EXPECT_TRUE(std::isnan(r.reference_digits));
    EXPECT_NEAR(r.fit.order, 4.0, 0.2);
    EXPECT_EQ(r.levels[0].status, stepcert::level_status::baseline);
    EXPECT_TRUE(std::isnan(r.levels[0].error_final));
    EXPECT_EQ(r.levels.back().status, stepcert::level_status::round_off_plateau);
}

TEST(RichardsonBasis, ErrorColumnsHoldDifferencesOfSuccessiveLevels) {
    const auto p = kepler_half_double_exact();
    const auto r = stepcert::order_study(p, stepcert::classic_rk4, stepcert::step_ladder{50, 2.0, 4}, differences());
    const auto coarse = stepcert::run_uniform(p, stepcert::classic_rk4, 100);
    const auto fine = stepcert::run_uniform(p, stepcert::classic_rk4, 200);
    double d = 0.0;
    for (std::size_t i = 0; i < 4; ++i) d = std::max(d, std::abs(coarse.final_state()[i] - fine.final_state()[i]));
    EXPECT_DOUBLE_EQ(r.levels[2].error_final, d);
}

TEST(RichardsonBasis, AgreesWithTheExactSolutionBasis) {
    // Explicit midpoint, second order (common practice, no source), fitted both ways on the same runs.
    const stepcert::step_ladder ladder{50, 2.0, 12};
    const auto by_difference = stepcert::order_study(kepler_half_double_exact(), stepcert::explicit_midpoint, ladder, differences());
    const auto by_exact = stepcert::order_study(kepler_half_double_exact(), stepcert::explicit_midpoint, ladder);
    ASSERT_TRUE(by_difference.fitted()) << by_difference.verdict_text;
    ASSERT_TRUE(by_exact.fitted()) << by_exact.verdict_text;
    EXPECT_EQ(by_exact.basis, stepcert::error_basis::exact_solution);
    EXPECT_NEAR(by_difference.fit.order, 2.0, 0.2);
    EXPECT_NEAR(by_exact.fit.order, 2.0, 0.2);
    EXPECT_NEAR(by_difference.fit.order, by_exact.fit.order, 0.1);
    // The exact solution here is double-only: evaluated in double, 15 digits, and said so.
    EXPECT_DOUBLE_EQ(by_exact.reference_digits, 15.0);
    EXPECT_NE(by_exact.basis_detail.find("not generic"), std::string::npos) << by_exact.basis_detail;
}

TEST(RichardsonBasis, WrongMethodIsReportedAtItsTrueOrder) {
    // On [0, 20] a first-order method keeps no correct digit down to h = 5e-5 (the study says
    // "no asymptotic range found" there); over the first third of an orbit it converges.
    const auto r = stepcert::order_study(kepler_half_double_exact().on_interval(0.0, 2.0), midpoint_typo, stepcert::step_ladder{20, 2.0, 12},
                                         differences());
    ASSERT_TRUE(r.fitted()) << r.verdict_text;
    EXPECT_EQ(r.declared_order, 2);
    EXPECT_NEAR(r.fit.order, 1.0, 0.2);
    const auto whole_orbit = stepcert::order_study(kepler_half_double_exact(), midpoint_typo, stepcert::step_ladder{50, 2.0, 12}, differences());
    EXPECT_FALSE(whole_orbit.fitted());
    EXPECT_NE(whole_orbit.verdict_text.find("no asymptotic range found"), std::string::npos) << whole_orbit.verdict_text;
}

TEST(RichardsonBasis, ThreeLevelsGiveAnObservedOrderButNoRange) {
    const auto r = stepcert::order_study(kepler_half_double_exact(), stepcert::classic_rk4, stepcert::step_ladder{800, 2.0, 3}, differences());
    EXPECT_FALSE(r.fitted());
    EXPECT_TRUE(std::isnan(r.order()));
    ASSERT_TRUE(std::isfinite(r.levels[2].local_order));
    EXPECT_NEAR(r.levels[2].local_order, 4.0, 0.7);  // pre-asymptotic on this orbit, but near 4
    EXPECT_NE(r.verdict_text.find("observed order of"), std::string::npos) << r.verdict_text;
    EXPECT_NE(r.verdict_text.find("add a level"), std::string::npos) << r.verdict_text;
}
