// The reference basis against the exact basis on a problem whose data are exact in double:
// the errors of the same runs must agree to the reference's vouched digits.
#include <array>
#include <cmath>
#include <limits>

#include <gtest/gtest.h>

#include "stepcert/methods/explicit_midpoint.hpp"
#include "stepcert/study/order_study.hpp"

namespace {

// A tuning fork's prong as an undamped oscillator q'' = -q: y(0) = (1, 0) is exact in double,
// and so is the right-hand side, so the reference solves exactly the problem the formula
// y = (cos t, -sin t) describes.
auto prong() {
    return stepcert::make_problem("tuning fork prong",
                                  [](const auto& y, auto& dydt, auto) {
                                      dydt[0] = y[1];
                                      dydt[1] = -y[0];
                                  },
                                  std::array<double, 2>{1.0, 0.0}, 0.0, 6.0);
}

} // namespace

TEST(ReferenceCrossCheck, ErrorsAgreeToTheVouchedDigits) {
    const stepcert::step_ladder ladder{24, 2.0, 10};
    const auto by_reference = stepcert::order_study(prong(), stepcert::explicit_midpoint, ladder);
    const auto by_exact = stepcert::order_study(prong().with_exact([](auto t, auto& y) {
        using std::cos;
        using std::sin;
        y[0] = cos(t);
        y[1] = -sin(t);
    }),
                                                stepcert::explicit_midpoint, ladder);
    ASSERT_EQ(by_reference.basis, stepcert::error_basis::reference_solution) << by_reference.basis_detail;
    ASSERT_EQ(by_exact.basis, stepcert::error_basis::exact_solution);
    ASSERT_GE(by_reference.reference_digits, 20.0);
    // Solution size 1: the reference is within 10^-digits absolute; each error is then rounded to
    // double once (4 eps relative allows for both studies).
    const double vouched = std::pow(10.0, -by_reference.reference_digits);
    const double eps = std::numeric_limits<double>::epsilon();
    for (std::size_t k = 0; k < ladder.levels; ++k) {
        const auto &a = by_reference.levels[k], &b = by_exact.levels[k];
        EXPECT_NEAR(a.error_grid, b.error_grid, vouched + 4 * eps * b.error_grid) << "level " << k;
        EXPECT_NEAR(a.error_final, b.error_final, vouched + 4 * eps * b.error_final) << "level " << k;
    }
    ASSERT_TRUE(by_reference.fitted()) << by_reference.verdict_text;
    EXPECT_NEAR(by_reference.fit.order, 2.0, 0.2);  // explicit midpoint: second order (common practice)
    EXPECT_EQ(by_reference.fit.order, by_exact.fit.order);
}
