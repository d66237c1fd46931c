// Order studies of adaptive methods over a tolerance ladder, fitted against the effective
// step (t1 - t0) / accepted steps.
#include <array>
#include <cmath>
#include <limits>

#include <gtest/gtest.h>

#include "stepcert/methods/dormand_prince54.hpp"
#include "stepcert/study/order_study.hpp"

namespace {

// Kepler e = 0.5 on [0, 20], exact solution from Kepler's equation (Hull, Enright, Fellen,
// Sedgwick, SIAM J. Numer. Anal. 9 (1972), class D; partly from memory).
struct kepler_rhs {
    template <class S, class T>
    void operator()(const S& y, S& dydt, T) const {
        using std::sqrt;
        const auto r2 = y[0] * y[0] + y[1] * y[1];
        const auto r3 = r2 * sqrt(r2);
        dydt[0] = y[2];
        dydt[1] = y[3];
        dydt[2] = -y[0] / r3;
        dydt[3] = -y[1] / r3;
    }
};
struct kepler_exact {
    template <class T, class S>
    void operator()(T t, S& y) const {
        using std::abs;
        using std::cos;
        using std::sin;
        using std::sqrt;
        const T e = T(1) / 2;
        T E = t;
        for (int i = 0; i < 100; ++i) {
            const T dE = (E - e * sin(E) - t) / (1 - e * cos(E));
            E -= dE;
            if (abs(dE) <= 8 * std::numeric_limits<T>::epsilon()) break;
        }
        const T b = sqrt(1 - e * e), Ed = 1 / (1 - e * cos(E));
        y[0] = cos(E) - e;
        y[1] = b * sin(E);
        y[2] = -sin(E) * Ed;
        y[3] = b * cos(E) * Ed;
    }
};

} // namespace

TEST(AdaptiveStudy, DormandPrinceOrderAgainstEffectiveStep) {
    const auto p = stepcert::make_problem("kepler e=0.5", kepler_rhs{}, std::array<double, 4>{0.5, 0.0, 0.0, std::sqrt(3.0)}, 0.0, 20.0)
                       .with_exact(kepler_exact{});
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
    const auto p = stepcert::make_problem("kepler e=0.5", kepler_rhs{}, std::array<double, 4>{0.5, 0.0, 0.0, std::sqrt(3.0)}, 0.0, 20.0)
                       .with_exact(kepler_exact{});
    EXPECT_THROW((void)stepcert::order_study(p, stepcert::dormand_prince54_adaptive, stepcert::tolerance_ladder{1e-4, 0.5, 5}),
                 stepcert::invalid_input);
    EXPECT_THROW((void)stepcert::order_study(p, stepcert::dormand_prince54_adaptive, stepcert::tolerance_ladder{1e-4, 10.0, 2}),
                 stepcert::invalid_input);
    EXPECT_THROW((void)stepcert::order_study(p, stepcert::dormand_prince54_adaptive, stepcert::tolerance_ladder{-1e-4, 10.0, 4}),
                 stepcert::invalid_input);
}
