// Vouched digits against an exact solution in cpp_bin_float_50: the true error of the
// reference must be below 10^-vouched_digits relative to ||y(t)||_inf at every output time.
#include <array>
#include <cmath>

#include <gtest/gtest.h>

#include "stepcert/problems/dahlquist.hpp"
#include "test_reference_support.hpp"

namespace {

using reference_test::cpp_bin_float_50;
using reference_test::true_relative_error;
namespace pr = stepcert::problems;

// Decay y' = -y (Hull et al. 1972 class A1, from memory; exact e^-t) in cpp_bin_float_50 for
// 35 digits; t0 among the output times returns y0 itself.
TEST(ReferenceVouchedExact, DecayInCppBinFloat50To35Digits) {
    const auto p = pr::dahlquist<cpp_bin_float_50>(cpp_bin_float_50(-1), cpp_bin_float_50(2));
    const auto r = stepcert::reference_solution<cpp_bin_float_50>(p, 35, {0.0, 0.5, 1.0, 2.0});
    ASSERT_EQ(r.states.size(), 4u);
    EXPECT_EQ(r.states[0][0], cpp_bin_float_50(1));
    EXPECT_EQ(r.times[2], cpp_bin_float_50(1));
    EXPECT_GE(r.vouched_digits, 35.0) << r.how;
    const double err = true_relative_error(r, std::array<cpp_bin_float_50, 1>{}, p.exact());
    EXPECT_LT(err, std::pow(10.0, -r.vouched_digits)) << "true error " << err << "\n" << r.how;
}

} // namespace
