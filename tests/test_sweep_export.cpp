// The acceptance for sweeps: five methods on three catalogue problems, written as CSV and
// JSON; the JSON read back with nlohmann_json.
#include <algorithm>
#include <cstddef>
#include <iostream>
#include <sstream>
#include <string>
#include <vector>

#include <gtest/gtest.h>
#include <nlohmann/json.hpp>

#include "stepcert/methods/cash_karp54.hpp"
#include "stepcert/methods/classic_rk4.hpp"
#include "stepcert/methods/dormand_prince54.hpp"
#include "stepcert/methods/explicit_euler.hpp"
#include "stepcert/methods/explicit_midpoint.hpp"
#include "stepcert/problems/harmonic_oscillator.hpp"
#include "stepcert/problems/kepler.hpp"
#include "stepcert/problems/linear_system.hpp"
#include "stepcert/report/sweep_csv.hpp"
#include "stepcert/report/sweep_json.hpp"
#include "stepcert/report/sweep_svg.hpp"
#include "stepcert/sweep/cost_accuracy_sweep.hpp"
#include "stepcert/sweep/pareto_front.hpp"

namespace test_sweep_export {

using namespace stepcert;

template <class P>
sweep_result five_method_sweep(const P& p) {
    sweep_options o;
    o.output_times = 4;
    o.threads = 2;
    cost_accuracy_sweep sweep(p, o);
    sweep.add_fixed_step(explicit_euler, {256, 512, 1024})
        .add_fixed_step(explicit_midpoint, {128, 256, 512})
        .add_fixed_step(classic_rk4, {64, 128, 256})
        .add_adaptive(dormand_prince54_adaptive, std::vector<double>{1e-4, 1e-6, 1e-8})
        .add_adaptive(cash_karp54_adaptive, std::vector<double>{1e-4, 1e-6, 1e-8});
    return sweep.run();
}

std::vector<std::string> lines_of(const std::string& s) {
    std::vector<std::string> out;
    std::istringstream in(s);
    for (std::string line; std::getline(in, line);) out.push_back(line);
    return out;
}

template <class P>
void check_exports(const P& p) {
    const sweep_result r = five_method_sweep(p);
    ASSERT_EQ(r.methods.size(), 5u);
    ASSERT_EQ(r.points.size(), 15u);
    const auto front = pareto_front(r);
    EXPECT_FALSE(front.empty());

    const auto lines = lines_of(sweep_csv(r));
    ASSERT_EQ(lines.size(), r.points.size() + 2);
    EXPECT_EQ(lines[0].rfind("# caution:", 0), 0u);
    EXPECT_EQ(lines[1], sweep_csv_header);
    const auto columns = std::count(lines[1].begin(), lines[1].end(), ',');
    for (std::size_t k = 2; k < lines.size(); ++k) EXPECT_EQ(std::count(lines[k].begin(), lines[k].end(), ','), columns) << lines[k];

    const auto j = nlohmann::json::parse(sweep_to_json(r).dump(2));
    EXPECT_EQ(j.at("format"), "stepcert.cost_accuracy_sweep");
    EXPECT_EQ(j.at("format_version"), 1);
    EXPECT_EQ(j.at("problem"), p.name());
    EXPECT_EQ(j.at("methods").size(), 5u);
    ASSERT_EQ(j.at("points").size(), 15u);
    std::size_t fixed = 0, adaptive = 0;
    for (std::size_t i = 0; i < r.points.size(); ++i) {
        const auto& q = j.at("points")[i];
        EXPECT_EQ(q.at("method"), r.points[i].method);
        EXPECT_EQ(q.at("evaluations").get<std::size_t>(), r.points[i].evaluations);
        if (r.points[i].ok()) {
            EXPECT_EQ(q.at("error").get<double>(), r.points[i].error);  // round-trip precision
        } else {
            EXPECT_EQ(q.at("error"), "inf");
        }
        if (q.at("kind") == "fixed_step") {
            ++fixed;
            EXPECT_TRUE(q.contains("step_count"));
        } else {
            ++adaptive;
            EXPECT_TRUE(q.contains("atol") && q.contains("rtol"));
        }
    }
    EXPECT_EQ(fixed, 9u);
    EXPECT_EQ(adaptive, 6u);

    // The chart: one polyline and one legend entry per method, the problem in the title
    // (tests/test_report_chart_render.cpp renders such charts with librsvg).
    const std::string svg = sweep_svg(r);
    std::size_t polylines = 0;
    for (auto at = svg.find("<polyline"); at != std::string::npos; at = svg.find("<polyline", at + 1)) ++polylines;
    EXPECT_EQ(polylines, 5u);
    EXPECT_NE(svg.find(p.name() + ": cost against accuracy"), std::string::npos);
    for (const auto& m : r.methods) EXPECT_NE(svg.find(m), std::string::npos) << m;
    std::size_t ok = 0;
    for (const auto& q : r.points) ok += q.ok();
    std::cout << "[ figures ] " << p.name() << ": " << ok << "/15 points ok, Pareto front of " << front.size()
              << ", cheapest front point " << r.points[front.front()].method << " (" << r.points[front.front()].evaluations
              << " evaluations), most accurate " << r.points[front.back()].method << " (error " << r.points[front.back()].error << ")\n";
}

} // namespace test_sweep_export

using namespace test_sweep_export;

TEST(SweepExport, FiveMethodsOnTheHarmonicOscillator) { check_exports(stepcert::problems::harmonic_oscillator()); }
TEST(SweepExport, FiveMethodsOnKepler) { check_exports(stepcert::problems::kepler(0.5)); }
TEST(SweepExport, FiveMethodsOnTheLinearSystem) { check_exports(stepcert::problems::linear_system()); }

TEST(SweepExport, FailedPointsAreWrittenAsInfinite) {
    sweep_result r;
    r.problem = "made up, with a comma";
    r.methods = {"m"};
    sweep_point p;
    p.method = "m";
    p.status = sweep_status::non_finite;
    p.message = "blew up, \"badly\"";
    r.points = {p};
    const auto lines = lines_of(sweep_csv(r));
    ASSERT_EQ(lines.size(), 3u);
    EXPECT_EQ(lines[2].rfind("\"made up, with a comma\",m,0,0,fixed_step,0,,,inf,", 0), 0u) << lines[2];
    EXPECT_NE(lines[2].find(",non_finite,\"blew up, \"\"badly\"\"\""), std::string::npos) << lines[2];
    const auto j = sweep_to_json(r);
    EXPECT_EQ(j.at("points")[0].at("error"), "inf");
    EXPECT_TRUE(j.at("points")[0].at("seconds").at("median").is_null());
    EXPECT_EQ(j.at("points")[0].at("status"), "non_finite");
}
