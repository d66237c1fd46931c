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
        return ::testing::AssertionFailure() << what << ": no asymptotic range found, so the expected order "
                                             << detail::table_number(expected, "%g")
                                             << " cannot be confirmed\n"
                                             << study_table(r);
    using detail::table_number;
    const double p = r.fit.order;
    const std::string fitted = what + ": fitted order " + table_number(p, "%.3f");
    if (std::abs(p - expected) <= tolerance)
        return ::testing::AssertionSuccess() << fitted << " is within " << table_number(tolerance, "%g") << " of "
                                             << table_number(expected, "%g");
    auto failure = ::testing::AssertionFailure();
    failure << fitted;
    if (r.fit.has_interval())
        failure << " (" << table_number(100.0 * r.fit.confidence, "%g") << "% CI " << table_number(r.fit.lower, "%.3f") << " .. "
                << table_number(r.fit.upper, "%.3f") << ")";
    failure << " is not within " << table_number(tolerance, "%g") << " of the expected order " << table_number(expected, "%g")
            << "\n"
            << study_table(r);
    return failure;
}

/// converges_at_order against the method's declared order.
inline ::testing::AssertionResult converges_at_declared_order(const order_study_result& r, double tolerance = 0.2) {
    if (r.variable_order)
        return ::testing::AssertionFailure() << "method '" << r.method
                                             << "' has no fixed declared order; use converges_at_order with the order you expect\n"
                                             << study_table(r);
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
    try {
        return converges_at_declared_order(order_study<T>(p, m, ladder, opt), tolerance);
    } catch (const std::exception& e) {
        return ::testing::AssertionFailure() << "order study of method '" << m.name() << "' on problem '" << p.name()
                                             << "' failed: " << e.what();
    }
}

} // namespace stepcert::testing
