// Vouched digits against an exact solution on a std::vector state given in double, with a
// generic right-hand side: the true error of the reference must be below 10^-vouched_digits
// relative to ||y(t)||_inf at every output time.
#include <cmath>
#include <vector>

#include <gtest/gtest.h>

#include "test_reference_support.hpp"

namespace {

using reference_test::cpp_bin_float_50;
using reference_test::true_relative_error;

// y' = y cos t, y(0) = 1 (Hull et al. 1972 class A3, from memory; exact e^{sin t}, derived),
// 20 digits on a std::vector state given in double: the right-hand side is generic.
TEST(ReferenceVouchedExact, OscillatingGrowthOnVectorState) {
    const auto p = stepcert::make_problem(
        "y' = y cos t",
        [](const auto& y, auto& dydt, const auto& t) {
            using std::cos;
            dydt[0] = y[0] * cos(t);
        },
        std::vector<double>{1.0}, 0.0, 10.0);
    const auto r = stepcert::reference_solution(p, 20, {2.5, 5.0, 7.5, 10.0});
    EXPECT_GE(r.vouched_digits, 20.0) << r.how;
    const auto exact = [](const cpp_bin_float_50& t, std::vector<cpp_bin_float_50>& y) { y[0] = exp(sin(t)); };
    const double err = true_relative_error(r, std::vector<cpp_bin_float_50>(1), exact);
    EXPECT_LT(err, std::pow(10.0, -r.vouched_digits)) << "true error " << err << "\n" << r.how;
}

} // namespace
