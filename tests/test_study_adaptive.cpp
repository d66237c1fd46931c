// Order studies of adaptive methods over a tolerance ladder, fitted against the effective
// step (t1 - t0) / accepted steps.
#include <array>
#include <cmath>
#include <limits>

#include <gtest/gtest.h>

#include "stepcert/methods/dormand_prince54.hpp"
#include "stepcert/problems/kepler.hpp"
#include "stepcert/study/order_study.hpp"

namespace {
// Kepler e = 0.5 on [0, 20] from the problem catalogue (Hull, Enright, Fellen, Sedgwick,
// SIAM J. Numer. Anal. 9 (1972), class D; exact solution from Kepler's equation).
auto kepler_half() { return stepcert::problems::kepler(0.5); }
} // namespace

TEST(AdaptiveStudy, DormandPrinceOrderAgainstEffectiveStep) {
    const auto p = kepler_half();
    stepcert::study_options o;
    o.adaptive_grid_points = 20;
    const stepcert::tolerance_ladder ladder{1e-4, 10.0, 9};
    const auto r = stepcert::order_study(p, stepcert::dormand_prince54_adaptive, ladder, o);
    ASSERT_TRUE(r.fitted()) << r.verdict_text;
    // Fifth order (Dormand, Prince 1980). The effective step of an adaptive run also carries the
    // controller's step distribution, so the margin is 0.3 rather than the 0.2 of fixed steps.
    EXPECT_NEAR(r.fit.order, 5.0, 0.3);
    EXPECT_EQ(r.control, stepcert::step_control::adaptive);
    EXPECT_EQ(r.grid_points, 20u);
    std::size_t sum = 0;
    for (const auto& lv : r.levels) {
        EXPECT_DOUBLE_EQ(lv.tolerance, ladder.tolerance(lv.index));
        ASSERT_GT(lv.steps, 0u);
        EXPECT_DOUBLE_EQ(lv.h, 20.0 / static_cast<double>(lv.steps));
        EXPECT_GT(lv.evaluations, 6 * lv.steps);  // six new stages per step attempt, plus the start
        if (lv.index > 0) {
            EXPECT_GT(lv.steps, r.levels[lv.index - 1].steps);
        }
        sum += lv.evaluations;
    }
    EXPECT_EQ(r.total_evaluations, sum);
}

TEST(AdaptiveStudy, WrongLadderKindDoesNotCompileButBadToleranceLadderThrows) {
    // (A fixed-step method with a tolerance_ladder is a static_assert; only runtime input is tested.)
    const auto p = kepler_half();
    EXPECT_THROW((void)stepcert::order_study(p, stepcert::dormand_prince54_adaptive, stepcert::tolerance_ladder{1e-4, 0.5, 5}),
                 stepcert::invalid_input);
    EXPECT_THROW((void)stepcert::order_study(p, stepcert::dormand_prince54_adaptive, stepcert::tolerance_ladder{1e-4, 10.0, 2}),
                 stepcert::invalid_input);
    EXPECT_THROW((void)stepcert::order_study(p, stepcert::dormand_prince54_adaptive, stepcert::tolerance_ladder{-1e-4, 10.0, 4}),
                 stepcert::invalid_input);
}
