// Order studies whose finest levels sit on the round-off plateau of double arithmetic:
// the asymptotic-range detection must leave the plateau out and fit the true order.
#include <array>
#include <cmath>
#include <limits>
#include <string>
#include <vector>

#include <gtest/gtest.h>

#include "stepcert/methods/classic_rk4.hpp"
#include "stepcert/methods/dormand_prince54.hpp"
#include "stepcert/problems/kepler.hpp"
#include "stepcert/study/order_study.hpp"

namespace {

// Kepler two-body problem, e = 0.5, on [0, 20] from the problem catalogue (Hull, Enright,
// Fellen, Sedgwick, SIAM J. Numer. Anal. 9 (1972) 603-637, class D; exact solution from Kepler's
// equation, generic in the scalar type, so the study evaluates it with 50 digits).
auto kepler_half() { return stepcert::problems::kepler(0.5); }

// Least-squares order over every level with a finite error: what a naive "fit all" would report.
double naive_order(const stepcert::order_study_result& r) {
    std::vector<double> h, e;
    for (const auto& lv : r.levels)
        if (std::isfinite(lv.error_grid) && lv.error_grid > 0) {
            h.push_back(lv.h);
            e.push_back(lv.error_grid);
        }
    return stepcert::fit_order(h, e).order;
}

} // namespace

TEST(RoundOffPlateau, ExactSolutionCheckValue) {
    // Derived check value (shared reference values section 2): e = 0.5, t = 20:
    // x = -0.578043295303536, y = 0.863384000919419. Guards the test problem itself.
    std::array<double, 4> y{};
    kepler_half().exact()(20.0, y);
    EXPECT_NEAR(y[0], -0.578043295303536, 1e-14);
    EXPECT_NEAR(y[1], 0.863384000919419, 1e-14);
}

TEST(RoundOffPlateau, ClassicRK4OnKeplerLeavesThePlateauOut) {
    // Measured here with Boost 1.81 (shared reference values section 12): classic RK4 in double on
    // Kepler e = 0.5 keeps slope 4 down to h = 2.4e-4 (error 2.5e-12); below h = 1.2e-4 the error
    // wanders between 2e-13 and 6e-12. The ladder runs h = 0.4 down to 2.4e-5 (15 levels).
    const auto r = stepcert::order_study(kepler_half(), stepcert::classic_rk4, stepcert::step_ladder{50, 2.0, 15});
    ASSERT_TRUE(r.fitted()) << r.verdict_text;
    EXPECT_EQ(r.basis, stepcert::error_basis::exact_solution);
    EXPECT_NEAR(r.fit.order, 4.0, 0.2);
    ASSERT_TRUE(r.fit.has_interval());
    EXPECT_GE(r.range_last - r.range_first + 1, 4u);
    EXPECT_GE(r.levels[r.range_last].h, 1.2e-4);  // no plateau level inside the range
    std::size_t plateau = 0;
    for (const auto& lv : r.levels) {
        if (lv.h < 1.2e-4) {
            EXPECT_EQ(lv.status, stepcert::level_status::round_off_plateau) << "level " << lv.index << " h " << lv.h;
        }
        plateau += lv.status == stepcert::level_status::round_off_plateau;
        // Both error measures are recorded; the final time is one of the grid times.
        EXPECT_LE(lv.error_final, lv.error_grid);
    }
    EXPECT_GE(plateau, 3u);
    // Without the range detection the slope would be far off: the plateau drags it down.
    EXPECT_LT(naive_order(r), 3.5);
}

TEST(RoundOffPlateau, DormandPrinceOnKeplerLeavesThePlateauOut) {
    // Fifth order (Dormand, Prince, J. Comput. Appl. Math. 6 (1980) 19-26) reaches round-off
    // sooner: h = 0.4 down to 9.8e-5 (13 levels), fitted on the error at the final time.
    stepcert::study_options o;
    o.fit_measure = stepcert::error_measure::final_time;
    const auto r = stepcert::order_study(kepler_half(), stepcert::dormand_prince54, stepcert::step_ladder{50, 2.0, 13}, o);
    ASSERT_TRUE(r.fitted()) << r.verdict_text;
    EXPECT_NEAR(r.fit.order, 5.0, 0.2);
    EXPECT_EQ(r.levels.back().status, stepcert::level_status::round_off_plateau);
    EXPECT_EQ(r.levels.front().status, stepcert::level_status::pre_asymptotic);
    EXPECT_LT(naive_order(r), 4.0);
}

TEST(RoundOffPlateau, ErrorsAreMeasuredOnTheCommonGrid) {
    // N_k = 50 * 2^k: the common grid has G = 50 intervals, so each level reports 50 compared times.
    const auto r = stepcert::order_study(kepler_half(), stepcert::classic_rk4, stepcert::step_ladder{50, 2.0, 4});
    EXPECT_EQ(r.grid_points, 50u);
    EXPECT_EQ(r.levels[2].steps, 200u);
    EXPECT_EQ(r.levels[2].evaluations, 800u);  // 4 per step (common practice, no source)
    EXPECT_NEAR(r.levels[2].h, 0.1, 1e-15);
    EXPECT_EQ(r.total_evaluations, 4u * (50 + 100 + 200 + 400));
}
