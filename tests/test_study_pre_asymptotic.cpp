// Order studies whose coarse levels are far from the asymptotic range: a stiff-ish
// Prothero–Robinson problem where explicit RK4 is unstable, even overflows, at coarse steps.
#include <array>
#include <cmath>
#include <string>
#include <vector>

#include <gtest/gtest.h>

#include "stepcert/methods/classic_rk4.hpp"
#include "stepcert/problems/prothero_robinson.hpp"
#include "stepcert/study/order_study.hpp"

namespace {

// Prothero–Robinson problem y' = lambda (y - sin t) + cos t, y(0) = 0, exact y = sin t, on [0, 2],
// from the problem catalogue (A. Prothero, A. Robinson, Math. Comp. 28 (1974) 145-162; from memory).
auto prothero_robinson(double lambda) { return stepcert::problems::prothero_robinson(lambda, 2.0); }

// Classic RK4's real stability interval is [-2.785293563405281624, 0] (derived; shared reference
// values section 6; J. D. Lambert 1991, section 5.12, gives 2.78, from memory).
constexpr double rk4_stability_limit = 2.785293563405281624;

std::size_t count(const stepcert::order_study_result& r, stepcert::level_status s) {
    std::size_t n = 0;
    for (const auto& lv : r.levels) n += lv.status == s;
    return n;
}

} // namespace

TEST(PreAsymptotic, UnstableCoarseLevelsAreDropped) {
    // lambda = -500, h = 0.04 .. 2e-5: the three coarsest levels have |lambda h| > 2.785, errors
    // up to 1e239; then local orders settle towards 4.
    const double lambda = -500.0;
    const auto r = stepcert::order_study(prothero_robinson(lambda), stepcert::classic_rk4, stepcert::step_ladder{50, 2.0, 12});
    ASSERT_TRUE(r.fitted()) << r.verdict_text;
    EXPECT_NEAR(r.fit.order, 4.0, 0.2);
    for (const auto& lv : r.levels) {
        if (-lambda * lv.h > rk4_stability_limit) {
            EXPECT_EQ(lv.status, stepcert::level_status::pre_asymptotic) << "level " << lv.index;
            EXPECT_GT(lv.error_grid, 1.0) << "level " << lv.index;
        }
    }
    EXPECT_GT(r.range_first, 3u);
    // A straight fit through every level would be meaningless here.
    std::vector<double> h, e;
    for (const auto& lv : r.levels) {
        h.push_back(lv.h);
        e.push_back(lv.error_grid);
    }
    EXPECT_GT(std::abs(stepcert::fit_order(h, e).order - 4.0), 10.0);
}

TEST(PreAsymptotic, OverflowingLevelsAreNonFiniteAndNeverSmall) {
    // lambda = -2000: at h >= 0.02 the RK4 amplification factor R(lambda h) exceeds 1e4 per step,
    // so the runs overflow to infinity; the run driver stops them and the study marks them.
    const auto r = stepcert::order_study(prothero_robinson(-2000.0), stepcert::classic_rk4, stepcert::step_ladder{50, 2.0, 13});
    ASSERT_TRUE(r.fitted()) << r.verdict_text;
    EXPECT_NEAR(r.fit.order, 4.0, 0.2);
    EXPECT_GE(count(r, stepcert::level_status::non_finite), 3u);
    for (const auto& lv : r.levels) {
        if (lv.status == stepcert::level_status::non_finite) {
            EXPECT_TRUE(std::isinf(lv.error_grid)) << "level " << lv.index;
            EXPECT_NE(lv.note.find("NaN or infinite"), std::string::npos) << lv.note;
            EXPECT_LT(lv.index, r.range_first);
        }
    }
}

TEST(PreAsymptotic, NonIntegerRatioUsesActualSteps) {
    // r = 1.5 from 20 steps: N = 20, 30, 45, 68, 101, ... (rounded, so actual ratios vary) and
    // the common grid is the final time only. lambda = -500 again.
    const auto r = stepcert::order_study(prothero_robinson(-500.0), stepcert::classic_rk4, stepcert::step_ladder{20, 1.5, 16});
    ASSERT_TRUE(r.fitted()) << r.verdict_text;
    EXPECT_NEAR(r.fit.order, 4.0, 0.2);
    EXPECT_EQ(r.grid_points, 1u);
    EXPECT_EQ(r.levels[3].steps, 68u);  // 20 * 1.5^3 = 67.5 -> 68
    EXPECT_DOUBLE_EQ(r.levels[3].h, 2.0 / 68.0);
    EXPECT_GE(count(r, stepcert::level_status::pre_asymptotic), 8u);
}
