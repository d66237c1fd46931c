// Cost–accuracy sweeps: errors, costs and failures of the points, serial against parallel.
#include <algorithm>
#include <array>
#include <cmath>
#include <cstddef>
#include <iostream>
#include <limits>
#include <sstream>
#include <string>
#include <vector>

#include <gtest/gtest.h>

#include "stepcert/methods/classic_rk4.hpp"
#include "stepcert/methods/dormand_prince54.hpp"
#include "stepcert/methods/explicit_euler.hpp"
#include "stepcert/methods/explicit_midpoint.hpp"
#include "stepcert/problems/dahlquist.hpp"
#include "stepcert/problems/harmonic_oscillator.hpp"
#include "stepcert/problems/kepler.hpp"
#include "stepcert/reference/exact_evaluation.hpp"
#include "stepcert/run/run.hpp"
#include "stepcert/sweep/cost_accuracy_sweep.hpp"
#include "stepcert/sweep/pareto_front.hpp"
#include "stepcert/sweep/sweep_progress.hpp"

namespace test_sweep_runs {

using namespace stepcert;

/// Max over t0 + j (t1 - t0) / G, j = 1..G, of the max-norm error of a run_uniform run, with the
/// exact solution in 50 digits: the sweep's error computed without the sweep.
template <class P, class M>
double independent_error(const P& p, const M& m, std::size_t n, std::size_t G) {
    using X = exact_evaluation_real;
    const auto run = run_uniform(p, m, n, n / G);
    std::array<X, 2> exact{};
    double worst = 0.0;
    const X t0 = p.t0(), t1 = p.t1();
    for (std::size_t j = 1; j <= G; ++j) {
        const X t = j == G ? t1 : t0 + (t1 - t0) * X(j) / X(G);
        p.exact()(t, exact);
        for (std::size_t i = 0; i < 2; ++i) worst = std::max(worst, std::abs(run.states[j][i] - static_cast<double>(exact[i])));
    }
    return worst;
}

sweep_options options_with(std::size_t threads) {
    sweep_options o;
    o.output_times = 4;
    o.threads = threads;
    return o;
}

} // namespace test_sweep_runs

using namespace test_sweep_runs;

TEST(SweepRuns, FixedStepErrorEqualsAnIndependentRunBitwise) {
    const auto p = stepcert::problems::harmonic_oscillator();
    stepcert::cost_accuracy_sweep sweep(p, options_with(1));
    sweep.add_fixed_step(stepcert::classic_rk4, {32, 64, 128});
    const auto r = sweep.run();
    ASSERT_EQ(r.points.size(), 3u);
    EXPECT_EQ(r.truth, "exact solution");
    for (const auto& pt : r.points) {
        ASSERT_TRUE(pt.ok()) << pt.message;
        // Same arithmetic as the sweep, so equal to the last bit (derived: the definition of the error).
        EXPECT_EQ(pt.error, independent_error(p, stepcert::classic_rk4, pt.setting.steps, 4)) << pt.setting.steps;
        EXPECT_EQ(pt.evaluations, 4 * pt.setting.steps);  // four stages per step (Kutta 1901), common practice
        EXPECT_EQ(pt.steps, pt.setting.steps);
    }
}

TEST(SweepRuns, ClassicRk4ErrorFallsAtFourthOrder) {
    auto check = [](const stepcert::sweep_result& r) {
        for (std::size_t k = 1; k < r.points.size(); ++k) {
            const auto &a = r.points[k - 1], &b = r.points[k];
            ASSERT_TRUE(a.ok() && b.ok());
            const double ratio = a.error / b.error;
            const double slope = std::log(b.error / a.error) / std::log(double(b.evaluations) / double(a.evaluations));
            std::cout << "[ figures ] " << r.problem << " RK4 N = " << b.setting.steps << ": error " << b.error << ", ratio " << ratio
                      << ", slope " << slope << "\n";
            // RK4 has order 4 (Kutta 1901; common practice): error ~ 16x smaller per doubling, slope -4.
            EXPECT_NEAR(ratio, 16.0, 2.0) << r.problem << " N = " << b.setting.steps;
            EXPECT_NEAR(slope, -4.0, 0.2) << r.problem << " N = " << b.setting.steps;
        }
    };
    stepcert::cost_accuracy_sweep oscillator(stepcert::problems::harmonic_oscillator(), options_with(0));
    oscillator.add_fixed_step(stepcert::classic_rk4, {64, 128, 256, 512});
    check(oscillator.run());
    stepcert::cost_accuracy_sweep orbit(stepcert::problems::kepler(0.2), options_with(0));
    orbit.add_fixed_step(stepcert::classic_rk4, {2048, 4096, 8192});
    check(orbit.run());
}

TEST(SweepRuns, TwoThreadsGiveTheSerialResultBitwise) {
    auto make = [](std::size_t threads) {
        stepcert::cost_accuracy_sweep sweep(stepcert::problems::kepler(0.5), options_with(threads));
        sweep.add_fixed_step(stepcert::explicit_euler, {256, 512, 1024})
            .add_fixed_step(stepcert::explicit_midpoint, {128, 256, 512})
            .add_fixed_step(stepcert::classic_rk4, {64, 128, 256})
            .add_adaptive(stepcert::dormand_prince54_adaptive, std::vector<double>{1e-4, 1e-6, 1e-8});
        return sweep.run();
    };
    const auto serial = make(1), parallel = make(2);
    ASSERT_EQ(serial.points.size(), 12u);
    ASSERT_EQ(parallel.points.size(), serial.points.size());
    for (std::size_t i = 0; i < serial.points.size(); ++i) {
        const auto &s = serial.points[i], &q = parallel.points[i];
        EXPECT_EQ(s.method, q.method);
        EXPECT_EQ(s.setting.steps, q.setting.steps);
        // Independent points written by index: identical bits (the acceptance; the adaptive
        // runs are deterministic too).
        EXPECT_EQ(s.error, q.error) << i;
        EXPECT_EQ(s.evaluations, q.evaluations) << i;
        EXPECT_EQ(s.steps, q.steps) << i;
        EXPECT_EQ(s.rejected, q.rejected) << i;
        EXPECT_EQ(s.status, q.status) << i;
    }
}

TEST(SweepRuns, BlowUpAndBudgetAreRecordedAsFailedNotAsSmall) {
    // y' = -1000 y with h = 0.25: |1 + h lambda| = 249 > 1, outside explicit Euler's stability
    // interval [-2, 0] (its amplification factor is 1 + h lambda; common practice, no source), so
    // 249^400 overflows.
    stepcert::sweep_options o;
    o.max_evaluations = 1000;
    o.threads = 2;
    stepcert::cost_accuracy_sweep sweep(stepcert::problems::dahlquist(-1000.0, 100.0), o);
    sweep.add_fixed_step(stepcert::explicit_euler, {400, 4000});
    const auto r = sweep.run();
    ASSERT_EQ(r.points.size(), 2u);
    EXPECT_EQ(r.points[0].status, stepcert::sweep_status::non_finite);
    // The run's replay names the growth: the state left double's range (about 1.8e308; 249^128 > it).
    EXPECT_NE(r.points[0].message.find("grew past the range of its scalar type"), std::string::npos) << r.points[0].message;
    EXPECT_EQ(r.points[1].status, stepcert::sweep_status::budget);
    EXPECT_NE(r.points[1].message.find("budget of 1000"), std::string::npos) << r.points[1].message;
    for (const auto& pt : r.points) {
        EXPECT_FALSE(pt.ok());
        EXPECT_FALSE(pt.error <= 1.0);  // NaN never counts as small (common practice, no source)
        EXPECT_EQ(pt.evaluations, 0u);
    }
    EXPECT_TRUE(stepcert::pareto_front(r).empty());
}

TEST(SweepRuns, RepeatsGiveMedianBetweenMinAndMax) {
    auto o = options_with(1);
    o.repeats = 3;
    stepcert::cost_accuracy_sweep sweep(stepcert::problems::harmonic_oscillator(), o);
    sweep.add_fixed_step(stepcert::classic_rk4, {64});
    const auto pt = sweep.run().points.at(0);
    EXPECT_EQ(pt.repeats, 3u);
    EXPECT_LE(pt.seconds_min, pt.seconds_median);
    EXPECT_LE(pt.seconds_median, pt.seconds_max);
    EXPECT_GT(pt.seconds_max, 0.0);
}

TEST(SweepRuns, ProgressIsReportedOncePerPointInOrder) {
    auto o = options_with(2);
    std::vector<std::size_t> seen;
    std::size_t total_seen = 0;
    o.progress = [&](std::size_t done, std::size_t total) {  // serialized by the sweep
        seen.push_back(done);
        total_seen = total;
    };
    stepcert::cost_accuracy_sweep sweep(stepcert::problems::harmonic_oscillator(), o);
    sweep.add_fixed_step(stepcert::explicit_midpoint, {32, 64, 128}).add_fixed_step(stepcert::classic_rk4, {32, 64, 128});
    sweep.run();
    ASSERT_EQ(seen.size(), 6u);
    EXPECT_EQ(total_seen, 6u);
    for (std::size_t k = 0; k < seen.size(); ++k) EXPECT_EQ(seen[k], k + 1);
}

TEST(SweepRuns, TerminalProgressRewritesOneLine) {
    std::ostringstream out;
    auto progress = stepcert::terminal_progress("kepler sweep", &out);
    for (std::size_t k = 1; k <= 4; ++k) progress(k, 4);
    const std::string s = out.str();
    EXPECT_NE(s.find("\rkepler sweep: 1/4 points (25%)"), std::string::npos) << s;
    EXPECT_NE(s.find("\rkepler sweep: 4/4 points (100%)\n"), std::string::npos) << s;
    EXPECT_EQ(std::count(s.begin(), s.end(), '\n'), 1);
}

TEST(SweepRuns, ReferenceTruthAgreesWithTheExactSolution) {
    // The oscillator again, without its exact solution: the sweep falls back on the multiprecision
    // reference. Both truths are rounded to double, and the reference is within 10^-digits of the
    // exact one, so each truth component moves by at most half an ulp of |y| <= 1 twice plus
    // 10^-digits: eps + 10^-digits (derived). The max-norm error moves by no more, plus the
    // rounding of the two errors themselves (a few eps relative), so the errors agree to
    // (eps + 10^-digits) / error + 4 eps relative. Measured: errors 3.9e-6 and 2.4e-7, bounds
    // 5.8e-11 and 9.4e-10, and both truths rounded to the same doubles (difference 0).
    const auto exact = stepcert::problems::harmonic_oscillator(1.0, 2.0);
    const auto bare = stepcert::make_problem(
        "oscillator without exact", [](const auto& y, auto& dydt, auto) { dydt[0] = y[1]; dydt[1] = -y[0]; },
        std::array<double, 2>{1.0, 0.0}, 0.0, 2.0);
    auto o = options_with(1);
    o.output_times = 2;
    stepcert::cost_accuracy_sweep with_exact(exact, o);
    stepcert::cost_accuracy_sweep with_reference(bare, o);
    with_exact.add_fixed_step(stepcert::classic_rk4, {16, 32});
    with_reference.add_fixed_step(stepcert::classic_rk4, {16, 32});
    const auto a = with_exact.run(), b = with_reference.run();
    EXPECT_NE(b.truth, "exact solution");
    EXPECT_GE(b.truth_digits, 17.0);
    std::cout << "[ figures ] reference truth: " << b.truth_digits << " digits, " << b.truth_evaluations << " evaluations; errors "
              << a.points[0].error << " / " << b.points[0].error << ", " << a.points[1].error << " / " << b.points[1].error << "\n";
    const double eps = std::numeric_limits<double>::epsilon();
    for (std::size_t i = 0; i < a.points.size(); ++i) {
        const double bound = (eps + std::pow(10.0, -b.truth_digits)) / a.points[i].error + 4 * eps;
        std::cout << "[ figures ] relative difference " << std::abs(b.points[i].error / a.points[i].error - 1.0) << ", bound " << bound
                  << "\n";
        EXPECT_LE(std::abs(b.points[i].error / a.points[i].error - 1.0), bound) << i;
    }
}
