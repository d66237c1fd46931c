// Certification at 10^5 unknowns: the busbar (problems/busbar_cooling.hpp) with RK4, where only
// the matrix-free stability check runs (a dense Jacobian would take 80 GB). Ground truth: the
// exact solution of the semi-discrete system and the closed-form largest eigenvalue magnitude of
// the second-difference matrix, 4 (n + 1)^2 cos^2(pi / (2 (n + 1))) (common practice, no source);
// RK4's real stability interval 2.785293563405281624 (shared reference values §6, derived).
// Each runs for several seconds: left out of the sanitizer pass (scripts/build-and-test), where
// test_stability's MatrixFreeStability tests run the same code on 5,000 to 20,000 unknowns.
#include <cmath>
#include <cstddef>
#include <cstdio>
#include <vector>

#include <gtest/gtest.h>

#include "stepcert/certify/certify_fixed_step.hpp"
#include "stepcert/certify/certify_step_count.hpp"
#include "stepcert/certify/stability_check.hpp"
#include "stepcert/methods/classic_rk4.hpp"
#include "stepcert/problems/busbar_cooling.hpp"

namespace test_large_stability {

constexpr std::size_t cells = 100000;
constexpr double rk4_beta = 2.785293563405281624;  // shared reference values §6 (derived)

double rk4_limit() {
    const double pi = 3.14159265358979323846;  // common practice, no source
    const double n1 = static_cast<double>(cells + 1);
    return rk4_beta / (4.0 * n1 * n1 * std::pow(std::cos(pi / (2.0 * n1)), 2));
}

/// 800 steps of h k / dx^2 = 0.5 (stable: RK4's limit is about 0.696 there) over the busbar.
auto busbar() {
    const double dx = 1.0 / static_cast<double>(cells + 1);
    return stepcert::problems::busbar_cooling(cells, 800 * 0.5 * dx * dx);
}

/// A fine-grained hot-spot pattern (mode 20,000: mu = -3.8e9, e^(mu t1) = 5e-6) over 64 steps of
/// h k / dx^2 = 0.5: there the truncation error, not rounding, sets the step, close to the stability limit.
auto busbar_high_mode() {
    const double dx = 1.0 / static_cast<double>(cells + 1);
    return stepcert::problems::busbar_cooling(cells, 64 * 0.5 * dx * dx, 1.0, 20000);
}

stepcert::weighted_norm tolerance() {
    stepcert::weighted_norm tol;
    tol.atol = 1e-8;
    tol.rtol = 1e-8;
    return tol;
}

} // namespace test_large_stability

using namespace test_large_stability;

// The step the user runs with (800 steps, stable by a margin of about 1.39) is certified, and its
// stability verdict comes from the matrix-free path with the limit on the safe side of the truth.
TEST(LargeStability, StepCountIsCertifiedWithTheMatrixFreeCheck) {
    const auto p = busbar();
    const auto c = stepcert::certify_step_count(p, stepcert::classic_rk4, 800, tolerance());
    EXPECT_NE(c.level, stepcert::evidence_level::not_certified) << c.reason_detail;
    EXPECT_TRUE(c.stability.checked);
    EXPECT_TRUE(c.stability.stable) << c.stability.worst_mode;
    EXPECT_LE(c.stability.step_limit, rk4_limit());
    EXPECT_GT(c.stability.step_limit, 0.99 * rk4_limit());
    std::printf("busbar 10^5, certify_step_count(800): level %d, %zu evaluations, step limit / closed form %.6f\n",
                static_cast<int>(c.level), c.evaluations, c.stability.step_limit / rk4_limit());
}

// certify with its defaults on the mode-1 busbar at 10^5 unknowns: the step is set by stability
// alone there (the truncation error at the stable step is below rounding, and rounding, barely
// damped in the highest modes at the stability edge, grows with the step count faster than the
// sqrt(N) floor). Certified from the round-off plateau, limited by stability, the verdict from the
// matrix-free path, and verified against the exact solution of the semi-discrete system.
TEST(LargeStability, CertifyWithDefaultsIssuesACertificate) {
    const auto p = busbar();
    const auto c = stepcert::certify(p, stepcert::classic_rk4, tolerance());
    ASSERT_NE(c.level, stepcert::evidence_level::not_certified) << c.reason_detail;
    EXPECT_EQ(c.level, stepcert::evidence_level::reference_verified);
    EXPECT_LE(c.reference_error, 1.0);
    EXPECT_EQ(c.limited_by, stepcert::step_limited_by::stability) << c.basis;
    EXPECT_TRUE(c.stability.checked);
    EXPECT_TRUE(c.stability.stable) << c.stability.worst_mode;
    EXPECT_LE(c.step, rk4_limit()) << c.basis;
    EXPECT_GE(c.step, 0.5 * rk4_limit()) << c.basis;  // set by the limit, not far inside it
    std::printf("busbar 10^5, certify: level %d, %zu steps (h / RK4 limit %.3f), %zu evaluations; %s\n", static_cast<int>(c.level),
                c.steps, c.step / rk4_limit(), c.evaluations, c.basis.c_str());
}

// certify with its defaults at 10^5 unknowns where accuracy and stability both matter: issued,
// stable, the stability verdict from the matrix-free path.
TEST(LargeStability, CertifyWithDefaultsOnAFineHotSpotPattern) {
    const auto p = busbar_high_mode();
    const auto c = stepcert::certify(p, stepcert::classic_rk4, tolerance());
    EXPECT_NE(c.level, stepcert::evidence_level::not_certified) << c.reason_detail;
    EXPECT_TRUE(c.stability.checked);
    EXPECT_TRUE(c.stability.stable) << c.stability.worst_mode;
    EXPECT_LE(c.step, rk4_limit()) << c.basis;
    std::printf("busbar 10^5 mode 20000, certify: level %d, %zu steps (h / RK4 limit %.3f), %zu evaluations; %s %s\n",
                static_cast<int>(c.level), c.steps, c.step / rk4_limit(), c.evaluations, c.basis.c_str(), c.reason_detail.c_str());
}
