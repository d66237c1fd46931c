// Order studies of problems without an exact solution, measured against stepcert's
// multiprecision reference solution; cross-checked against the exact solution on the same runs.
#include <array>
#include <cmath>
#include <limits>
#include <string>

#include <gtest/gtest.h>

#include "stepcert/methods/classic_rk4.hpp"
#include "stepcert/study/order_study.hpp"

namespace {

// Kepler e = 0.5 on [0, 20] (Hull, Enright, Fellen, Sedgwick, SIAM J. Numer. Anal. 9 (1972),
// class D; partly from memory), exact solution from Kepler's equation E - e sin E = t.
struct kepler_rhs {
    template <class S, class T>
    void operator()(const S& y, S& dydt, T) const {
        using std::sqrt;
        const auto r2 = y[0] * y[0] + y[1] * y[1];
        const auto r3 = r2 * sqrt(r2);
        dydt[0] = y[2];
        dydt[1] = y[3];
        dydt[2] = -y[0] / r3;
        dydt[3] = -y[1] / r3;
    }
};
// Written for double only, so this file instantiates no multiprecision exact solution.
void kepler_exact(double t, std::array<double, 4>& y) {
    const double e = 0.5;
    double E = t;
    for (int i = 0; i < 50; ++i) {
        const double dE = (E - e * std::sin(E) - t) / (1 - e * std::cos(E));
        E -= dE;
        if (std::abs(dE) < 1e-15) break;
    }
    const double b = std::sqrt(1 - e * e), Ed = 1 / (1 - e * std::cos(E));
    y = {std::cos(E) - e, b * std::sin(E), -std::sin(E) * Ed, b * std::cos(E) * Ed};
}

auto kepler_without_exact() {
    return stepcert::make_problem("kepler e=0.5", kepler_rhs{}, std::array<double, 4>{0.5, 0.0, 0.0, std::sqrt(3.0)}, 0.0, 20.0);
}

const stepcert::step_ladder ladder{50, 2.0, 15};

} // namespace

TEST(ReferenceBasis, ProblemWithoutExactSolutionUsesTheReference) {
    const auto r = stepcert::order_study(kepler_without_exact(), stepcert::classic_rk4, ladder);
    ASSERT_EQ(r.basis, stepcert::error_basis::reference_solution) << r.basis_detail;
    ASSERT_TRUE(r.fitted()) << r.verdict_text;
    EXPECT_NEAR(r.fit.order, 4.0, 0.2);
    EXPECT_GE(r.reference_digits, 20.0);  // working digits 15 + 5 asked
    EXPECT_GT(r.reference_evaluations, 0u);
    std::size_t runs = 0;
    for (const auto& lv : r.levels) runs += lv.evaluations;
    EXPECT_EQ(r.total_evaluations, runs + r.reference_evaluations);
}

TEST(ReferenceBasis, SameRangeAndOrderAsAgainstTheExactSolution) {
    // Same right-hand side, same runs, same grid times. The errors differ by the propagated
    // rounding of y'(0) = sqrt(3) to double (the reference solves the rounded problem, the formula
    // the ideal one) and the double evaluation of the formula: measured below 1e-13 over [0, 20],
    // far under the errors in the range.
    const auto by_reference = stepcert::order_study(kepler_without_exact(), stepcert::classic_rk4, ladder);
    const auto by_exact = stepcert::order_study(kepler_without_exact().with_exact(kepler_exact), stepcert::classic_rk4, ladder);
    ASSERT_EQ(by_exact.basis, stepcert::error_basis::exact_solution);
    EXPECT_DOUBLE_EQ(by_exact.reference_digits, 15.0);
    for (std::size_t k = 0; k < ladder.levels; ++k)
        EXPECT_NEAR(by_reference.levels[k].error_grid, by_exact.levels[k].error_grid, 1e-13) << "level " << k;
    EXPECT_EQ(by_reference.range_first, by_exact.range_first);
    EXPECT_EQ(by_reference.range_last, by_exact.range_last);
    EXPECT_NEAR(by_reference.fit.order, by_exact.fit.order, 0.01);  // the offset is 1% of the finest in-range error
}

TEST(ReferenceBasis, ExactBasisWithoutExactSolutionIsUnsupported) {
    stepcert::study_options o;
    o.basis = stepcert::error_basis::exact_solution;
    try {
        (void)stepcert::order_study(kepler_without_exact(), stepcert::classic_rk4, stepcert::step_ladder{50, 2.0, 4}, o);
        FAIL() << "expected unsupported_operation";
    } catch (const stepcert::unsupported_operation& e) {
        EXPECT_NE(std::string(e.what()).find("has no exact solution"), std::string::npos) << e.what();
    }
}

TEST(ReferenceBasis, ExactProblemsDoNotTakeTheReferencePath) {
    stepcert::study_options o;
    o.basis = stepcert::error_basis::reference_solution;
    EXPECT_THROW((void)stepcert::order_study(kepler_without_exact().with_exact(kepler_exact), stepcert::classic_rk4,
                                             stepcert::step_ladder{50, 2.0, 4}, o),
                 stepcert::unsupported_operation);
}
