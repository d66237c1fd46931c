// stepcert::testing::cost_accuracy_benchmarks: the benchmarks it registers run the method at the
// asked step or tolerance and report the error and evaluations the sweep measures for the same
// point. Ground truth: Kepler's equation (exact solution, e = 0.5) and classic RK4's 4
// evaluations per step (Kutta 1901; common practice, no source).
#include <cmath>
#include <map>
#include <string>
#include <vector>

#include <benchmark/benchmark.h>
#include <gtest/gtest.h>

#include "stepcert/methods/classic_rk4.hpp"
#include "stepcert/methods/dormand_prince54.hpp"
#include "stepcert/problems/kepler.hpp"
#include "stepcert/testing/cost_accuracy_benchmarks.hpp"

namespace test_testing_benchmarks {

/// Keeps every run's counters by benchmark name; prints nothing.
class counter_capture : public benchmark::BenchmarkReporter {
public:
    bool ReportContext(const Context&) override { return true; }
    void ReportRuns(const std::vector<Run>& runs) override {
        for (const Run& r : runs) {
            auto& c = counters[r.run_name.function_name];  // without the "/iterations:2" suffix
            for (const auto& [k, v] : r.counters) c[k] = v.value;
            if (r.error_occurred) c["skipped"] = 1.0;
        }
    }
    std::map<std::string, std::map<std::string, double>> counters;
};

} // namespace test_testing_benchmarks

using namespace test_testing_benchmarks;

TEST(CostAccuracyBenchmarks, ReportTheSweepsErrorAndEvaluationsPerPoint) {
    const auto kepler = stepcert::problems::kepler(0.5, 20.0);
    stepcert::sweep_options opt;
    opt.output_times = 8;
    {
        stepcert::testing::cost_accuracy_benchmarks<decltype(kepler)> b("kepler_check", kepler, opt);
        b.add_fixed_step(stepcert::classic_rk4, {512, 1024});
        b.add_adaptive(stepcert::dormand_prince54_adaptive, std::vector<double>{1e-8});
        ASSERT_EQ(b.registered().size(), 3u);
        for (auto* bm : b.registered()) bm->Iterations(2);
    }  // the registrations own what they use
    counter_capture capture;
    const std::size_t ran = benchmark::RunSpecifiedBenchmarks(&capture, "kepler_check/");
    EXPECT_EQ(ran, 3u);

    stepcert::cost_accuracy_sweep sweep(kepler, opt);
    sweep.add_fixed_step(stepcert::classic_rk4, {512, 1024});
    sweep.add_adaptive(stepcert::dormand_prince54_adaptive, std::vector<double>{1e-8});
    const auto r = sweep.run();
    ASSERT_EQ(r.points.size(), 3u);
    const std::vector<std::string> names{"kepler_check/classic RK4/steps:512", "kepler_check/classic RK4/steps:1024",
                                         "kepler_check/" + r.methods[1] + "/tol:1e-08,1e-08"};
    for (std::size_t i = 0; i < 3; ++i) {
        ASSERT_TRUE(capture.counters.count(names[i])) << names[i];
        const auto& c = capture.counters[names[i]];
        EXPECT_FALSE(c.count("skipped")) << names[i];
        EXPECT_EQ(c.at("error"), r.points[i].error) << names[i];
        EXPECT_EQ(c.at("evaluations"), static_cast<double>(r.points[i].evaluations)) << names[i];
        EXPECT_EQ(c.at("steps"), static_cast<double>(r.points[i].steps)) << names[i];
    }
    EXPECT_EQ(capture.counters[names[0]].at("evaluations"), 4.0 * 512);
    // Order 4: doubling the steps divides the error by about 16 (Kepler e = 0.5 is in the
    // asymptotic range from about 1000 steps on this interval; loose bound).
    const double ratio = capture.counters[names[0]].at("error") / capture.counters[names[1]].at("error");
    EXPECT_GT(ratio, 10.0);
    EXPECT_LT(ratio, 30.0);
}
