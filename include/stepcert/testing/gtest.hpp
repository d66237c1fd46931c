#pragma once
// GoogleTest assertions for order studies (optional: needs GoogleTest; not in stepcert.hpp).
//   EXPECT_TRUE(stepcert::testing::converges_at_order(result, 4.0));
//   EXPECT_TRUE(stepcert::testing::study_converges_at_declared_order(problem, method, ladder));
// They return ::testing::AssertionResult; on failure the message carries the whole study table,
// so a red CI run shows h, steps, evaluations, errors, local orders and which levels counted.
#include <cmath>
#include <exception>
#include <string>

#include <gtest/gtest.h>

#include "stepcert/report/study_table.hpp"
#include "stepcert/study/order_study.hpp"
#include "stepcert/study/study_result.hpp"

namespace stepcert::testing {

/// Passes when the study found an asymptotic range and its fitted order is within
/// `tolerance` of `expected`.
inline ::testing::AssertionResult converges_at_order(const order_study_result& r, double expected, double tolerance = 0.2) {
    if (!std::isfinite(expected) || !std::isfinite(tolerance) || !(tolerance >= 0.0))
        return ::testing::AssertionFailure() << "converges_at_order: expected order and tolerance must be finite, tolerance >= 0";
    const std::string what = "order study of method '" + r.method + "' on problem '" + r.problem + "'";
    if (!r.fitted())
        return ::testing::AssertionFailure() << what << ": no asymptotic range found, so the expected order " << expected
                                             << " cannot be confirmed\n"
                                             << study_table(r);
    const double p = r.fit.order;
    if (std::abs(p - expected) <= tolerance)
        return ::testing::AssertionSuccess() << what << ": fitted order " << p << " is within " << tolerance << " of " << expected;
    auto failure = ::testing::AssertionFailure();
    failure << what << ": fitted order " << p;
    if (r.fit.has_interval()) failure << " (" << 100.0 * r.fit.confidence << "% CI " << r.fit.lower << " .. " << r.fit.upper << ")";
    failure << " is not within " << tolerance << " of the expected order " << expected << "\n" << study_table(r);
    return failure;
}

/// converges_at_order against the method's declared order.
inline ::testing::AssertionResult converges_at_declared_order(const order_study_result& r, double tolerance = 0.2) {
    return converges_at_order(r, static_cast<double>(r.declared_order), tolerance);
}

/// Runs the study and checks its fitted order; an exception from the study fails the assertion
/// with its message.
template <class T = void, class P, class M, class Ladder>
::testing::AssertionResult study_converges_at_order(const P& p, const M& m, const Ladder& ladder, double expected,
                                                    double tolerance = 0.2, const study_options& opt = {}) {
    try {
        return converges_at_order(order_study<T>(p, m, ladder, opt), expected, tolerance);
    } catch (const std::exception& e) {
        return ::testing::AssertionFailure() << "order study of method '" << m.name() << "' on problem '" << p.name()
                                             << "' failed: " << e.what();
    }
}

/// study_converges_at_order against the method's declared order.
template <class T = void, class P, class M, class Ladder>
::testing::AssertionResult study_converges_at_declared_order(const P& p, const M& m, const Ladder& ladder, double tolerance = 0.2,
                                                             const study_options& opt = {}) {
    return study_converges_at_order<T>(p, m, ladder, static_cast<double>(m.order()), tolerance, opt);
}

} // namespace stepcert::testing
