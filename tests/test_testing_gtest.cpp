// GoogleTest assertions for order studies, exercised with an in-house RK4 and a copy of it
// with one wrong coefficient: the wrong one must be reported at the order it really has, and
// the assertion must fail with the whole study table in its message.
#include <array>
#include <cmath>
#include <cstdio>
#include <string>

#include <gtest/gtest-spi.h>
#include <gtest/gtest.h>

#include "stepcert/methods/one_step_method.hpp"
#include "stepcert/testing/gtest.hpp"

namespace {

// Classic RK4 step (Kutta 1901) with the stage-3 coefficient a32 as a parameter: 1/2 is correct.
auto rk4_step_with_a32(double a32) {
    return [a32](auto& rhs, auto& y, auto t, auto h) {
        using S = std::remove_cvref_t<decltype(y)>;
        using T = decltype(t);
        const T half = h / 2;
        S k1 = y, k2 = y, k3 = y, k4 = y, tmp = y;
        rhs(static_cast<const S&>(y), k1, t);
        for (std::size_t i = 0; i < y.size(); ++i) tmp[i] = y[i] + half * k1[i];
        rhs(static_cast<const S&>(tmp), k2, t + half);
        for (std::size_t i = 0; i < y.size(); ++i) tmp[i] = y[i] + static_cast<T>(a32) * h * k2[i];
        rhs(static_cast<const S&>(tmp), k3, t + half);
        for (std::size_t i = 0; i < y.size(); ++i) tmp[i] = y[i] + h * k3[i];
        rhs(static_cast<const S&>(tmp), k4, t + h);
        for (std::size_t i = 0; i < y.size(); ++i) y[i] += h / 6 * (k1[i] + 2 * k2[i] + 2 * k3[i] + k4[i]);
    };
}

// A pump rotor's torsional mode as an undamped oscillator q'' = -q: y = (q, q'), y(0) = (1, 0),
// exact y = (cos t, -sin t), over about one and a half periods.
auto rotor_mode() {
    return stepcert::make_problem("rotor torsional mode",
                                  [](const auto& y, auto& dydt, auto) {
                                      dydt[0] = y[1];
                                      dydt[1] = -y[0];
                                  },
                                  std::array<double, 2>{1.0, 0.0}, 0.0, 10.0)
        .with_exact([](auto t, auto& y) {
            using std::cos;
            using std::sin;
            y[0] = cos(t);
            y[1] = -sin(t);
        });
}

const auto good_rk4 = stepcert::one_step_method("team RK4", 4, rk4_step_with_a32(0.5));
// Typo: a32 = 1/3. With c3 = a32 the second-order condition sum b_i c_i = 1/2 fails:
// 1/3 * 1/2 + 1/3 * 1/3 + 1/6 * 1 = 4/9 (derived), so the global order drops to 1.
const auto typo_rk4 = stepcert::one_step_method("team RK4 (a32 typo)", 4, rk4_step_with_a32(1.0 / 3.0));
const stepcert::step_ladder ladder{20, 2.0, 9};  // h = 0.5 .. 0.002

} // namespace

TEST(GTestAssertions, CorrectInHouseRK4Passes) {
    const auto r = stepcert::order_study(rotor_mode(), good_rk4, ladder);
    const ::testing::AssertionResult ok = stepcert::testing::converges_at_declared_order(r);
    EXPECT_TRUE(ok) << ok.message();
    EXPECT_NE(std::string(ok.message()).find("is within 0.2 of 4"), std::string::npos) << ok.message();
    EXPECT_TRUE(stepcert::testing::study_converges_at_declared_order(rotor_mode(), good_rk4, ladder));
}

TEST(GTestAssertions, WrongCoefficientIsReportedAtItsTrueOrder) {
    const auto r = stepcert::order_study(rotor_mode(), typo_rk4, ladder);
    ASSERT_TRUE(r.fitted()) << r.verdict_text;
    EXPECT_NEAR(r.fit.order, 1.0, 0.2);
    EXPECT_EQ(r.declared_order, 4);
    EXPECT_TRUE(stepcert::testing::converges_at_order(r, 1.0));
}

TEST(GTestAssertions, FailureMessageCarriesTheWholeTable) {
    const auto r = stepcert::order_study(rotor_mode(), typo_rk4, ladder);
    const ::testing::AssertionResult res = stepcert::testing::converges_at_order(r, 4.0);
    ASSERT_FALSE(res);
    const std::string msg = res.message();
    EXPECT_NE(msg.find("is not within 0.2 of the expected order 4"), std::string::npos) << msg;
    EXPECT_NE(msg.find(stepcert::study_table(r)), std::string::npos) << msg;
    for (const char* part : {"level", "steps", "evaluations", "error(grid)", "local order", "* in range", "declared order 4",
                             "verdict:", "caution:"})
        EXPECT_NE(msg.find(part), std::string::npos) << "missing '" << part << "' in:\n" << msg;
    // One row per level.
    for (const auto& lv : r.levels) {
        char row[24];
        std::snprintf(row, sizeof row, "\n%5zu ", lv.index);
        EXPECT_NE(msg.find(row), std::string::npos) << "row of level " << lv.index;
    }
}

TEST(GTestAssertions, FailsInsideExpectNonfatalFailure) {
    const auto r = stepcert::order_study(rotor_mode(), typo_rk4, ladder);
    EXPECT_NONFATAL_FAILURE(EXPECT_TRUE(stepcert::testing::converges_at_declared_order(r)), "local order");
    EXPECT_NONFATAL_FAILURE(EXPECT_TRUE(stepcert::testing::study_converges_at_declared_order(rotor_mode(), typo_rk4, ladder)),
                            "is not within 0.2 of the expected order 4");
}

TEST(GTestAssertions, NoAsymptoticRangeFails) {
    // Three levels without a reference give one observed order: not enough to show a range.
    stepcert::study_options o;
    o.basis = stepcert::error_basis::successive_differences;
    const auto r = stepcert::order_study(rotor_mode(), good_rk4, stepcert::step_ladder{20, 2.0, 3}, o);
    EXPECT_FALSE(r.fitted());
    const auto res = stepcert::testing::converges_at_order(r, 4.0);
    EXPECT_FALSE(res);
    EXPECT_NE(std::string(res.message()).find("no asymptotic range found"), std::string::npos) << res.message();
}

TEST(GTestAssertions, StudyErrorsBecomeFailures) {
    const auto res = stepcert::testing::study_converges_at_order(rotor_mode(), good_rk4, stepcert::step_ladder{20, 1.0, 5}, 4.0);
    EXPECT_FALSE(res);
    EXPECT_NE(std::string(res.message()).find("ratio must be a finite number > 1"), std::string::npos) << res.message();
}
