// Answers read off a sweep: the Pareto front and the confirmed cheapest method for a target error.
#include <cmath>
#include <cstddef>
#include <iostream>
#include <string>
#include <vector>

#include <gtest/gtest.h>

#include "stepcert/methods/classic_rk4.hpp"
#include "stepcert/methods/dormand_prince54.hpp"
#include "stepcert/methods/explicit_midpoint.hpp"
#include "stepcert/problems/harmonic_oscillator.hpp"
#include "stepcert/problems/kepler.hpp"
#include "stepcert/sweep/cheapest_method.hpp"
#include "stepcert/sweep/cost_accuracy_sweep.hpp"
#include "stepcert/sweep/pareto_front.hpp"

namespace test_sweep_answers {

using namespace stepcert;

sweep_point made_point(const char* method, std::size_t evaluations, double error, sweep_status status = sweep_status::ok) {
    sweep_point p;
    p.method = method;
    p.evaluations = evaluations;
    p.error = error;
    p.status = status;
    return p;
}

sweep_options grid_of_four() {
    sweep_options o;
    o.output_times = 4;
    o.threads = 2;
    return o;
}

} // namespace test_sweep_answers

using namespace test_sweep_answers;

TEST(SweepAnswers, ParetoFrontOfAHandMadeSet) {
    // Hand-made points (common practice, no source): a point is on the front when nothing is at
    // least as cheap and at least as accurate, one of them strictly.
    const std::vector<stepcert::sweep_point> pts = {
        made_point("a", 100, 1e-2),   // 0: front (cheapest)
        made_point("b", 200, 1e-3),   // 1: front
        made_point("c", 200, 5e-3),   // 2: dominated by 1 (same cost, larger error)
        made_point("d", 400, 2e-3),   // 3: dominated by 1
        made_point("e", 800, 1e-5),   // 4: front
        made_point("f", 800, 1e-5),   // 5: equal to 4, the first keeps its place
        made_point("g", 50, 1e-9, stepcert::sweep_status::non_finite),  // 6: failed, never on the front
        made_point("h", 1600, 1e-4),  // 7: dominated by 4
        made_point("i", 3200, 1e-7),  // 8: front
    };
    EXPECT_EQ(stepcert::pareto_front(pts), (std::vector<std::size_t>{0, 1, 4, 8}));
}

TEST(SweepAnswers, CheapestMethodIsConfirmedByARunThatMeetsTheTarget) {
    stepcert::cost_accuracy_sweep sweep(stepcert::problems::kepler(0.3), grid_of_four());
    sweep.add_fixed_step(stepcert::explicit_midpoint, {256, 512, 1024, 2048})
        .add_fixed_step(stepcert::classic_rk4, {128, 256, 512, 1024})
        .add_adaptive(stepcert::dormand_prince54_adaptive, std::vector<double>{1e-5, 1e-7, 1e-9, 1e-11});
    const auto r = sweep.run();
    const double target = 1e-7;
    const auto a = stepcert::cheapest_method(sweep, r, target);
    // The acceptance: the answer is confirmed by a run that meets the target.
    ASSERT_TRUE(a.target_met) << a.method() << " " << a.confirmation.error << " " << a.confirmation.message;
    EXPECT_LE(a.confirmation.error, target);
    EXPECT_GE(a.tries, 1u);
    EXPECT_EQ(a.confirmation.method, a.method());
    // Not worse than the cheapest measured point that meets the target (derived: that point is
    // itself a candidate, and the confirmation stops at the latest at a ladder point).
    std::size_t cheapest_measured = 0;
    for (const auto& p : r.points)
        if (p.ok() && p.error <= target && (cheapest_measured == 0 || p.evaluations < cheapest_measured)) cheapest_measured = p.evaluations;
    ASSERT_GT(cheapest_measured, 0u);
    EXPECT_LE(a.prediction.predicted_evaluations, static_cast<double>(cheapest_measured));
    if (a.prediction.setting.kind == stepcert::sweep_kind::fixed_step && a.tries == 1) {
        EXPECT_EQ(a.confirmation.setting.steps % 4, 0u);  // a whole number of steps per output interval
        EXPECT_NEAR(static_cast<double>(a.confirmation.evaluations), a.prediction.predicted_evaluations, 1e-6 * a.prediction.predicted_evaluations);
    }
    ASSERT_FALSE(a.candidates.empty());
    for (std::size_t k = 1; k < a.candidates.size(); ++k)
        EXPECT_LE(a.candidates[k - 1].predicted_evaluations, a.candidates[k].predicted_evaluations);
    std::cout << "[ figures ] target " << target << ": " << a.method() << " at "
              << stepcert::detail::setting_text(a.confirmation.setting) << ", predicted " << a.prediction.predicted_evaluations
              << " evaluations, confirmed error " << a.confirmation.error << " with " << a.confirmation.evaluations
              << " evaluations in " << a.tries << " tries; cheapest measured point " << cheapest_measured << "\n";
}

TEST(SweepAnswers, InterpolationBetweenRk4LadderPointsLandsOnTheTarget) {
    // With RK4 alone, on an asymptotic range, the interpolated step count gives an error close to
    // the target (order 4, Kutta 1901; common practice: error ~ C N^-4, a straight line in logs).
    stepcert::cost_accuracy_sweep sweep(stepcert::problems::harmonic_oscillator(), grid_of_four());
    sweep.add_fixed_step(stepcert::classic_rk4, {64, 256});
    const auto r = sweep.run();
    const double target = std::sqrt(r.points[0].error * r.points[1].error);  // halfway in logs: N near 128
    const auto a = stepcert::cheapest_method(sweep, r, target);
    ASSERT_TRUE(a.prediction.interpolated);
    EXPECT_EQ(a.prediction.setting.steps, 128u);
    EXPECT_TRUE(a.target_met);
    EXPECT_NEAR(a.confirmation.error / target, 1.0, 0.05);
}

TEST(SweepAnswers, UnreachableTargetSaysWhatTheBestPointReached) {
    stepcert::cost_accuracy_sweep sweep(stepcert::problems::harmonic_oscillator(), grid_of_four());
    sweep.add_fixed_step(stepcert::explicit_midpoint, {16, 32});
    const auto r = sweep.run();
    try {
        stepcert::cheapest_method(sweep, r, 1e-14);
        FAIL() << "expected accuracy_unreachable";
    } catch (const stepcert::accuracy_unreachable& e) {
        const std::string m = e.what();
        EXPECT_NE(m.find("1e-14"), std::string::npos) << m;
        EXPECT_NE(m.find("best reached"), std::string::npos) << m;
        EXPECT_NE(m.find("32 steps"), std::string::npos) << m;
    }
}
