// Order studies of a right-hand side that only works in double: the reference is computed in
// double, vouches for fewer digits, and the study says so and keeps its floor above them.
#include <array>
#include <cmath>
#include <string>

#include <gtest/gtest.h>

#include "stepcert/methods/classic_rk4.hpp"
#include "stepcert/study/order_study.hpp"

namespace {

// A small satellite's attitude about one axis with a nonlinear restoring torque (scenario of
// our own): theta'' = -4 sin(theta) - 0.1 theta', written for double only.
struct attitude_rhs {
    void operator()(const std::array<double, 2>& y, std::array<double, 2>& dydt, double) const {
        dydt[0] = y[1];
        dydt[1] = -4.0 * std::sin(y[0]) - 0.1 * y[1];
    }
};

auto attitude() {
    return stepcert::make_problem("satellite attitude", attitude_rhs{}, std::array<double, 2>{0.6, 0.0}, 0.0, 10.0);
}

} // namespace

TEST(ReferenceDoubleOnly, FewerDigitsAreVouchedAndReported) {
    const auto r = stepcert::order_study(attitude(), stepcert::classic_rk4, stepcert::step_ladder{40, 2.0, 12});
    ASSERT_EQ(r.basis, stepcert::error_basis::reference_solution) << r.basis_detail;
    EXPECT_LT(r.reference_digits, 20.0);  // asked for 20, double cannot carry them
    EXPECT_GT(r.reference_digits, 6.0);
    EXPECT_NE(r.basis_detail.find("double"), std::string::npos) << r.basis_detail;
    ASSERT_TRUE(r.fitted()) << r.verdict_text;
    EXPECT_NEAR(r.fit.order, 4.0, 0.2);  // classic RK4 (Kutta 1901), common practice
    // No level whose error is within the reference's uncertainty counts.
    for (const auto& lv : r.levels) {
        const bool below_reference = lv.error_grid <= std::pow(10.0, -r.reference_digits);
        if (below_reference) {
            EXPECT_NE(lv.status, stepcert::level_status::in_range) << "level " << lv.index;
        }
        if (lv.status == stepcert::level_status::in_range) {
            EXPECT_GT(lv.error_grid, lv.round_off_floor) << "level " << lv.index;
        }
    }
}

TEST(ReferenceDoubleOnly, UnreachableDigitsFallBackWhenAutomaticAndThrowWhenAsked) {
    stepcert::study_options o;
    o.require_reference_digits = true;  // the 20 digits asked, or no reference at all
    const auto r = stepcert::order_study(attitude(), stepcert::classic_rk4, stepcert::step_ladder{40, 2.0, 10}, o);
    EXPECT_EQ(r.basis, stepcert::error_basis::successive_differences);
    EXPECT_NE(r.basis_detail.find("no reference solution"), std::string::npos) << r.basis_detail;
    ASSERT_TRUE(r.fitted()) << r.verdict_text;
    EXPECT_NEAR(r.fit.order, 4.0, 0.2);
    o.basis = stepcert::error_basis::reference_solution;
    EXPECT_THROW((void)stepcert::order_study(attitude(), stepcert::classic_rk4, stepcert::step_ladder{40, 2.0, 4}, o),
                 stepcert::accuracy_unreachable);
}
