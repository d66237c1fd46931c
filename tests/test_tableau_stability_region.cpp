// Stability regions sampled for plotting, and their SVG picture: the boundary lies on
// |R(z)| = 1 and crosses the negative real axis at the precise interval; the picture is a
// well-formed SVG with its axes, labels and intervals.
#include <algorithm>
#include <cmath>
#include <complex>
#include <fstream>
#include <string>

#include <gtest/gtest.h>

#include <boost/multiprecision/cpp_int.hpp>

#include "stepcert/report/stability_svg.hpp"
#include "stepcert/tableau/catalogue.hpp"
#include "stepcert/tableau/stability_region.hpp"

namespace {
using boost::multiprecision::cpp_rational;
namespace tb = stepcert::tableaus;

std::size_t count_of(const std::string& s, const std::string& what) {
    std::size_t n = 0;
    for (std::size_t p = s.find(what); p != std::string::npos; p = s.find(what, p + 1)) ++n;
    return n;
}

TEST(StabilityRegion, Rk4BoundaryLiesOnTheUnitLevelAndMeetsTheRealInterval) {
    const auto r = stepcert::stability_function_of(tb::classic_rk4<cpp_rational>());
    const auto box = stepcert::default_plane_box(stepcert::stability_summary_of(r));
    const auto region = stepcert::stability_region_of(r, box, 400, 400, "classic RK4");
    ASSERT_GT(region.boundary.size(), 100u);
    // Linear interpolation inside cells of about 0.01: |R| = 1 to within 1% on the boundary.
    double worst = 0.0;
    for (const auto& g : region.boundary)
        for (auto z : {std::complex<double>(g.x1, g.y1), std::complex<double>(g.x2, g.y2)}) worst = std::max(worst, std::abs(std::abs(r(z)) - 1.0));
    EXPECT_LT(worst, 1e-2);
    // It crosses the negative real axis at -beta, beta = 2.785293563405281624 (shared reference
    // values §6), within a cell.
    const double cell = (box.re_max - box.re_min) / 400;
    bool found = false;
    for (const auto& g : region.boundary)
        if ((g.y1 <= 0) != (g.y2 <= 0) && std::min(g.x1, g.x2) < -1) {
            EXPECT_NEAR(0.5 * (g.x1 + g.x2), -2.785293563405281624, 2 * cell);
            found = true;
        }
    EXPECT_TRUE(found);
}

TEST(StabilityRegion, StableCellsAreWhereTheModulusIsAtMostOne) {
    const auto r = stepcert::stability_function_of(tb::explicit_euler<cpp_rational>());
    const stepcert::plane_box box{-3, 1, -2, 2};
    const auto region = stepcert::stability_region_of(r, box, 80, 80);
    // Explicit Euler: the disc |1 + z| <= 1 (common practice, no source). Cell centres inside it
    // are stable, outside are not.
    for (const auto& run : region.stable_runs)
        for (std::size_t j = run.first; j <= run.last; ++j) {
            const double x = box.re_min + (static_cast<double>(j) + 0.5) * 4.0 / 80, y = box.im_min + (static_cast<double>(run.row) + 0.5) * 4.0 / 80;
            EXPECT_LE(std::hypot(1 + x, y), 1.0 + 1e-12) << x << " " << y;
        }
    std::size_t cells = 0;
    for (const auto& run : region.stable_runs) cells += run.last - run.first + 1;
    // Area pi of the disc in cells of (1/20)^2: about 1257.
    EXPECT_NEAR(static_cast<double>(cells), 3.14159265358979 * 400, 40);
    EXPECT_THROW(stepcert::stability_region_of(r, stepcert::plane_box{1, -1, -1, 1}), stepcert::invalid_input);
    EXPECT_THROW(stepcert::stability_region_of(r, box, 4, 80), stepcert::invalid_input);
}

TEST(StabilitySvg, PictureHasAxesLabelsAndIntervals) {
    const auto r = stepcert::stability_function_of(tb::classic_rk4<cpp_rational>());
    const auto region = stepcert::stability_region_of(r, stepcert::default_plane_box(stepcert::stability_summary_of(r)), 200, 200,
                                                      "classic RK4 <check>");
    const std::string svg = stepcert::stability_svg(region);
    EXPECT_EQ(svg.rfind("<svg", 0), 0u);
    EXPECT_NE(svg.find("</svg>"), std::string::npos);
    EXPECT_NE(svg.find("Re(z)"), std::string::npos);
    EXPECT_NE(svg.find("Im(z)"), std::string::npos);
    EXPECT_NE(svg.find("classic RK4 &lt;check&gt;"), std::string::npos);  // names are escaped
    EXPECT_NE(svg.find("real interval [-2.7853, 0], imaginary interval [-2.8284 i, 2.8284 i]"), std::string::npos);
    EXPECT_GT(count_of(svg, "<line"), 100u);
    EXPECT_EQ(count_of(svg, "<"), count_of(svg, ">"));  // every '<' opens a tag that closes
    std::ofstream("stability_classic_rk4.svg") << svg;  // for a person to look at
}

TEST(StabilitySvg, AStableMethodsShadeTheLeftHalfPlane) {
    const auto r = stepcert::stability_function_of(tb::backward_euler<cpp_rational>());
    const auto s = stepcert::stability_summary_of(r);
    const auto region = stepcert::stability_region_of(r, stepcert::default_plane_box(s), 100, 100, "backward Euler");
    // Every cell with a centre in Re z < 0 is stable: |1/(1 - z)| < 1 there.
    std::size_t left_cells = 0;
    for (const auto& run : region.stable_runs) left_cells += run.last - run.first + 1;
    EXPECT_GE(static_cast<double>(left_cells), 100.0 * 100.0 * 10.0 / 14.0 - 1);
    EXPECT_NE(stepcert::stability_svg(region).find("A-stable"), std::string::npos);
}

} // namespace
