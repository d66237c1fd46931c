// Order studies of problems without an exact solution, measured against stepcert's
// multiprecision reference solution; cross-checked against the exact solution on the same runs.
#include <array>
#include <cmath>
#include <limits>
#include <string>
#include <vector>

#include <gtest/gtest.h>

#include "stepcert/methods/classic_rk4.hpp"
#include "stepcert/study/order_study.hpp"
#include "test_study_support.hpp"

namespace {

using study_test::kepler_exact_double;
using study_test::kepler_without_exact;

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
    const auto by_exact = stepcert::order_study(kepler_without_exact().with_exact(kepler_exact_double), stepcert::classic_rk4, ladder);
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
    EXPECT_THROW((void)stepcert::order_study(kepler_without_exact().with_exact(kepler_exact_double), stepcert::classic_rk4,
                                             stepcert::step_ladder{50, 2.0, 4}, o),
                 stepcert::unsupported_operation);
}

// One reference for several studies: computed once at 64 evenly spaced times, it serves every
// study whose grid size divides 64, and gives the same errors as each study's own reference
// (both vouch for 20+ digits; the errors compared are above 1e-13).
TEST(ReferenceBasis, SharedReferenceServesSeveralStudies) {
    const auto p = kepler_without_exact();
    const auto shared = stepcert::reference_solution(p, 20, stepcert::uniform_times{64});
    const stepcert::step_ladder coarse{64, 2.0, 6}, halves{32, 2.0, 6};
    for (const auto& l : {coarse, halves}) {
        const auto own = stepcert::order_study(p, stepcert::classic_rk4, l);
        const auto with_shared = stepcert::order_study(p, stepcert::classic_rk4, l, {}, shared);
        ASSERT_EQ(with_shared.basis, stepcert::error_basis::reference_solution);
        EXPECT_TRUE(with_shared.reference_shared);
        EXPECT_FALSE(own.reference_shared);
        EXPECT_EQ(with_shared.reference_evaluations, shared.cost.evaluations);
        std::size_t runs = 0;
        for (const auto& lv : with_shared.levels) runs += lv.evaluations;
        EXPECT_EQ(with_shared.total_evaluations, runs);  // the shared cost is not the study's
        for (std::size_t k = 0; k < l.levels; ++k)
            EXPECT_NEAR(with_shared.levels[k].error_grid / own.levels[k].error_grid, 1.0, 1e-6) << "level " << k;
        EXPECT_NEAR(with_shared.fit.order, own.fit.order, 1e-6);
    }
}

TEST(ReferenceBasis, SharedReferenceMustCoverTheGrid) {
    const auto p = kepler_without_exact();
    const auto shared = stepcert::reference_solution(p, 18, stepcert::uniform_times{64});
    try {
        (void)stepcert::order_study(p, stepcert::classic_rk4, {48, 2.0, 4}, {}, shared);  // grid of 48 times
        FAIL() << "a grid of 48 times is not inside a reference of 64";
    } catch (const stepcert::invalid_input& e) {
        EXPECT_NE(std::string(e.what()).find("multiple of 48"), std::string::npos) << e.what();
    }
    // Times 1e-12 off the grid (far more than double's rounding of t <= 20, 4.4e-15) are refused.
    std::vector<double> doubles;
    for (int j = 1; j <= 64; ++j) doubles.push_back(20.0 * j / 64.0 + (j % 3 == 0 ? 1e-12 : 0.0));
    const auto off = stepcert::reference_solution(p, 18, doubles);
    EXPECT_THROW((void)stepcert::order_study(p, stepcert::classic_rk4, {64, 2.0, 3}, {}, off), stepcert::invalid_input);
    stepcert::study_options differences;
    differences.basis = stepcert::error_basis::successive_differences;
    EXPECT_THROW((void)stepcert::order_study(p, stepcert::classic_rk4, {64, 2.0, 3}, differences, shared), stepcert::invalid_input);
    // A study that requires 30 reference digits refuses a shared reference that vouches fewer (18 asked).
    stepcert::study_options strict;
    strict.require_reference_digits = true;
    strict.reference_digits = 30;
    EXPECT_LT(shared.vouched_digits, 30.0);
    EXPECT_THROW((void)stepcert::order_study(p, stepcert::classic_rk4, {64, 2.0, 3}, strict, shared), stepcert::accuracy_unreachable);
}
