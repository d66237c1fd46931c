// Vouched digits against exact solutions: the true error of the reference must be below
// 10^-vouched_digits relative to ||y(t)||_inf at every output time (the definition in
// reference/agreement.hpp), and vouched_digits must reach the digits requested.
#include <array>
#include <cmath>

#include <gtest/gtest.h>

#include "stepcert/problems/kepler.hpp"
#include "test_reference_support.hpp"

namespace {

using reference_test::cpp_bin_float_50;
using reference_test::true_digits;
using reference_test::true_relative_error;
namespace pr = stepcert::problems;

// Kepler's problem, e = 0.5, t = 20: the exact solution from Kepler's equation (solved in
// cpp_bin_float_50) reproduces the check values x = -0.578043295303536, y = 0.863384000919419
// (derived by us from the exact solution; problem: T. E. Hull, W. H. Enright, B. M. Fellen,
// A. E. Sedgwick, "Comparing numerical methods for ordinary differential equations", SIAM J.
// Numer. Anal. 9 (1972) 603-637, problem class D; definitions partly from memory).
TEST(ReferenceVouchedExact, KeplerExactSolutionMatchesCheckValues) {
    const auto p = pr::kepler<cpp_bin_float_50>(cpp_bin_float_50("0.5"), cpp_bin_float_50(20));
    std::array<cpp_bin_float_50, 4> y{};
    p.exact()(cpp_bin_float_50(20), y);
    // 15 decimals given: within 1e-15.
    EXPECT_NEAR(static_cast<double>(y[0]), -0.578043295303536, 1e-15);
    EXPECT_NEAR(static_cast<double>(y[1]), 0.863384000919419, 1e-15);
}

// The default reference, Boost only (cpp_bin_float_38 answer, cpp_bin_float_quad check, named
// explicitly so the test holds whether or not STEPCERT_HAVE_FLOAT128 is defined), for 25 digits on Kepler
// e = 0.5 over [0, 20] at four output times: the true error stays below 10^-vouched.
TEST(ReferenceVouchedExact, KeplerTrueErrorBelowVouchedDigits) {
    const auto p = pr::kepler<cpp_bin_float_50>(cpp_bin_float_50("0.5"), cpp_bin_float_50(20));
    using boost_only_checks = stepcert::type_list<long double, stepcert::cpp_bin_float_quad, stepcert::cpp_bin_float_38,
                                                  stepcert::cpp_bin_float_50>;
    const auto r = stepcert::reference_solution<stepcert::default_reference_real, boost_only_checks>(p, 25, {5.0, 10.0, 15.0, 20.0});
    ASSERT_EQ(r.states.size(), 4u);
    EXPECT_EQ(r.requested_digits, 25);
    EXPECT_GE(r.vouched_digits, 25.0) << r.how;
    const double err = true_relative_error(r, std::array<cpp_bin_float_50, 4>{}, p.exact());
    EXPECT_LT(err, std::pow(10.0, -r.vouched_digits))
        << "true error " << err << " (" << true_digits(err) << " digits), vouched " << r.vouched_digits << "\n" << r.how;
    EXPECT_GT(r.cost.evaluations, 0u);
    EXPECT_GT(r.cost.steps, 0u);
}

// Evenly spaced output times are computed in the reference's own type, not rounded to double:
// on the double-data Kepler problem (y'(0) = sqrt(3) rounded to double, exact solution by
// Kepler's equation from those data) the times 20/3 and 40/3 come back to 36 digits, and the
// true error at them stays below 10^-vouched. At the double-rounded times 20/3 (1.5e-16 off)
// the exact solution moves by about 1e-16, far more than 10^-25 (common practice, no source).
TEST(ReferenceVouchedExact, UniformTimesAreNotRoundedToDouble) {
    const auto p = pr::kepler(0.5, 20.0);
    const reference_test::kepler_from_pericenter exact{cpp_bin_float_50(0.5), cpp_bin_float_50(p.y0()[3])};
    const auto r = stepcert::reference_solution(p, 25, stepcert::uniform_times{3});
    ASSERT_EQ(r.times.size(), 3u);
    for (std::size_t j = 1; j <= 3; ++j) {
        const cpp_bin_float_50 t = cpp_bin_float_50(20) * j / 3;
        EXPECT_LT(static_cast<double>(abs(static_cast<cpp_bin_float_50>(r.times[j - 1]) - t)), 1e-36) << "time " << j;
    }
    EXPECT_EQ(r.times.back(), 20);
    EXPECT_GE(r.vouched_digits, 25.0) << r.how;
    const double err = true_relative_error(r, std::array<cpp_bin_float_50, 4>{}, exact);
    EXPECT_LT(err, std::pow(10.0, -r.vouched_digits)) << "true error " << err << "\n" << r.how;
    EXPECT_THROW((void)stepcert::reference_solution(p, 25, stepcert::uniform_times{0}), stepcert::invalid_input);
}

} // namespace
