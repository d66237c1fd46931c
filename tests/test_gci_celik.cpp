// Grid Convergence Index: the published worked example of Celik et al. (2008), exact synthetic
// data, the two-grid and absolute forms, the flags, and every rejected input.
#include <algorithm>
#include <cmath>
#include <functional>
#include <limits>
#include <string>
#include <typeinfo>

#include <gtest/gtest.h>

#include "stepcert/certify/grid_convergence_index.hpp"

namespace test_gci_celik {

constexpr double not_a_number = std::numeric_limits<double>::quiet_NaN();
constexpr double infinite = std::numeric_limits<double>::infinity();

// Celik, Ghia, Roache, Freitas, Coleman, Raad, "Procedure for Estimation and Reporting of
// Uncertainty Due to Discretization in CFD Applications", ASME J. Fluids Eng. 130(7) 078001 (2008),
// Table 1, first case (from memory, listed in ../shared/reference-values.md section 10).
constexpr double celik_phi1 = 6.063, celik_phi2 = 5.972, celik_phi3 = 5.863;

/// The message of the exception f throws, after checking that its type is exactly E.
template <class E>
std::string message_of(const std::function<void()>& f) {
    try {
        f();
    } catch (const stepcert::error& e) {
        EXPECT_EQ(typeid(e), typeid(E)) << "threw " << typeid(e).name() << ": " << e.what();
        return e.what();
    }
    ADD_FAILURE() << "nothing was thrown";
    return {};
}

/// Residual of eq. (5a) of Celik et al. (2008), evaluated with std::pow independently of the
/// header's logarithmic form: p ln r21 - |ln|eps32/eps21| + ln((r21^p - s)/(r32^p - s))|.
double order_equation_residual(double p, double phi1, double phi2, double phi3, double r21, double r32) {
    const double e21 = phi2 - phi1, e32 = phi3 - phi2;
    const double s = e32 / e21 < 0 ? -1.0 : 1.0;
    const double q = std::log((std::pow(r21, p) - s) / (std::pow(r32, p) - s));
    return p * std::log(r21) - std::abs(std::log(std::abs(e32 / e21)) + q);
}

/// phi(h) = phi* + C h^p on h1, h2 = r21 h1, h3 = r32 h2, with the fine grid's true error.
struct synthetic {
    double phi1, phi2, phi3, exact;
};
synthetic power_law(double exact, double c, double p, double h1, double r21, double r32) {
    const double h2 = r21 * h1, h3 = r32 * h2;
    return {exact + c * std::pow(h1, p), exact + c * std::pow(h2, p), exact + c * std::pow(h3, p), exact};
}

using stepcert::grid_convergence_index_three_grids;
using stepcert::grid_convergence_index_two_grids;

TEST(GciCelik, PublishedExampleToItsPrintedDigits) {
    // Celik et al. (2008), Table 1, first case (from memory): p = 1.53, phi_ext21 = 6.1685,
    // e_a21 = 1.5 %, e_ext21 = 1.7 %, GCI_fine21 = 2.2 %. Each compared to half a unit of its last
    // printed digit. The table prints r32 = 1.333; its results follow from the unrounded 4/3
    // (sqrt(8000/4500) from its cell counts N2 = 8000, N3 = 4500, from memory); see the next test.
    const auto g = grid_convergence_index_three_grids(celik_phi1, celik_phi2, celik_phi3, 1.5, 4.0 / 3.0);
    EXPECT_NEAR(g.order, 1.53, 0.005);
    EXPECT_NEAR(g.extrapolated, 6.1685, 0.00005);
    EXPECT_NEAR(g.relative_difference, 0.015, 0.0005);
    EXPECT_NEAR(g.extrapolated_relative_error, 0.017, 0.0005);
    EXPECT_NEAR(g.fine_grid_index, 0.022, 0.0005);
    EXPECT_EQ(g.safety_factor, 1.25);  // Celik et al. (2008): Fs = 1.25 with three grids
    EXPECT_TRUE(g.order_observed);
    EXPECT_FALSE(g.oscillatory);
    EXPECT_FALSE(g.differences_grow);
    EXPECT_NE(g.basis.find("three grids"), std::string::npos);
    EXPECT_GT(g.iterations, 1);
    // Recomputed from the same inputs (../shared/reference-values.md section 10, "recomputed"):
    // p = 1.53397, phi_ext = 6.16850, GCI = 2.175 %, to half a unit of those digits.
    EXPECT_NEAR(g.order, 1.53397, 5e-6);
    EXPECT_NEAR(g.extrapolated, 6.16850, 5e-6);
    EXPECT_NEAR(g.fine_grid_index, 0.02175, 5e-6);
    // Derived: the order solves eq. (5a), evaluated independently with std::pow.
    EXPECT_NEAR(order_equation_residual(g.order, celik_phi1, celik_phi2, celik_phi3, 1.5, 4.0 / 3.0), 0.0, 1e-13);
}

TEST(GciCelik, PrintedRatioReproducesAllButTheFourthDecimalOfTheExtrapolation) {
    // Derived: with r32 = 1.333 as printed, p = 1.5372, phi_ext = 6.1682, GCI = 2.169 %. The order and
    // the per-cent figures still round to the table's (Celik et al. 2008, Table 1, from memory), but
    // 6.1682 misses the printed 6.1685, so the paper computed with r32 = 4/3.
    const auto g = grid_convergence_index_three_grids(celik_phi1, celik_phi2, celik_phi3, 1.5, 1.333);
    EXPECT_NEAR(g.order, 1.53, 0.01);
    EXPECT_NEAR(g.relative_difference, 0.015, 0.0005);
    EXPECT_NEAR(g.extrapolated_relative_error, 0.017, 0.0005);
    EXPECT_NEAR(g.fine_grid_index, 0.022, 0.0005);
    EXPECT_NEAR(g.extrapolated, 6.1685, 0.0005);
    EXPECT_GT(std::abs(g.extrapolated - 6.1685), 0.00005);
    EXPECT_NEAR(order_equation_residual(g.order, celik_phi1, celik_phi2, celik_phi3, 1.5, 1.333), 0.0, 1e-13);
}

TEST(GciCelik, ExactPowerLawGivesItsOrderAndLimit) {
    // Common practice, no source: on phi_k = phi* + C h_k^p the three-grid order is p and the
    // extrapolation is phi*, for any ratios; the fine-grid band is then exactly Fs times the true
    // error (derived: |phi1 - phi*| = |phi2 - phi1| / (r21^p - 1) on such data).
    const double ratios[][2] = {{1.5, 1.25}, {1.3, 1.6}, {2.0, 2.0}, {1.2, 1.1}};
    for (const double p : {2.0, 4.0, 1.5}) {
        for (const auto& r : ratios) {
            for (const double c : {0.7, -2.5}) {
                const synthetic d = power_law(3.0, c, p, 1.0, r[0], r[1]);
                const auto g = grid_convergence_index_three_grids(d.phi1, d.phi2, d.phi3, r[0], r[1]);
                SCOPED_TRACE("p = " + std::to_string(p) + ", r21 = " + std::to_string(r[0]) +
                             ", r32 = " + std::to_string(r[1]) + ", C = " + std::to_string(c));
                EXPECT_NEAR(g.order, p, 1e-12 * p);
                EXPECT_NEAR(g.extrapolated, d.exact, 1e-12 * d.exact);
                EXPECT_NEAR(g.fine_error_band / std::abs(d.phi1 - d.exact), 1.25, 1e-11);
                EXPECT_NEAR(g.fine_grid_index, g.fine_error_band / std::abs(d.phi1), 1e-15);
                EXPECT_FALSE(g.oscillatory);
                EXPECT_FALSE(g.differences_grow);
                EXPECT_LE(g.iterations, 200);
            }
        }
    }
}

TEST(GciCelik, OscillatoryConvergenceIsFlagged) {
    // Celik et al. (2008): s = sign(eps32/eps21) < 0 marks oscillatory convergence. Invented values.
    const auto g = grid_convergence_index_three_grids(1.0, 1.1, 0.95, 1.5, 4.0 / 3.0);
    EXPECT_TRUE(g.oscillatory);
    EXPECT_NE(g.basis.find("oscillatory"), std::string::npos);
    EXPECT_GT(g.order, 0.0);
    EXPECT_NEAR(order_equation_residual(g.order, 1.0, 1.1, 0.95, 1.5, 4.0 / 3.0), 0.0, 1e-13);  // derived
    EXPECT_FALSE(grid_convergence_index_three_grids(celik_phi1, celik_phi2, celik_phi3, 1.5, 4.0 / 3.0).oscillatory);
}

TEST(GciCelik, GrowingDifferencesAreFlagged) {
    // Derived: with equal ratios 2, eq. (5a) gives p = |log2(eps32/eps21)|; here eps21 = 0.2 and
    // eps32 = 0.1, so differences grow on refinement, p = 1 is reported and the flag says so.
    const auto g = grid_convergence_index_three_grids(1.0, 1.2, 1.3, 2.0, 2.0);
    EXPECT_NEAR(g.order, 1.0, 1e-14);
    EXPECT_TRUE(g.differences_grow);
}

TEST(GciCelik, TwoGridsWithDeclaredOrder) {
    // Roache, Verification and Validation in Computational Science and Engineering (1998): two grids,
    // declared order, Fs = 3. On exact data (common practice, no source) the extrapolation is exact
    // and the band is 3 times the true error.
    const synthetic d = power_law(-0.4, 1.1, 2.0, 0.1, 1.7, 1.0);
    const auto g = grid_convergence_index_two_grids(d.phi1, d.phi2, 1.7, 2.0);
    EXPECT_EQ(g.safety_factor, 3.0);
    EXPECT_FALSE(g.order_observed);
    EXPECT_EQ(g.iterations, 0);
    EXPECT_EQ(g.order, 2.0);
    EXPECT_NE(g.basis.find("two grids"), std::string::npos);
    EXPECT_NEAR(g.extrapolated, d.exact, 1e-14);
    EXPECT_NEAR(g.fine_error_band / std::abs(d.phi1 - d.exact), 3.0, 1e-12);
    EXPECT_NEAR(g.fine_grid_index, 3.0 * std::abs((d.phi1 - d.phi2) / d.phi1) / (1.7 * 1.7 - 1.0), 1e-15);
}

TEST(GciCelik, AbsoluteBandsForANormOfDifferences) {
    // Richardson's estimate, e(y_{h/2}) = (y_{h/2} - y_h)/(2^p - 1) and e(y_h) = 2^p (y_{h/2} - y_h)/(2^p - 1):
    // Hairer, Norsett, Wanner, Solving ODEs I, section II.4 (from memory). With p = 4, r = 2 and d = 0.3:
    EXPECT_NEAR(stepcert::fine_solution_error_band(0.3, 2.0, 4.0, 1.25), 1.25 * 0.3 / 15.0, 1e-16);
    EXPECT_NEAR(stepcert::coarse_solution_error_band(0.3, 2.0, 4.0, 1.25), 1.25 * 0.3 * 16.0 / 15.0, 1e-15);
    EXPECT_EQ(stepcert::fine_solution_error_band(0.0, 2.0, 4.0, 3.0), 0.0);
    // Derived: as p grows the coarse band tends to Fs d without overflowing, the fine band to 0.
    EXPECT_DOUBLE_EQ(stepcert::coarse_solution_error_band(0.3, 2.0, 2000.0, 1.25), 1.25 * 0.3);
    EXPECT_EQ(stepcert::fine_solution_error_band(0.3, 2.0, 2000.0, 1.25), 0.0);
    // Derived: error vectors c h^p (c fixed) make both bands exactly Fs times the true error in any norm.
    const double c[3] = {0.2, -1.5, 0.9}, hf = 0.05, r = 1.6, p = 3.0;
    double d = 0, ef = 0, ec = 0;  // max norms of y_c - y_f, of e_f and of e_c
    for (const double ci : c) {
        d = std::max(d, std::abs(ci * std::pow(r * hf, p) - ci * std::pow(hf, p)));
        ef = std::max(ef, std::abs(ci * std::pow(hf, p)));
        ec = std::max(ec, std::abs(ci * std::pow(r * hf, p)));
    }
    EXPECT_NEAR(stepcert::fine_solution_error_band(d, r, p, 1.0) / ef, 1.0, 1e-13);
    EXPECT_NEAR(stepcert::coarse_solution_error_band(d, r, p, 1.0) / ec, 1.0, 1e-13);
}

TEST(GciCelik, IterationThatCannotSettleIsReported) {
    // Derived: near p = 0 the map of eq. (5a) has slope about (ln r21 - ln r32) / (2 ln r21), -13
    // here, so the fixed-point iteration runs away from the root.
    const synthetic d = power_law(1.0, 1.0, 0.1, 1.0, 1.05, 4.0);
    const auto msg = message_of<stepcert::accuracy_unreachable>(
        [&] { (void)grid_convergence_index_three_grids(d.phi1, d.phi2, d.phi3, 1.05, 4.0); });
    EXPECT_NE(msg.find("did not settle"), std::string::npos) << msg;
    EXPECT_NE(msg.find("more nearly equal ratios"), std::string::npos) << msg;
    stepcert::three_grid_options tight;
    tight.max_iterations = 3;
    EXPECT_THROW((void)grid_convergence_index_three_grids(celik_phi1, celik_phi2, celik_phi3, 1.5, 4.0 / 3.0, tight),
                 stepcert::accuracy_unreachable);
}

TEST(GciCelik, ZeroApparentOrderIsRefused) {
    // Derived: s = -1 and |eps32| = |eps21| make p = 0 a fixed point of eq. (5a): no band follows.
    const auto msg = message_of<stepcert::accuracy_unreachable>(
        [] { (void)grid_convergence_index_three_grids(1.0, 1.5, 1.0, 2.0, 2.0); });
    EXPECT_NE(msg.find("apparent order is 0"), std::string::npos) << msg;
}

TEST(GciCelik, RatioNotAboveOneIsInvalid) {
    EXPECT_THROW((void)grid_convergence_index_three_grids(6.063, 5.972, 5.863, 1.0, 1.5), stepcert::invalid_input);
    const auto msg = message_of<stepcert::invalid_input>(
        [] { (void)grid_convergence_index_three_grids(6.063, 5.972, 5.863, 1.5, 0.75); });
    EXPECT_NE(msg.find("r32 = 0.75 is not > 1; pass h_coarse / h_fine"), std::string::npos) << msg;
    EXPECT_THROW((void)grid_convergence_index_two_grids(1.0, 1.1, 0.5, 2.0), stepcert::invalid_input);
    EXPECT_THROW((void)stepcert::fine_solution_error_band(0.1, 1.0, 2.0, 3.0), stepcert::invalid_input);
}

TEST(GciCelik, NonFiniteRatioIsRejected) {
    EXPECT_THROW((void)grid_convergence_index_three_grids(6.063, 5.972, 5.863, not_a_number, 1.5),
                 stepcert::non_finite_value);
    const auto msg = message_of<stepcert::non_finite_value>(
        [] { (void)grid_convergence_index_three_grids(6.063, 5.972, 5.863, 1.5, infinite); });
    EXPECT_NE(msg.find("r32 is not finite"), std::string::npos) << msg;
}

TEST(GciCelik, NonFiniteSolutionValueIsRejected) {
    EXPECT_THROW((void)grid_convergence_index_three_grids(6.063, not_a_number, 5.863, 1.5, 1.5),
                 stepcert::non_finite_value);
    const auto msg = message_of<stepcert::non_finite_value>(
        [] { (void)grid_convergence_index_two_grids(infinite, 1.0, 1.5, 2.0); });
    EXPECT_NE(msg.find("phi1 is not finite"), std::string::npos) << msg;
    // Finite values whose difference overflows.
    EXPECT_THROW((void)grid_convergence_index_three_grids(1e308, -1e308, 1.0, 1.5, 1.5), stepcert::non_finite_value);
}

TEST(GciCelik, EqualSolutionsAllowNoObservedOrder) {
    EXPECT_THROW((void)grid_convergence_index_three_grids(6.0, 6.0, 5.9, 1.5, 1.5), stepcert::invalid_input);
    const auto msg = message_of<stepcert::invalid_input>(
        [] { (void)grid_convergence_index_three_grids(6.1, 6.0, 6.0, 1.5, 1.5); });
    EXPECT_NE(msg.find("phi2 == phi3"), std::string::npos) << msg;
    EXPECT_NE(msg.find("no order can be observed"), std::string::npos) << msg;
}

TEST(GciCelik, NonPositiveDeclaredOrderIsInvalid) {
    EXPECT_THROW((void)grid_convergence_index_two_grids(1.0, 1.1, 2.0, 0.0), stepcert::invalid_input);
    const auto msg = message_of<stepcert::invalid_input>(
        [] { (void)stepcert::coarse_solution_error_band(0.1, 2.0, -1.0, 3.0); });
    EXPECT_NE(msg.find("order p = -1 is not > 0"), std::string::npos) << msg;
    EXPECT_THROW((void)grid_convergence_index_two_grids(1.0, 1.1, 2.0, not_a_number), stepcert::non_finite_value);
}

TEST(GciCelik, SafetyFactorBelowOneIsInvalid) {
    EXPECT_THROW((void)grid_convergence_index_two_grids(1.0, 1.1, 2.0, 2.0, 0.9), stepcert::invalid_input);
    stepcert::three_grid_options opt;
    opt.safety_factor = 0.5;
    const auto msg = message_of<stepcert::invalid_input>(
        [&] { (void)grid_convergence_index_three_grids(6.063, 5.972, 5.863, 1.5, 1.5, opt); });
    EXPECT_NE(msg.find("safety factor 0.5 < 1 would shrink the band"), std::string::npos) << msg;
    EXPECT_THROW((void)stepcert::fine_solution_error_band(0.1, 2.0, 2.0, not_a_number), stepcert::non_finite_value);
}

TEST(GciCelik, NegativeOrNonFiniteDifferenceNormIsRejected) {
    const auto msg = message_of<stepcert::invalid_input>(
        [] { (void)stepcert::fine_solution_error_band(-0.1, 2.0, 2.0, 3.0); });
    EXPECT_NE(msg.find("is negative"), std::string::npos) << msg;
    EXPECT_THROW((void)stepcert::coarse_solution_error_band(not_a_number, 2.0, 2.0, 3.0), stepcert::non_finite_value);
    EXPECT_THROW((void)stepcert::fine_solution_error_band(infinite, 2.0, 2.0, 3.0), stepcert::non_finite_value);
}

TEST(GciCelik, ZeroFineValueLeavesRelativeErrorsUndefined) {
    const auto msg = message_of<stepcert::invalid_input>(
        [] { (void)grid_convergence_index_two_grids(0.0, 0.1, 2.0, 2.0); });
    EXPECT_NE(msg.find("relative errors are undefined"), std::string::npos) << msg;
}

TEST(GciCelik, IterationBudgetIsChecked) {
    stepcert::three_grid_options opt;
    opt.max_iterations = 0;
    EXPECT_THROW((void)grid_convergence_index_three_grids(6.063, 5.972, 5.863, 1.5, 1.5, opt), stepcert::invalid_input);
    opt.max_iterations = 50;
    opt.relative_tolerance = 1e-18;  // below what double resolves near p ~ 1
    const auto msg = message_of<stepcert::invalid_input>(
        [&] { (void)grid_convergence_index_three_grids(6.063, 5.972, 5.863, 1.5, 1.5, opt); });
    EXPECT_NE(msg.find("relative_tolerance >= 8 eps"), std::string::npos) << msg;
}

} // namespace test_gci_celik
