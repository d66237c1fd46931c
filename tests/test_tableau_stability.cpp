// Stability functions and intervals of catalogue tableaus against published and derived values,
// principal error coefficients in the Dormand–Prince normalization, and stability regions sampled
// for plotting with their SVG picture: the boundary lies on |R(z)| = 1 and crosses the negative
// real axis at the precise interval; the picture is a well-formed SVG with its axes, labels and
// intervals.
#include <algorithm>
#include <cmath>
#include <complex>
#include <fstream>
#include <limits>
#include <string>
#include <vector>

#include <gtest/gtest.h>

#include <boost/multiprecision/cpp_bin_float.hpp>
#include <boost/multiprecision/cpp_int.hpp>

#include "stepcert/report/stability_svg.hpp"
#include "stepcert/tableau/catalogue.hpp"
#include "stepcert/tableau/error_coefficients.hpp"
#include "stepcert/tableau/stability.hpp"
#include "stepcert/tableau/stability_region.hpp"

namespace {
using boost::multiprecision::cpp_rational;
using mp50 = boost::multiprecision::cpp_bin_float_50;
namespace tb = stepcert::tableaus;

std::vector<cpp_rational> fractions(std::initializer_list<const char*> texts) {
    std::vector<cpp_rational> v;
    for (const char* t : texts) v.push_back(stepcert::exact_number<cpp_rational>(t));
    return v;
}

TEST(StabilityFunction, ExplicitMethodsOfOrderEqualToStagesGiveTheTruncatedExponential) {
    // s = p <= 4: R(z) = sum_{k<=p} z^k / k! (E. Hairer, G. Wanner, Solving ODEs II, §IV.2; from memory).
    EXPECT_EQ(stepcert::stability_function_of(tb::explicit_euler<cpp_rational>()).numerator.c, fractions({"1", "1"}));
    EXPECT_EQ(stepcert::stability_function_of(tb::heun2<cpp_rational>()).numerator.c, fractions({"1", "1", "1/2"}));
    EXPECT_EQ(stepcert::stability_function_of(tb::kutta3<cpp_rational>()).numerator.c, fractions({"1", "1", "1/2", "1/6"}));
    const auto rk4 = stepcert::stability_function_of(tb::classic_rk4<cpp_rational>());
    EXPECT_EQ(rk4.numerator.c, fractions({"1", "1", "1/2", "1/6", "1/24"}));
    EXPECT_TRUE(rk4.is_polynomial());
}

TEST(StabilityFunction, DormandPrinceHasTheExtraSixthPowerTerm) {
    // Derived from the tableau with exact fractions (shared reference values §6):
    // R(z) = sum_{k<=5} z^k/k! + z^6/600 (the FSAL seventh stage adds no power).
    const auto r = stepcert::stability_function_of(tb::dormand_prince54<cpp_rational>());
    EXPECT_EQ(r.numerator.c, fractions({"1", "1", "1/2", "1/6", "1/24", "1/120", "1/600"}));
}

TEST(StabilityFunction, ImplicitMethodsAreRational) {
    // Backward Euler 1/(1 - z); implicit midpoint (1 + z/2)/(1 - z/2) (common practice, no source).
    const auto be = stepcert::stability_function_of(tb::backward_euler<cpp_rational>());
    EXPECT_EQ(be.numerator.c, fractions({"1"}));
    EXPECT_EQ(be.denominator.c, fractions({"1", "-1"}));
    const auto im = stepcert::stability_function_of(tb::implicit_midpoint<cpp_rational>());
    EXPECT_EQ(im.numerator.c, fractions({"1", "1/2"}));
    EXPECT_EQ(im.denominator.c, fractions({"1", "-1/2"}));
}

// Real negative stability intervals (shared reference values §6, derived to 18 digits: beta
// solves R(-beta) = -1; J. D. Lambert, Numerical Methods for Ordinary Differential Systems,
// Wiley 1991, §5.12 gives 2.51 and 2.78 — from memory).
struct real_interval_case {
    stepcert::tableau<cpp_rational> tab;
    const char* beta;
};
std::vector<real_interval_case> real_interval_cases() {
    return {{tb::explicit_euler<cpp_rational>(), "2"},
            {tb::explicit_midpoint<cpp_rational>(), "2"},
            {tb::heun2<cpp_rational>(), "2"},
            {tb::kutta3<cpp_rational>(), "2.512745326618328624"},
            {tb::classic_rk4<cpp_rational>(), "2.785293563405281624"},
            {tb::dormand_prince54<cpp_rational>(), "3.306567892634946504"}};
}

TEST(StabilityIntervals, RealIntervalsInDouble) {
    // The search in double evaluates P(-x)^2 - 1 with cancellation near the root: measured 7 eps
    // off for Dormand–Prince, hence 32 eps.
    for (const auto& c : real_interval_cases()) {
        const auto s = stepcert::stability_summary_of(stepcert::stability_function_of(c.tab));
        EXPECT_NEAR(s.real_interval, std::stod(c.beta), 32 * std::numeric_limits<double>::epsilon() * std::stod(c.beta)) << c.tab.name;
    }
}

TEST(StabilityIntervals, RealIntervalsToEighteenDigitsInMultiprecision) {
    for (const auto& c : real_interval_cases()) {
        const auto s = stepcert::stability_summary_of<mp50>(stepcert::stability_function_of(c.tab));
        // The summary is a double: within one rounding of the 18-digit value.
        EXPECT_NEAR(s.real_interval, static_cast<double>(mp50(c.beta)), std::numeric_limits<double>::epsilon() * 3.4) << c.tab.name;
    }
}

TEST(StabilityIntervals, ImaginaryAxis) {
    // RK3 sqrt(3), RK4 2 sqrt(2); explicit Euler and the two-stage second-order methods have none
    // (shared reference values §6, derived).
    auto eta = [](const stepcert::tableau<cpp_rational>& t) {
        return stepcert::stability_summary_of(stepcert::stability_function_of(t)).imaginary_interval;
    };
    EXPECT_NEAR(eta(tb::kutta3<cpp_rational>()), std::sqrt(3.0), 1e-14);
    EXPECT_NEAR(eta(tb::classic_rk4<cpp_rational>()), 2 * std::sqrt(2.0), 1e-14);
    EXPECT_EQ(eta(tb::explicit_euler<cpp_rational>()), 0.0);
    EXPECT_EQ(eta(tb::explicit_midpoint<cpp_rational>()), 0.0);
    EXPECT_EQ(eta(tb::heun2<cpp_rational>()), 0.0);
}

TEST(StabilityIntervals, AStability) {
    // Backward Euler and the implicit midpoint rule are A-stable, explicit methods are not
    // (Hairer, Wanner II, §IV.3; from memory).
    for (const auto& t : {tb::backward_euler<cpp_rational>(), tb::implicit_midpoint<cpp_rational>()}) {
        const auto s = stepcert::stability_summary_of(stepcert::stability_function_of(t));
        EXPECT_TRUE(s.a_stable) << t.name << ": " << s.a_stability_note;
        EXPECT_TRUE(std::isinf(s.real_interval)) << t.name;
    }
    for (const auto& t : {tb::explicit_euler<cpp_rational>(), tb::classic_rk4<cpp_rational>(), tb::dormand_prince54<cpp_rational>()}) {
        const auto s = stepcert::stability_summary_of(stepcert::stability_function_of(t));
        EXPECT_FALSE(s.a_stable) << t.name;
    }
    // The same in double: the stability function is computed in the tableau's own type.
    EXPECT_TRUE(stepcert::stability_summary_of(stepcert::stability_function_of(tb::implicit_midpoint<double>())).a_stable);
    // SDIRK 4(3) is L-stable: A-stable, and R(z) -> 0 as z -> infinity, i.e. the numerator's degree
    // is below the denominator's (Hairer & Wanner II, §IV.6, from memory; decided here exactly).
    const auto sdirk = stepcert::stability_function_of(tb::sdirk4<cpp_rational>());
    const auto s = stepcert::stability_summary_of(sdirk);
    EXPECT_TRUE(s.a_stable) << s.a_stability_note;
    EXPECT_LT(sdirk.numerator.degree(), sdirk.denominator.degree());
}

TEST(ImplicitCatalogue, GaussAndRadauOrdersAndAStability) {
    // Gauss–Legendre s stages: order 2s, |R(iy)| = 1; Radau IIA 3 stages: order 5; all A-stable
    // (Hairer, Wanner II, §IV.5; from memory). Coefficients involve square roots, so this runs in
    // cpp_bin_float_50, where 64 eps is about 1e-48.
    for (const auto& t : {tb::gauss_legendre2<mp50>(), tb::gauss_legendre3<mp50>(), tb::radau_iia3<mp50>()}) {
        const auto order = stepcert::check_order_conditions(t);
        EXPECT_EQ(order.main.algebraic_order, t.claimed_order) << t.name;
        EXPECT_TRUE(order.row_sum_mismatches.empty()) << t.name;
        const auto s = stepcert::stability_summary_of<mp50>(stepcert::stability_function_of(t));
        EXPECT_TRUE(s.a_stable) << t.name << ": " << s.a_stability_note;
        EXPECT_TRUE(std::isinf(s.real_interval)) << t.name;
        EXPECT_TRUE(std::isinf(s.imaginary_interval)) << t.name;
    }
    // Radau IIA is L-stable: R(z) -> 0 as z -> infinity (degree of P below that of Q).
    const auto radau = stepcert::stability_function_of(tb::radau_iia3<mp50>());
    EXPECT_LT(radau.numerator.degree(), radau.denominator.degree());
    // The same in double.
    EXPECT_TRUE(stepcert::stability_summary_of(stepcert::stability_function_of(tb::gauss_legendre2<double>())).a_stable);
    EXPECT_EQ(stepcert::check_order_conditions(tb::gauss_legendre3<double>()).main.algebraic_order, 6);
}

TEST(ErrorCoefficients, DormandPrinceSixthOrderNorm) {
    // A^(6) = 3.99e-4, J. R. Dormand, P. J. Prince, J. Comput. Appl. Math. 6 (1980) 19–26 (3 digits
    // published); 3.9908e-4 derived (shared reference values §7). Embedded 4th-order weights:
    // Â^(5) = 1.1830e-3 (derived).
    const auto t = tb::dormand_prince54<cpp_rational>();
    const auto e = stepcert::principal_error_coefficients(t);
    EXPECT_EQ(e.order, 6);
    EXPECT_EQ(e.per_tree.size(), 20u);  // trees of order 6 (OEIS A000081)
    EXPECT_NEAR(e.norm2, 3.99e-4, 0.005e-4);
    EXPECT_NEAR(e.norm2, 3.9908e-4, 0.00005e-4);
    EXPECT_NEAR(stepcert::principal_error_coefficients(t, true).norm2, 1.1830e-3, 0.00005e-3);
}

TEST(ErrorCoefficients, DerivedValuesOfOtherMethods) {
    // Derived (shared reference values §7): RK4 A^(5) = 1.4505e-2; 3/8 rule 1.2669e-2; Cash–Karp
    // 5th order A^(6) = 9.483e-4, 4th order 5.391e-4; Fehlberg 4(5) 4th order 1.8392e-3, 5th
    // order A^(6) = 3.3557e-3; Heun sqrt(5)/12, midpoint sqrt(17)/24, Ralston exactly 1/6.
    EXPECT_NEAR(stepcert::principal_error_coefficients(tb::classic_rk4<cpp_rational>()).norm2, 1.4505e-2, 0.00005e-2);
    EXPECT_NEAR(stepcert::principal_error_coefficients(tb::three_eighths_rule<cpp_rational>()).norm2, 1.2669e-2, 0.00005e-2);
    EXPECT_NEAR(stepcert::principal_error_coefficients(tb::cash_karp54<cpp_rational>()).norm2, 9.483e-4, 0.0005e-4);
    EXPECT_NEAR(stepcert::principal_error_coefficients(tb::cash_karp54<cpp_rational>(), true).norm2, 5.391e-4, 0.0005e-4);
    EXPECT_NEAR(stepcert::principal_error_coefficients(tb::fehlberg45<cpp_rational>()).norm2, 1.8392e-3, 0.00005e-3);
    EXPECT_NEAR(stepcert::principal_error_coefficients(tb::fehlberg45<cpp_rational>(), true).norm2, 3.3557e-3, 0.00005e-3);
    EXPECT_NEAR(stepcert::principal_error_coefficients(tb::heun2<cpp_rational>()).norm2, std::sqrt(5.0) / 12, 1e-15);
    EXPECT_NEAR(stepcert::principal_error_coefficients(tb::explicit_midpoint<cpp_rational>()).norm2, std::sqrt(17.0) / 24, 1e-15);
    EXPECT_NEAR(stepcert::principal_error_coefficients(tb::ralston2<cpp_rational>()).norm2, 1.0 / 6, 1e-15);
    // The same in double to round-off.
    EXPECT_NEAR(stepcert::principal_error_coefficients(tb::dormand_prince54<double>()).norm2, 3.9908e-4, 0.00005e-4);
}

TEST(ErrorCoefficients, BadRequestsAreTyped) {
    EXPECT_THROW(stepcert::principal_error_coefficients(tb::classic_rk4<double>(), true), stepcert::invalid_input);
    EXPECT_THROW(stepcert::error_coefficients_of_order(tb::classic_rk4<double>(), 11), stepcert::invalid_input);
}

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
