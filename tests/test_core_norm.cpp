// weighted_norm: scaling, max and root-mean-square combination, NaN handling, and differences
// taken in the wider of the two scalar types.
#include <array>
#include <cmath>
#include <cstddef>
#include <limits>
#include <type_traits>
#include <vector>

#include <gtest/gtest.h>

#include <boost/multiprecision/cpp_bin_float.hpp>

#include "stepcert/core/error.hpp"
#include "stepcert/core/norm.hpp"

namespace {
using mp50 = boost::multiprecision::cpp_bin_float_50;
using stepcert::norm_kind;
using stepcert::weighted_norm;

TEST(WeightedNorm, ScalesEachComponentByAbsoluteAndRelativeParts) {
    // Component i counts |d_i| / (atol + rtol |ref_i|) (common practice, no source).
    const std::array<double, 2> ref{10.0, -1.0}, approx{10.5, -1.25};
    const weighted_norm max_norm{0.5, 0.1, norm_kind::max};
    // 0.5 / (0.5 + 1.0) = 1/3 and 0.25 / (0.5 + 0.1) = 5/12.
    EXPECT_DOUBLE_EQ(max_norm(approx, ref), 5.0 / 12.0);
    const weighted_norm rms_norm{0.5, 0.1, norm_kind::rms};
    EXPECT_DOUBLE_EQ(rms_norm(approx, ref), std::sqrt((1.0 / 9.0 + 25.0 / 144.0) / 2.0));
    EXPECT_DOUBLE_EQ(weighted_norm::absolute_max()(approx, ref), 0.5);
}

TEST(WeightedNorm, NonFiniteNeverCountsAsSmall) {
    const std::array<double, 2> ref{1.0, 1.0};
    const double nan = std::numeric_limits<double>::quiet_NaN(), inf = std::numeric_limits<double>::infinity();
    EXPECT_EQ(weighted_norm::absolute_max()(std::array<double, 2>{nan, 1.0}, ref), inf);
    EXPECT_EQ(weighted_norm::absolute_max()(std::array<double, 2>{1.0, inf}, ref), inf);
    EXPECT_EQ((weighted_norm{1.0, 0.0, norm_kind::rms})(ref, std::array<double, 2>{1.0, nan}), inf);
}

TEST(WeightedNorm, FixedWeightsPathAgreesWithTheGeneralOneAtEveryLength) {
    // of_difference with rtol = 0 takes an unrolled path (four accumulators, remainder loop):
    // every length 1..11 and every position of the largest entry or of a NaN must give what the
    // definition gives (common practice, no source: max |d| / atol and sqrt(mean d^2) / atol).
    const double nan = std::numeric_limits<double>::quiet_NaN(), inf = std::numeric_limits<double>::infinity();
    for (std::size_t n = 1; n <= 11; ++n) {
        for (std::size_t at = 0; at < n; ++at) {
            std::vector<double> d(n), scale(n, 1.0);
            for (std::size_t i = 0; i < n; ++i) d[i] = (i % 2 ? -1.0 : 1.0) * 0.25 * static_cast<double>(i + 1) / static_cast<double>(n);
            d[at] = -3.0;
            double sum = 0.0;
            for (double x : d) sum += x * x;
            EXPECT_EQ((weighted_norm{2.0, 0.0, norm_kind::max}).of_difference(d, scale), 1.5) << n << " " << at;
            EXPECT_DOUBLE_EQ((weighted_norm{2.0, 0.0, norm_kind::rms}).of_difference(d, scale),
                             std::sqrt(sum / static_cast<double>(n)) / 2.0);
            d[at] = nan;
            EXPECT_EQ((weighted_norm{2.0, 0.0, norm_kind::max}).of_difference(d, scale), inf) << n << " " << at;
            EXPECT_EQ((weighted_norm{2.0, 0.0, norm_kind::rms}).of_difference(d, scale), inf) << n << " " << at;
            d[at] = -inf;
            EXPECT_EQ((weighted_norm{2.0, 0.0, norm_kind::max}).of_difference(d, scale), inf) << n << " " << at;
        }
    }
}

TEST(WeightedNorm, SubtractsInTheWiderType) {
    // 1/3 rounded to double differs from 1/3 by 1/3 * 2^-54 (about 1.85e-17): exactly what the
    // norm must see. Rounding the 50-digit value to double first would give 0.
    const mp50 third = mp50(1) / 3;
    const std::vector<double> approx{1.0 / 3.0};
    const std::vector<mp50> ref{third};
    const double expected = static_cast<double>(abs(mp50(1.0 / 3.0) - third));
    EXPECT_GT(expected, 1.8e-17);
    EXPECT_DOUBLE_EQ(weighted_norm::absolute_max()(approx, ref), expected);
    EXPECT_DOUBLE_EQ(weighted_norm::absolute_max()(ref, approx), expected);
    static_assert(std::is_same_v<stepcert::wider_scalar_t<double, mp50>, mp50>);
    static_assert(std::is_same_v<stepcert::wider_scalar_t<mp50, double>, mp50>);
    static_assert(std::is_same_v<stepcert::wider_scalar_t<double, float>, double>);
}

TEST(WeightedNorm, RejectsUnusableTolerances) {
    EXPECT_THROW((weighted_norm{0.0, 0.0}).validate(), stepcert::invalid_input);
    EXPECT_THROW((weighted_norm{-1.0, 0.0}).validate(), stepcert::invalid_input);
    EXPECT_THROW((weighted_norm{std::numeric_limits<double>::quiet_NaN(), 1.0}).validate(), stepcert::invalid_input);
    EXPECT_NO_THROW((weighted_norm{0.0, 1e-6}).validate());
}

} // namespace
