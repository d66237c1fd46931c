// What reference_solution refuses, and how: accuracy_unreachable when the digits asked exceed
// what the type carries (before any work), when the budget runs out, and when the runs cannot
// agree to the digits asked; invalid_input and non_finite_value for bad arguments. Also the
// agreement measure behind vouched_digits, on hand-made values.
// float128 parts run where the build has it (GCC: stepcert_dev links stepcert::float128).
#include <array>
#include <cmath>
#include <cstddef>
#include <limits>
#include <string>
#include <vector>

#include <gtest/gtest.h>

#include "stepcert/problems/arenstorf.hpp"
#include "test_reference_support.hpp"

namespace {

using stepcert::accuracy_unreachable;
namespace pr = stepcert::problems;

/// y' = -y counting its evaluations (in every scalar type).
auto counted_decay(std::size_t* calls) {
    return stepcert::make_problem(
        "counted decay",
        [calls](const auto& y, auto& dydt, const auto&) {
            ++*calls;
            dydt[0] = -y[0];
        },
        std::array<double, 1>{1.0}, 0.0, 1.0);
}

template <class F>
std::string message_of(F&& f) {
    try {
        f();
    } catch (const accuracy_unreachable& e) {
        return e.what();
    }
    return "(no accuracy_unreachable thrown)";
}

// cpp_bin_float_38 carries 38 digits, 3 kept for round-off growth: 36 is refused before the
// right-hand side is called once.
TEST(ReferenceUnreachable, MoreDigitsThanTheTypeCarriesRefusedBeforeAnyWork) {
    std::size_t calls = 0;
    const auto p = counted_decay(&calls);
    const std::string msg = message_of([&] { stepcert::reference_solution(p, 36); });
    EXPECT_NE(msg.find("wider type"), std::string::npos) << msg;
    EXPECT_NE(msg.find("35"), std::string::npos) << msg;  // says how many can be vouched
    EXPECT_EQ(calls, 0u);
    // The same for another type: cpp_bin_float_50 (50 digits) refuses 48.
    const std::string msg50 = message_of([&] { stepcert::reference_solution<stepcert::cpp_bin_float_50>(p, 48); });
    EXPECT_NE(msg50.find("cpp_bin_float_50"), std::string::npos) << msg50;
    EXPECT_EQ(calls, 0u);
}

TEST(ReferenceUnreachable, BudgetTooSmall) {
    std::size_t calls = 0;
    const auto p = counted_decay(&calls);
    stepcert::reference_options opt;
    opt.max_evaluations = 300;
    const std::string msg = message_of([&] { stepcert::reference_solution(p, 25, {}, opt); });
    EXPECT_NE(msg.find("budget"), std::string::npos) << msg;
    EXPECT_NE(msg.find("max_evaluations"), std::string::npos) << msg;
    EXPECT_LE(calls, 301u);  // the evaluation that found the budget spent is not performed
}

// Published Arenstorf constants in float128: its round-off floor on this orbit is near 25
// digits (measured, reference-values §12: float128 bottoms out at about 5e-26), so 30 digits
// cannot be vouched; the message says why and what to do.
#if defined(STEPCERT_HAVE_FLOAT128)
TEST(ReferenceUnreachable, RunsThatCannotAgreeAreReported) {
    const auto p = pr::arenstorf_orbit<stepcert::cpp_bin_float_50>(pr::arenstorf_constants::published);
    const std::string msg = message_of([&] { stepcert::reference_solution<stepcert::float128>(p, 30); });
    EXPECT_NE(msg.find("could not vouch for 30 digits in float128"), std::string::npos) << msg;
    EXPECT_NE(msg.find("wider type"), std::string::npos) << msg;
}
#endif

TEST(ReferenceUnreachable, BadArguments) {
    std::size_t calls = 0;
    const auto p = counted_decay(&calls);
    EXPECT_THROW(stepcert::reference_solution(p, 0), stepcert::invalid_input);
    EXPECT_THROW(stepcert::reference_solution(p, 10, {0.5, 1.5}), stepcert::invalid_input);   // beyond t1
    EXPECT_THROW(stepcert::reference_solution(p, 10, {-0.5}), stepcert::invalid_input);       // before t0
    EXPECT_THROW(stepcert::reference_solution(p, 10, {0.5, 0.5}), stepcert::invalid_input);   // not increasing
    EXPECT_THROW(stepcert::reference_solution(p, 10, {std::nan("")}), stepcert::non_finite_value);
    EXPECT_EQ(calls, 0u);
}

TEST(ReferenceUnreachable, NonFiniteRightHandSideIsNotAnAccuracyProblem) {
    const auto p = stepcert::make_problem(
        "blows up at 0.5",
        [](const auto& y, auto& dydt, const auto& t) {
            using T = std::decay_t<decltype(y[0])>;
            dydt[0] = t > 0.5 ? std::numeric_limits<T>::quiet_NaN() : -y[0];
        },
        std::array<double, 1>{1.0}, 0.0, 1.0);
    EXPECT_THROW(stepcert::reference_solution(p, 20), stepcert::non_finite_value);
}

// Only t0 asked: the initial value itself, no run.
TEST(ReferenceUnreachable, OnlyInitialTimeNeedsNoRun) {
    std::size_t calls = 0;
    const auto p = counted_decay(&calls);
    const auto r = stepcert::reference_solution(p, 30, {0.0});
    ASSERT_EQ(r.states.size(), 1u);
    EXPECT_EQ(r.states[0][0], 1);
    EXPECT_EQ(calls, 0u);
    EXPECT_TRUE(r.vouches_requested());
}

// The measure (reference/agreement.hpp): r = max_i ||a_i - c_i||_inf / ||a_i||_inf.
TEST(ReferenceAgreement, LargestRelativeDifferenceAndDigits) {
    using S = std::array<double, 2>;
    const std::vector<S> answer{{1.0, -4.0}, {0.5, 2.0}};
    const std::vector<S> check{{1.0 + 4e-12, -4.0}, {0.5, 2.0 - 2e-9}};
    const auto g = stepcert::compare_runs(answer, check);
    EXPECT_NEAR(g.largest_relative_difference, 1e-9, 1e-9 * 1e-6);  // 2e-9 / 2 at the second time
    EXPECT_EQ(g.worst_index, 1u);
    EXPECT_NEAR(stepcert::agreement_digits(g.largest_relative_difference, 1.0, 15.0), 9.0, 1e-6);
    EXPECT_NEAR(stepcert::agreement_digits(g.largest_relative_difference, 3.0, 15.0), 9.0 - std::log10(3.0), 1e-6);
    EXPECT_EQ(stepcert::agreement_digits(0.0, 1.0, 15.0), 15.0);  // exact agreement: what the type carries
}

TEST(ReferenceAgreement, NaNNeverCountsAsAgreement) {
    using S = std::array<double, 1>;
    const auto g = stepcert::compare_runs(std::vector<S>{{1.0}}, std::vector<S>{{std::nan("")}});
    EXPECT_EQ(stepcert::agreement_digits(g.largest_relative_difference, 1.0, 15.0), 0.0);
    EXPECT_THROW(stepcert::compare_runs(std::vector<S>{{1.0}}, std::vector<S>{}), stepcert::invalid_input);
}

} // namespace
