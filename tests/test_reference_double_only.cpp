// A right-hand side that accepts only double: the reference is computed in double (order-12
// extrapolation, two runs 100x apart in tolerance), vouches honestly for fewer digits, and says
// why in `how`. Checked against Kepler's exact solution (T. E. Hull, W. H. Enright, B. M.
// Fellen, A. E. Sedgwick, SIAM J. Numer. Anal. 9 (1972) 603-637, class D, e = 0.5; definitions
// partly from memory).
#include <array>
#include <cmath>
#include <string>

#include <gtest/gtest.h>

#include "stepcert/problems/kepler.hpp"
#include "test_reference_support.hpp"

namespace {

using reference_test::cpp_bin_float_50;
using reference_test::true_digits;
using reference_test::true_relative_error;

using state = std::array<double, 4>;

/// Kepler's right-hand side written for double only, as a user's legacy code might be.
void kepler_double_only(const state& y, state& dydt, double) {
    const double r2 = y[0] * y[0] + y[1] * y[1];
    const double inv_r3 = 1.0 / (r2 * std::sqrt(r2));
    dydt = {y[2], y[3], -y[0] * inv_r3, -y[1] * inv_r3};
}

auto kepler_problem() {
    return stepcert::make_problem("kepler, double-only rhs",
                                  [](const state& y, state& dydt, double t) { kepler_double_only(y, dydt, t); },
                                  state{0.5, 0.0, 0.0, std::sqrt(3.0)}, 0.0, 20.0);
}

/// Exact solution of the problem as given (y0 with sqrt(3) rounded to double), in
/// cpp_bin_float_50; it differs from the e = 0.5 solution by about 1e-14 at t = 20.
const reference_test::kepler_from_pericenter exact{cpp_bin_float_50(0.5), cpp_bin_float_50(std::sqrt(3.0))};

static_assert(!decltype(kepler_problem())::rhs_accepts<stepcert::default_reference_real>);

// The general pericenter formula reproduces the class D check values for e = 0.5, t = 20:
// x = -0.578043295303536, y = 0.863384000919419 (derived by us from the exact solution,
// reference-values §2).
TEST(ReferenceSolutionDoubleOnly, ExactSolutionHelperMatchesCheckValues) {
    const reference_test::kepler_from_pericenter exact_e05{cpp_bin_float_50("0.5"), sqrt(cpp_bin_float_50(3))};
    std::array<cpp_bin_float_50, 4> y{};
    exact_e05(cpp_bin_float_50(20), y);
    EXPECT_NEAR(static_cast<double>(y[0]), -0.578043295303536, 1e-15);
    EXPECT_NEAR(static_cast<double>(y[1]), 0.863384000919419, 1e-15);
}

TEST(ReferenceSolutionDoubleOnly, FewerDigitsVouchedAndSaidWhy) {
    const auto p = kepler_problem();
    const auto r = stepcert::reference_solution(p, 25, {10.0, 20.0});
    EXPECT_EQ(r.requested_digits, 25);
    EXPECT_LE(r.vouched_digits, 15.0);
    EXPECT_GE(r.vouched_digits, 6.0) << r.how;
    EXPECT_FALSE(r.vouches_requested());
    EXPECT_NE(r.how.find("does not accept cpp_bin_float_38"), std::string::npos) << r.how;
    EXPECT_NE(r.how.find("computed in double"), std::string::npos) << r.how;
    EXPECT_NE(r.how.find("fewer digits"), std::string::npos) << r.how;
    // Honest: the true error lies below the bound.
    const double err = true_relative_error(r, std::array<cpp_bin_float_50, 4>{}, exact);
    EXPECT_LT(err, std::pow(10.0, -r.vouched_digits))
        << "true error " << err << " (" << true_digits(err) << " digits)\n" << r.how;
}

TEST(ReferenceSolutionDoubleOnly, FewDigitsAskedAreVouched) {
    const auto r = stepcert::reference_solution(kepler_problem(), 8);
    EXPECT_TRUE(r.vouches_requested()) << r.how;
    const double err = true_relative_error(r, std::array<cpp_bin_float_50, 4>{}, exact);
    EXPECT_LT(err, std::pow(10.0, -r.vouched_digits)) << r.how;
}

TEST(ReferenceSolutionDoubleOnly, StrictOptionRefusesFewerDigits) {
    stepcert::reference_options strict;
    strict.allow_fewer_digits_if_double_only = false;
    EXPECT_THROW(stepcert::reference_solution(kepler_problem(), 25, {}, strict), stepcert::accuracy_unreachable);
}

// A right-hand side generic in the state but with a double time parameter accepts long double
// (the time converts implicitly) but not a multiprecision type: the reference runs in long double.
TEST(ReferenceSolutionDoubleOnly, LongDoubleWhenTheRightHandSideTakesIt) {
    const auto p = stepcert::make_problem(
        "kepler, generic state, double time",
        [](const auto& y, auto& dydt, double t) { stepcert::problems::kepler_rhs{}(y, dydt, t); },
        state{0.5, 0.0, 0.0, std::sqrt(3.0)}, 0.0, 20.0);
    const auto r = stepcert::reference_solution(p, 25);
    EXPECT_NE(r.how.find("computed in long double"), std::string::npos) << r.how;
    EXPECT_LE(r.vouched_digits, 18.0);
    const double err = true_relative_error(r, std::array<cpp_bin_float_50, 4>{}, exact);
    EXPECT_LT(err, std::pow(10.0, -r.vouched_digits)) << "true error " << err << "\n" << r.how;
}

} // namespace
