// Order fit (least squares in log-log, Student's t interval) and Richardson's observed order.
#include <cmath>
#include <limits>
#include <vector>

#include <gtest/gtest.h>

#include "stepcert/study/order_fit.hpp"
#include "stepcert/study/richardson.hpp"

namespace {
constexpr double eps = std::numeric_limits<double>::epsilon();
}

TEST(StudentT, QuantilesMatchPublishedTable) {
    // Two-sided 95% critical values t_{0.975, nu}. Source: NIST/SEMATECH e-Handbook of Statistical
    // Methods, section 1.3.6.7.2 "Critical Values of the Student's t Distribution" (values from memory),
    // given there to 3 decimals, so compared to 5e-4.
    EXPECT_NEAR(stepcert::student_t_critical(0.95, 1), 12.706, 5e-4);
    EXPECT_NEAR(stepcert::student_t_critical(0.95, 2), 4.303, 5e-4);
    EXPECT_NEAR(stepcert::student_t_critical(0.95, 3), 3.182, 5e-4);
    EXPECT_NEAR(stepcert::student_t_critical(0.95, 10), 2.228, 5e-4);
    // Two-sided 90%: t_{0.95, 5} = 2.015 (same table, from memory).
    EXPECT_NEAR(stepcert::student_t_critical(0.90, 5), 2.015, 5e-4);
    EXPECT_THROW((void)stepcert::student_t_critical(1.0, 3), stepcert::invalid_input);
    EXPECT_THROW((void)stepcert::student_t_critical(0.95, 0), stepcert::invalid_input);
}

TEST(OrderFit, MatchesHandComputedRegression) {
    // Derived by hand: h = 1, 1/2, 1/4 and errors 1, 2^-3, 2^-7. In units of ln 2 the points are
    // x = (0, -1, -2), y = (0, -3, -7): mean x = -1, mean y = -10/3, Sxx = 2, Sxy = 7, so
    // p = 3.5 and log C = (1/6) ln 2. Residuals (-1/6, 1/3, -1/6) ln 2 give SSR = (ln 2)^2 / 6;
    // with 1 degree of freedom s = ln 2 / sqrt 6 and SE(p) = s / sqrt(2 (ln 2)^2) = 1/sqrt(12).
    const std::vector<double> h{1.0, 0.5, 0.25};
    const std::vector<double> e{1.0, 0.125, 1.0 / 128.0};
    const stepcert::order_fit f = stepcert::fit_order(h, e, 0.95);
    EXPECT_EQ(f.points, 3u);
    EXPECT_NEAR(f.order, 3.5, 16 * eps);
    EXPECT_NEAR(f.log_constant, std::log(2.0) / 6.0, 16 * eps);
    EXPECT_NEAR(f.standard_error, 1.0 / std::sqrt(12.0), 64 * eps);
    EXPECT_NEAR(f.residual_sd, std::log(2.0) / std::sqrt(6.0), 64 * eps);
    ASSERT_TRUE(f.has_interval());
    EXPECT_NEAR(f.t_quantile, 12.706, 5e-4);  // NIST/SEMATECH table, t_{0.975,1} (from memory)
    EXPECT_NEAR(f.upper - f.order, f.t_quantile / std::sqrt(12.0), 1e-12);
    EXPECT_NEAR(f.order - f.lower, f.t_quantile / std::sqrt(12.0), 1e-12);
}

TEST(OrderFit, ExactPowerLawGivesItsOrderAndAZeroWidthInterval) {
    std::vector<double> h, e;
    for (int k = 0; k < 6; ++k) {
        h.push_back(0.1 / std::pow(3.0, k));
        e.push_back(7.0 * std::pow(h.back(), 4));
    }
    const auto f = stepcert::fit_order(h, e);
    EXPECT_NEAR(f.order, 4.0, 1e-12);
    EXPECT_NEAR(std::exp(f.log_constant), 7.0, 1e-10);
    EXPECT_LT(f.standard_error, 1e-12);
    EXPECT_NEAR(f.t_quantile, 2.776, 5e-4);  // t_{0.975,4}, NIST/SEMATECH table (from memory)
}

TEST(OrderFit, TwoPointsHaveNoInterval) {
    const std::vector<double> h{0.2, 0.1};
    const std::vector<double> e{4e-4, 2.5e-5};
    const auto f = stepcert::fit_order(h, e);
    EXPECT_NEAR(f.order, 4.0, 1e-12);  // log(16)/log(2)
    EXPECT_FALSE(f.has_interval());
    EXPECT_TRUE(std::isnan(f.standard_error));
    EXPECT_TRUE(std::isnan(f.lower));
}

TEST(OrderFit, RejectsNonFiniteAndDegenerateInput) {
    const double nan = std::numeric_limits<double>::quiet_NaN(), inf = std::numeric_limits<double>::infinity();
    const std::vector<double> h{0.2, 0.1, 0.05};
    EXPECT_THROW((void)stepcert::fit_order(h, std::vector<double>{1e-3, nan, 1e-5}), stepcert::invalid_input);
    EXPECT_THROW((void)stepcert::fit_order(h, std::vector<double>{1e-3, inf, 1e-5}), stepcert::invalid_input);
    EXPECT_THROW((void)stepcert::fit_order(h, std::vector<double>{1e-3, 0.0, 1e-5}), stepcert::invalid_input);
    EXPECT_THROW((void)stepcert::fit_order(h, std::vector<double>{1e-3, 1e-4}), stepcert::invalid_input);
    EXPECT_THROW((void)stepcert::fit_order(std::vector<double>{0.1}, std::vector<double>{1e-3}), stepcert::invalid_input);
    EXPECT_THROW((void)stepcert::fit_order(std::vector<double>{0.1, 0.1, 0.1}, std::vector<double>{1e-3, 1e-4, 1e-5}),
                 stepcert::invalid_input);
    EXPECT_THROW((void)stepcert::fit_order(h, std::vector<double>{1e-3, 1e-4, 1e-5}, 0.0), stepcert::invalid_input);
}

TEST(Richardson, EqualRatiosGiveTheClosedForm) {
    // y(h) = y* + C h^p with h = 4, 2, 1: d_ab / d_bc = 2^p (derived), so p = log2(d_ab / d_bc).
    EXPECT_NEAR(stepcert::three_level_order(4.0, 2.0, 1.0, 15.0, 1.0), std::log2(15.0), 1e-12);
    EXPECT_NEAR(stepcert::three_level_order(0.9, 0.3, 0.1, 81.0 - 9.0, 9.0 - 1.0), 2.0, 1e-12);
}

TEST(Richardson, UnequalRatiosMatchPublishedGridConvergenceExample) {
    // Celik, Ghia, Roache, Freitas, Coleman, Raad, "Procedure for Estimation and Reporting of
    // Uncertainty Due to Discretization in CFD Applications", ASME J. Fluids Eng. 130 (2008) 078001,
    // worked example, Table 1 (from memory, confirmed by recomputation, see shared reference values
    // section 10): r21 = 1.5, r32 = 4/3 (printed 1.333), phi1 = 6.063, phi2 = 5.972, phi3 = 5.863 give
    // the apparent order p = 1.53 (recomputed 1.53397) and phi_ext = 6.1685 (recomputed 6.16850).
    const double h1 = 1.0, h2 = 1.5, h3 = 2.0;
    const double p = stepcert::three_level_order(h3, h2, h1, 5.972 - 5.863, 6.063 - 5.972);
    EXPECT_NEAR(p, 1.53397, 5e-6);
    EXPECT_NEAR(6.063 + (6.063 - 5.972) / std::expm1(p * std::log(h2 / h1)), 6.16850, 5e-6);
}

TEST(Richardson, NonFiniteOrZeroDifferencesGiveNaN) {
    EXPECT_TRUE(std::isnan(stepcert::three_level_order(4.0, 2.0, 1.0, std::numeric_limits<double>::quiet_NaN(), 1.0)));
    EXPECT_TRUE(std::isnan(stepcert::three_level_order(4.0, 2.0, 1.0, 1.0, 0.0)));
    EXPECT_TRUE(std::isnan(stepcert::three_level_order(1.0, 2.0, 4.0, 1.0, 1.0)));
}

TEST(Richardson, DifferenceFitRecoversOrderWithUnequalRatios) {
    // y(h) = 1 + 3 h^3 at step counts 10, 15, 23, 34, 52 (ratios 1.5, 1.53, 1.48, 1.53): derived.
    const std::vector<double> n{10, 15, 23, 34, 52};
    std::vector<double> hc, hf, d;
    for (std::size_t i = 1; i < n.size(); ++i) {
        hc.push_back(1.0 / n[i - 1]);
        hf.push_back(1.0 / n[i]);
        d.push_back(3.0 * (std::pow(hc.back(), 3) - std::pow(hf.back(), 3)));
    }
    const auto f = stepcert::fit_order_from_differences(hc, hf, d);
    EXPECT_NEAR(f.order, 3.0, 1e-9);
    EXPECT_NEAR(std::exp(f.log_constant), 3.0, 1e-7);  // the fine solutions' error constant
    const auto plain = stepcert::fit_order(hf, d);
    EXPECT_GT(std::abs(plain.order - 3.0), 1e-4);  // without the ratio correction the slope is off
}
