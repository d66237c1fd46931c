// Ladders and study inputs: step counts, the common output grid, and typed errors for bad input.
#include <array>
#include <cmath>
#include <limits>
#include <string>
#include <vector>

#include <gtest/gtest.h>

#include "stepcert/methods/classic_rk4.hpp"
#include "stepcert/study/ladder.hpp"
#include "stepcert/study/order_study.hpp"

namespace {

// y' = -y on [0, 1] with a double-only exact solution: no multiprecision instantiation here
// (a problem without exact solution would compile the reference solver into this file).
auto decay_problem() {
    return stepcert::make_problem("decay", [](const auto& y, auto& dydt, auto) { dydt[0] = -y[0]; },
                                  std::array<double, 1>{1.0}, 0.0, 1.0)
        .with_exact([](double t, std::array<double, 1>& y) { y[0] = std::exp(-t); });
}

template <class F>
std::string message_of(F&& f) {
    try {
        f();
    } catch (const stepcert::invalid_input& e) {
        return e.what();
    }
    return "(no invalid_input thrown)";
}

} // namespace

TEST(StepLadder, StepCountsAreRoundedGeometricGrowth) {
    const std::vector<std::size_t> doubling{50, 100, 200, 400, 800};
    EXPECT_EQ((stepcert::step_ladder{50, 2.0, 5}.steps()), doubling);
    // r = 1.5 from 8: 8, 12, 18, 27, 40.5 -> 41 (rounded half away from zero); derived by hand.
    const std::vector<std::size_t> one_and_a_half{8, 12, 18, 27, 41};
    EXPECT_EQ((stepcert::step_ladder{8, 1.5, 5}.steps()), one_and_a_half);
}

TEST(StepLadder, CommonGridIsTheGcdOfAllStepCounts) {
    EXPECT_EQ((stepcert::step_ladder{50, 2.0, 5}.common_divisor()), 50u);
    EXPECT_EQ((stepcert::step_ladder{8, 1.5, 5}.common_divisor()), 1u);   // 41 is prime
    EXPECT_EQ((stepcert::step_ladder{12, 1.5, 3}.common_divisor()), 3u);  // 12, 18, 27
}

TEST(StepLadder, RejectsRatioAtOrBelowOne) {
    for (double r : {1.0, 0.5, -2.0, std::numeric_limits<double>::quiet_NaN(), std::numeric_limits<double>::infinity()}) {
        const std::string msg = message_of([&] { stepcert::step_ladder{10, r, 5}.validate(); });
        EXPECT_NE(msg.find("ratio must be a finite number > 1"), std::string::npos) << "ratio " << r << ": " << msg;
    }
    EXPECT_THROW((stepcert::tolerance_ladder{1e-3, 1.0, 5}.validate()), stepcert::invalid_input);
}

TEST(StepLadder, RejectsFewerThanThreeLevels) {
    const std::string msg = message_of([] { stepcert::step_ladder{10, 2.0, 2}.validate(); });
    EXPECT_NE(msg.find("at least 3 levels"), std::string::npos) << msg;
    EXPECT_THROW((stepcert::tolerance_ladder{1e-3, 10.0, 2}.validate()), stepcert::invalid_input);
}

TEST(StepLadder, RejectsLevelsThatRoundToTheSameStepCount) {
    // 3 * 1.1 = 3.3 rounds back to 3 steps.
    const std::string msg = message_of([] { (void)stepcert::step_ladder{3, 1.1, 5}.steps(); });
    EXPECT_NE(msg.find("rejected, not merged"), std::string::npos) << msg;
}

TEST(StepLadder, RejectsZeroStepsAndOverlongLadders) {
    EXPECT_THROW((stepcert::step_ladder{0, 2.0, 5}.validate()), stepcert::invalid_input);
    EXPECT_THROW((stepcert::step_ladder{1000, 10.0, 12}.validate()), stepcert::invalid_input);
}

TEST(StepLadder, FromCoarsestStep) {
    EXPECT_EQ(stepcert::step_ladder::from_coarsest_step(0.1, 0.0, 1.0, 2.0, 4).coarsest_steps, 10u);
    // 1/0.3 = 3.33: rounded up, so the actual coarsest step 0.25 is <= h0.
    EXPECT_EQ(stepcert::step_ladder::from_coarsest_step(0.3, 0.0, 1.0, 2.0, 4).coarsest_steps, 4u);
    EXPECT_EQ(stepcert::step_ladder::from_coarsest_step(2.0, 0.0, 2.0, 2.0, 4).coarsest_steps, 1u);
    const std::string too_large = message_of([] { (void)stepcert::step_ladder::from_coarsest_step(1.5, 0.0, 1.0, 2.0, 4); });
    EXPECT_NE(too_large.find("larger than the interval"), std::string::npos) << too_large;
    EXPECT_THROW((void)stepcert::step_ladder::from_coarsest_step(0.0, 0.0, 1.0, 2.0, 4), stepcert::invalid_input);
    EXPECT_THROW((void)stepcert::step_ladder::from_coarsest_step(-0.1, 0.0, 1.0, 2.0, 4), stepcert::invalid_input);
    EXPECT_THROW((void)stepcert::step_ladder::from_coarsest_step(std::numeric_limits<double>::quiet_NaN(), 0.0, 1.0, 2.0, 4),
                 stepcert::invalid_input);
    EXPECT_THROW((void)stepcert::step_ladder::from_coarsest_step(0.1, 1.0, 1.0, 2.0, 4), stepcert::invalid_input);
}

TEST(ToleranceLadder, TolerancesShrinkByTheRatio) {
    const stepcert::tolerance_ladder l{1e-2, 10.0, 4};
    EXPECT_NO_THROW(l.validate());
    EXPECT_DOUBLE_EQ(l.tolerance(0), 1e-2);
    EXPECT_DOUBLE_EQ(l.tolerance(3), 1e-5);
    EXPECT_DOUBLE_EQ(l.at(2).atol, 1e-4);
    EXPECT_DOUBLE_EQ(l.at(2).rtol, 1e-4);
    EXPECT_THROW((stepcert::tolerance_ladder{0.0, 10.0, 4}.validate()), stepcert::invalid_input);
    EXPECT_THROW((stepcert::tolerance_ladder{-1e-3, 10.0, 4}.validate()), stepcert::invalid_input);
    EXPECT_THROW((stepcert::tolerance_ladder{1e-3, 1e10, 40}.validate()), stepcert::invalid_input);  // underflows
}

TEST(OrderStudyInput, BadLadderThrowsTypedErrors) {
    const auto p = decay_problem();
    EXPECT_THROW((void)stepcert::order_study(p, stepcert::classic_rk4, stepcert::step_ladder{10, 1.0, 5}), stepcert::invalid_input);
    EXPECT_THROW((void)stepcert::order_study(p, stepcert::classic_rk4, stepcert::step_ladder{10, 2.0, 2}), stepcert::invalid_input);
    EXPECT_THROW((void)stepcert::order_study(p, stepcert::classic_rk4, stepcert::step_ladder::from_coarsest_step(2.0, 0.0, 1.0, 2.0, 4)),
                 stepcert::invalid_input);
}

TEST(OrderStudyInput, BadOptionsThrowTypedErrors) {
    const auto p = decay_problem();
    stepcert::study_options o;
    o.confidence = 1.0;
    EXPECT_THROW((void)stepcert::order_study(p, stepcert::classic_rk4, stepcert::step_ladder{10, 2.0, 4}, o), stepcert::invalid_input);
    o = {};
    o.norm = {0.0, 0.0};
    EXPECT_THROW((void)stepcert::order_study(p, stepcert::classic_rk4, stepcert::step_ladder{10, 2.0, 4}, o), stepcert::invalid_input);
    o = {};
    o.range.min_points = 2;
    EXPECT_THROW((void)stepcert::order_study(p, stepcert::classic_rk4, stepcert::step_ladder{10, 2.0, 4}, o), stepcert::invalid_input);
}

TEST(OrderStudyInput, StudyBudgetCoversAllLevels) {
    // RK4 takes 4 evaluations per step (common practice, no source): levels of 10, 20, 40, 80
    // steps need 600 evaluations in all; a budget of 500 runs out at the last level.
    stepcert::study_options o;
    o.basis = stepcert::error_basis::successive_differences;
    o.budget.max_evaluations = 500;
    try {
        (void)stepcert::order_study(decay_problem(), stepcert::classic_rk4, stepcert::step_ladder{10, 2.0, 4}, o);
        FAIL() << "expected budget_exhausted";
    } catch (const stepcert::budget_exhausted& e) {
        EXPECT_NE(std::string(e.what()).find("level 3"), std::string::npos) << e.what();
    }
    o.budget.max_evaluations = 600;
    const auto r = stepcert::order_study(decay_problem(), stepcert::classic_rk4, stepcert::step_ladder{10, 2.0, 4}, o);
    EXPECT_EQ(r.total_evaluations, 600u);
    EXPECT_EQ(r.levels[3].evaluations, 320u);
}
