// The linear stability check: amplification factors measured from one method step against the
// truncated exponential and the catalogue tableaus' stability functions (which also shows which
// weights each odeint stepper propagates), stable step limits on y' = lambda y against the
// derived real stability intervals, a stiff 2x2 system at steps just above and below the limit,
// neutral and growing modes left unchecked, and every rejected input with its exception type.
#include <array>
#include <cmath>
#include <complex>
#include <cstddef>
#include <limits>
#include <string>
#include <vector>

#include <gmock/gmock.h>
#include <gtest/gtest.h>

#include <boost/multiprecision/cpp_int.hpp>

#include "stepcert/certify/stability_check.hpp"
#include "stepcert/core/problem.hpp"
#include "stepcert/methods/adams_bashforth_moulton.hpp"
#include "stepcert/methods/cash_karp54.hpp"
#include "stepcert/methods/classic_rk4.hpp"
#include "stepcert/methods/dormand_prince54.hpp"
#include "stepcert/methods/explicit_euler.hpp"
#include "stepcert/methods/explicit_midpoint.hpp"
#include "stepcert/methods/fehlberg78.hpp"
#include "stepcert/methods/one_step_method.hpp"
#include "stepcert/problems/busbar_cooling.hpp"
#include "stepcert/problems/dahlquist.hpp"
#include "stepcert/problems/harmonic_oscillator.hpp"
#include "stepcert/problems/linear_system.hpp"
#include "stepcert/tableau/catalogue.hpp"
#include "stepcert/tableau/stability.hpp"

namespace test_stability_check {
using boost::multiprecision::cpp_rational;
using cplx = std::complex<double>;
using testing::HasSubstr;
namespace sp = stepcert::problems;
namespace tb = stepcert::tableaus;

const std::vector<cplx> sample_z{{-1.0, 0.0}, {-2.5, 0.0}, {0.0, 1.5}, {-1.0, 2.0}, {-3.0, 1.0}, {0.5, -0.7}, {-0.01, 0.02}};

/// |a - b| relative to max(1, |b|).
double relative_gap(cplx a, cplx b) { return std::abs(a - b) / std::max(1.0, std::abs(b)); }

/// R(z) of a tableau from its exact stability function (coefficients rounded to double at the end).
cplx tableau_r(const stepcert::tableau<cpp_rational>& t, cplx z) { return stepcert::stability_function_of(t)(z); }

/// The same tableau advancing with its embedded weights instead.
stepcert::tableau<cpp_rational> with_embedded_weights(stepcert::tableau<cpp_rational> t) {
    t.b = *t.b_embedded;
    return t;
}

/// y' = A y with A = [[a, b], [b, a]]: eigenvalues a + b and a - b; A's own Jacobian attached or not.
struct symmetric_rhs {
    double a, b;
    template <class S, class T>
    void operator()(const S& y, S& dy, T) const {
        dy[0] = a * y[0] + b * y[1];
        dy[1] = b * y[0] + a * y[1];
    }
};
struct symmetric_jacobian {
    double a, b;
    template <class S, class T, class M>
    void operator()(const S&, T, M& J) const {
        J(0, 0) = a;
        J(0, 1) = b;
        J(1, 0) = b;
        J(1, 1) = a;
    }
};
// Eigenvalues -1 and -1000; the entries are halves, exact in binary.
auto stiff_pair(double t1) {
    return stepcert::make_problem("stiff pair", symmetric_rhs{-500.5, 499.5}, std::array<double, 2>{1.0, 0.5}, 0.0, t1);
}
auto stiff_pair_with_jacobian(double t1) { return stiff_pair(t1).with_jacobian(symmetric_jacobian{-500.5, 499.5}); }

/// Growing (0.5), oscillating (+/- i) and decaying (-10) modes side by side.
struct mixed_rhs {
    template <class S, class T>
    void operator()(const S& y, S& dy, T) const {
        dy[0] = 0.5 * y[0];
        dy[1] = y[2];
        dy[2] = -y[1];
        dy[3] = -10.0 * y[3];
    }
};

// Heun's method by hand: an in-house method without a tableau.
const auto heun_step = [](auto& rhs, auto& y, auto t, auto h) {
    auto k1 = y, k2 = y, z = y;
    rhs(y, k1, t);
    for (std::size_t i = 0; i < y.size(); ++i) z[i] = y[i] + h * k1[i];
    rhs(z, k2, t + h);
    for (std::size_t i = 0; i < y.size(); ++i) y[i] += h / 2 * (k1[i] + k2[i]);
};

// Linearly implicit Euler for linear right-hand sides of two unknowns: y += h (I - hJ)^(-1) f(y),
// with J's columns f(e_j) (exact when f is linear). An implicit in-house method, R(z) = 1/(1 - z).
const auto implicit_euler_step = [](auto& rhs, auto& y, auto t, auto h) {
    auto f = y, e = y, c0 = y, c1 = y;
    rhs(y, f, t);
    e[0] = 1;
    e[1] = 0;
    rhs(e, c0, t);
    e[0] = 0;
    e[1] = 1;
    rhs(e, c1, t);
    const auto m00 = 1 - h * c0[0], m01 = -h * c1[0], m10 = -h * c0[1], m11 = 1 - h * c1[1];
    const auto det = m00 * m11 - m01 * m10;
    const auto d0 = (m11 * f[0] - m01 * f[1]) / det, d1 = (m00 * f[1] - m10 * f[0]) / det;
    y[0] += h * d0;
    y[1] += h * d1;
};

const auto nan_step = [](auto&, auto& y, auto, auto) { y[0] = std::numeric_limits<double>::quiet_NaN(); };

TEST(AmplificationFactor, ClassicRk4AndExplicitEulerGiveTheTruncatedExponential) {
    // R(z) = sum_{k<=p} z^k/k! for s = p <= 4 (E. Hairer, G. Wanner, Solving ODEs II, §IV.2 — from memory).
    for (const cplx z : sample_z) {
        const cplx rk4 = 1.0 + z + z * z / 2.0 + z * z * z / 6.0 + z * z * z * z / 24.0;
        EXPECT_LT(relative_gap(stepcert::amplification_factor(stepcert::classic_rk4, z), rk4), 1e-14) << z;
        EXPECT_LT(relative_gap(stepcert::amplification_factor(stepcert::explicit_euler, z), 1.0 + z), 1e-15) << z;
    }
}

TEST(AmplificationFactor, InHouseMethodsWithoutTableauAreMeasuredToo) {
    // Heun: 1 + z + z^2/2; linearly implicit Euler on a linear problem: 1/(1 - z) (common practice, no source).
    const auto heun = stepcert::one_step_method("Heun by hand", 2, heun_step);
    const auto implicit = stepcert::one_step_method("linearly implicit Euler", 1, implicit_euler_step);
    for (const cplx z : sample_z) {
        EXPECT_LT(relative_gap(stepcert::amplification_factor(heun, z), 1.0 + z + z * z / 2.0), 1e-15) << z;
        EXPECT_LT(relative_gap(stepcert::amplification_factor(implicit, z), 1.0 / (1.0 - z)), 1e-15) << z;
    }
}

TEST(AmplificationFactor, AgreesWithTheCatalogueTableausAndShowsWhichWeightsOdeintPropagates) {
    // Stability function of each published tableau, exact in cpp_rational (tableau/stability.hpp,
    // Hairer & Wanner II §IV.3 — from memory); tableaus: Cash & Karp, ACM TOMS 16 (1990); Dormand &
    // Prince, J. Comput. Appl. Math. 6 (1980); Fehlberg, NASA TR R-287 (1968) — from memory.
    auto expect_same = [](const auto& method, const stepcert::tableau<cpp_rational>& t) {
        for (const cplx z : sample_z)
            EXPECT_LT(relative_gap(stepcert::amplification_factor(method, z), tableau_r(t, z)), 1e-13) << t.name << " at " << z;
    };
    expect_same(stepcert::explicit_euler, tb::explicit_euler<cpp_rational>());
    expect_same(stepcert::explicit_midpoint, tb::explicit_midpoint<cpp_rational>());
    expect_same(stepcert::classic_rk4, tb::classic_rk4<cpp_rational>());
    expect_same(stepcert::cash_karp54, tb::cash_karp54<cpp_rational>());
    expect_same(stepcert::dormand_prince54, tb::dormand_prince54<cpp_rational>());
    expect_same(stepcert::fehlberg78, tb::fehlberg78<cpp_rational>());
    // The embedded weights give a measurably different R at z = -3 + i: odeint's fixed steps
    // advance with the 5th-order (Cash-Karp, Dormand-Prince) and 8th-order (Fehlberg) weights.
    const cplx z{-3.0, 1.0};
    EXPECT_GT(relative_gap(stepcert::amplification_factor(stepcert::cash_karp54, z),
                           tableau_r(with_embedded_weights(tb::cash_karp54<cpp_rational>()), z)), 1e-4);
    EXPECT_GT(relative_gap(stepcert::amplification_factor(stepcert::dormand_prince54, z),
                           tableau_r(with_embedded_weights(tb::dormand_prince54<cpp_rational>()), z)), 1e-4);
    EXPECT_GT(relative_gap(stepcert::amplification_factor(stepcert::fehlberg78, z),
                           tableau_r(with_embedded_weights(tb::fehlberg78<cpp_rational>()), z)), 1e-6);
}

TEST(StableStepLimit, MatchesTheRealStabilityIntervalOnTheTestEquation) {
    // h_lim = beta / 50 on y' = -50 y; beta = 2 (explicit Euler), 2.785293563405281624 (classic RK4),
    // 3.306567892634946504 (Dormand-Prince, 5th-order weights): derived to 18 digits (shared
    // reference values §6; J. D. Lambert, Numerical Methods for ODE Systems, 1991, §5.12 gives 2.78 — from memory).
    const auto p = sp::dahlquist(-50.0, 1.0);
    auto expect_limit = [&](const auto& method, double beta) {
        const auto v = stepcert::check_run_stability(p, method, 0.01);
        EXPECT_TRUE(v.stable) << v.basis;
        ASSERT_TRUE(v.limit_found) << v.basis;
        EXPECT_NEAR(v.step_limit / (beta / 50.0), 1.0, 1e-9) << method.name();
        EXPECT_NEAR(v.margin, beta / 50.0 / 0.01, 1e-8) << method.name();
        EXPECT_EQ(v.worst->lambda, cplx(-50.0, 0.0));
    };
    expect_limit(stepcert::explicit_euler, 2.0);
    expect_limit(stepcert::classic_rk4, 2.785293563405281624);
    expect_limit(stepcert::dormand_prince54, 3.306567892634946504);
}

TEST(StableStepLimit, StiffPairJustAboveAndJustBelowTheRk4Limit) {
    // Eigenvalues -1 and -1000: RK4 is stable for h <= 2.785293563405281624/1000 (derived, shared
    // reference values §6), set by lambda = -1000.
    const double limit = 2.785293563405281624 / 1000.0;
    for (const double factor : {1.001, 0.999}) {
        const double h = factor * limit;
        const auto v = stepcert::check_run_stability(stiff_pair_with_jacobian(100 * h), stepcert::classic_rk4, h);
        EXPECT_EQ(v.stable, factor < 1.0) << v.basis;
        EXPECT_NEAR(v.margin, 1.0 / factor, 1e-9) << v.basis;
        EXPECT_NEAR(v.worst->lambda.real(), -1000.0, 1e-9);
        EXPECT_EQ(v.worst->lambda.imag(), 0.0);
        EXPECT_EQ(v.worst->amplification > 1.0, factor > 1.0);
        EXPECT_EQ(v.distinct_modes, 2U);
        EXPECT_THAT(v.basis, HasSubstr(factor > 1.0 ? "UNSTABLE" : "Stable"));
    }
}

TEST(StableStepLimit, CentralDifferenceJacobianGivesTheSameVerdictAndCountsItsEvaluations) {
    const double h = 0.999 * 2.785293563405281624 / 1000.0;
    const auto v = stepcert::check_run_stability(stiff_pair(100 * h), stepcert::classic_rk4, h);
    EXPECT_TRUE(v.stable);
    EXPECT_NEAR(v.margin, 1.0 / 0.999, 1e-7);
    EXPECT_NEAR(v.worst->lambda.real(), -1000.0, 1e-6);
    // 100 steps with stride 5 give 21 states, 17 of them sampled; 2n = 4 evaluations per Jacobian
    // plus the run's 4 per RK4 step.
    EXPECT_EQ(v.samples, 17U);
    EXPECT_EQ(v.rhs_evaluations, 17U * 4U + 100U * 4U);
    EXPECT_THAT(v.basis, HasSubstr("central-difference"));
}

TEST(StableStepLimit, ImplicitInHouseMethodHasNoLimitUpToTheCap) {
    const auto implicit = stepcert::one_step_method("linearly implicit Euler", 1, implicit_euler_step);
    const auto v = stepcert::check_linear_stability(stiff_pair(1.0), implicit, 0.5, std::vector<std::array<double, 2>>{{1.0, 0.0}},
                                                    std::vector<double>{0.0});
    EXPECT_TRUE(v.stable);
    EXPECT_FALSE(v.limit_found);
    EXPECT_TRUE(std::isinf(v.step_limit));
    EXPECT_TRUE(std::isinf(v.margin));
    EXPECT_THAT(v.basis, HasSubstr("no stability limit found up to 1000 h"));
}

TEST(ModesNotChecked, GrowingAndOscillatingModesAreCountedAndSkipped) {
    const auto mixed = stepcert::make_problem("mixed modes", mixed_rhs{}, std::array<double, 4>{1.0, 1.0, 0.0, 1.0}, 0.0, 1.0);
    const auto v = stepcert::check_run_stability(mixed, stepcert::classic_rk4, 0.1);
    EXPECT_EQ(v.samples, 11U);
    EXPECT_EQ(v.eigenvalues_checked, 11U);
    EXPECT_EQ(v.eigenvalues_skipped, 33U);
    EXPECT_EQ(v.distinct_modes, 1U);
    EXPECT_NEAR(v.worst->lambda.real(), -10.0, 1e-6);
    EXPECT_NEAR(v.margin, 2.785293563405281624 / 10.0 / 0.1, 1e-6);
    EXPECT_THAT(v.basis, HasSubstr("33 neutral or growing eigenvalues not checked"));

    const auto osc = stepcert::check_run_stability(sp::harmonic_oscillator(1.0, 10.0), stepcert::classic_rk4, 0.5);
    EXPECT_TRUE(osc.stable);
    EXPECT_FALSE(osc.worst.has_value());
    EXPECT_EQ(osc.eigenvalues_checked, 0U);
    EXPECT_EQ(osc.eigenvalues_skipped, 2 * osc.samples);
    EXPECT_EQ(osc.method_steps, 0U);
    EXPECT_THAT(osc.basis, HasSubstr("No decaying mode"));
}

TEST(Cost, NearEqualAndConjugateEigenvaluesAreMeasuredOnce) {
    // linear_system: eigenvalues -1 and -1/4 +/- 3i/2 at every sample, own Jacobian (no evaluations).
    const auto p = sp::linear_system(4.0);
    const auto v = stepcert::check_run_stability(p, stepcert::classic_rk4, 0.01);
    EXPECT_EQ(v.samples, 17U);
    EXPECT_EQ(v.eigenvalues_checked, 3U * 17U);
    EXPECT_EQ(v.distinct_modes, 2U);
    EXPECT_EQ(v.rhs_evaluations, 400U * 4U);  // the run only
    EXPECT_LT(v.method_steps, 400U);
}

TEST(BadInput, RejectedWithTypedErrors) {
    const auto p = sp::dahlquist(-50.0, 1.0);
    using state = std::array<double, 1>;
    const std::vector<state> one{{1.0}};
    const std::vector<double> t0{0.0};
    const auto& rk4 = stepcert::classic_rk4;
    for (const double h : {0.0, -0.01, std::numeric_limits<double>::quiet_NaN(), std::numeric_limits<double>::infinity()})
        EXPECT_THROW((void)stepcert::check_linear_stability(p, rk4, h, one, t0), stepcert::invalid_input) << h;
    EXPECT_THROW((void)stepcert::check_linear_stability(p, rk4, 0.01, std::vector<state>{}, std::vector<double>{}),
                 stepcert::invalid_input);
    EXPECT_THROW((void)stepcert::check_linear_stability(p, rk4, 0.01, one, std::vector<double>{0.0, 0.5}), stepcert::invalid_input);
    EXPECT_THROW((void)stepcert::check_linear_stability(p, rk4, 0.01, std::vector<std::vector<double>>{{1.0, 2.0}}, t0),
                 stepcert::invalid_input);
    stepcert::linear_stability_options bad;
    bad.neutral = -1.0;
    EXPECT_THROW((void)stepcert::check_linear_stability(p, rk4, 0.01, one, t0, bad), stepcert::invalid_input);
    bad = {};
    bad.max_factor = 0.5;
    EXPECT_THROW((void)stepcert::check_linear_stability(p, rk4, 0.01, one, t0, bad), stepcert::invalid_input);
    EXPECT_THROW((void)stepcert::amplification_factor(rk4, cplx(std::nan(""), 0.0)), stepcert::invalid_input);
    EXPECT_THROW((void)stepcert::check_run_stability(p, rk4, 0.03), stepcert::invalid_input);  // 1/0.03 not whole
    bad = {};
    bad.samples = 0;
    EXPECT_THROW((void)stepcert::check_run_stability(p, rk4, 0.01, bad), stepcert::invalid_input);
    try {
        (void)stepcert::check_linear_stability(p, rk4, -1.0, one, t0);
        ADD_FAILURE() << "a negative step was accepted";
    } catch (const stepcert::invalid_input& e) {
        EXPECT_THAT(e.what(), HasSubstr(p.name()));
    }
}

TEST(BadInput, NonFiniteStatesTimesAndJacobians) {
    const auto p = sp::dahlquist(-50.0, 1.0);
    const auto& rk4 = stepcert::classic_rk4;
    const double nan = std::numeric_limits<double>::quiet_NaN();
    EXPECT_THROW((void)stepcert::check_linear_stability(p, rk4, 0.01, std::vector<std::array<double, 1>>{{nan}}, std::vector<double>{0.0}),
                 stepcert::non_finite_value);
    EXPECT_THROW((void)stepcert::check_linear_stability(p, rk4, 0.01, std::vector<std::array<double, 1>>{{1.0}}, std::vector<double>{nan}),
                 stepcert::non_finite_value);
    const auto broken = stiff_pair(1.0).with_jacobian(symmetric_jacobian{nan, 1.0});
    EXPECT_THROW((void)stepcert::check_linear_stability(broken, rk4, 0.01, std::vector<std::array<double, 2>>{{1.0, 0.0}},
                                                        std::vector<double>{0.0}),
                 stepcert::non_finite_value);
    const auto nan_method = stepcert::one_step_method("NaN maker", 1, nan_step);
    EXPECT_THROW((void)stepcert::amplification_factor(nan_method, cplx(-1.0, 0.0)), stepcert::non_finite_value);
    // Explicit Euler at h = 0.1 on y' = -1000 y multiplies by -99 per step: the run overflows.
    try {
        (void)stepcert::check_run_stability(sp::dahlquist(-1000.0, 100.0), stepcert::explicit_euler, 0.1);
        ADD_FAILURE() << "no exception";
    } catch (const stepcert::non_finite_value& e) {
        EXPECT_THAT(e.what(), HasSubstr("instability"));
    }
}

TEST(BadInput, MultistepAndAdaptiveMethodsAndBudgets) {
    const auto p = sp::dahlquist(-50.0, 1.0);
    const std::vector<std::array<double, 1>> one{{1.0}};
    const std::vector<double> t0{0.0};
    EXPECT_THROW((void)stepcert::amplification_factor(stepcert::adams_bashforth_moulton<4>, cplx(-1.0, 0.0)),
                 stepcert::unsupported_operation);
    EXPECT_THROW((void)stepcert::amplification_factor(stepcert::dormand_prince54_adaptive, cplx(-1.0, 0.0)),
                 stepcert::unsupported_operation);
    EXPECT_THROW((void)stepcert::check_linear_stability(p, stepcert::adams_bashforth_moulton<4>, 0.01, one, t0),
                 stepcert::unsupported_operation);
    EXPECT_THROW((void)stepcert::check_run_stability(p, stepcert::dormand_prince54_adaptive, 0.01), stepcert::unsupported_operation);
    stepcert::linear_stability_options tight;
    tight.max_method_steps = 3;
    EXPECT_THROW((void)stepcert::check_linear_stability(p, stepcert::classic_rk4, 0.01, one, t0, tight), stepcert::budget_exhausted);
}

// A method-of-lines system: the busbar's 60-cell second-difference matrix has its largest
// eigenvalue magnitude 4 (n + 1)^2 cos^2(pi / (2 (n + 1))) (common practice, no source), so RK4's
// step limit is 2.785293563405281624 over it (shared reference values §6). The Jacobian comes
// from central differences (the problem gives none). Beyond max_dimension unknowns the dense
// eigenvalue computation is refused with a typed error instead of running out of memory.
TEST(StableStepLimit, MethodOfLinesSystemAndTheDimensionLimit) {
    const std::size_t cells = 60;  // 16 dense eigenvalue problems of this size: quick even at -O0
    const double pi = 3.14159265358979323846;  // common practice, no source
    const double n1 = static_cast<double>(cells + 1);
    const double largest = 4.0 * n1 * n1 * std::pow(std::cos(pi / (2.0 * n1)), 2);
    const double limit = 2.785293563405281624 / largest;
    const auto p = sp::busbar_cooling(cells, 20 * 0.5 * limit);
    const auto v = stepcert::check_run_stability(p, stepcert::classic_rk4, 0.5 * limit);
    EXPECT_TRUE(v.stable) << v.basis;
    ASSERT_TRUE(v.limit_found) << v.basis;
    EXPECT_NEAR(v.step_limit / limit, 1.0, 1e-6) << v.basis;
    stepcert::linear_stability_options small;
    small.max_dimension = 50;
    try {
        (void)stepcert::check_run_stability(p, stepcert::classic_rk4, 0.5 * limit, small);
        ADD_FAILURE() << "a 60-unknown Jacobian passed a limit of 50";
    } catch (const stepcert::unsupported_operation& e) {
        EXPECT_THAT(std::string(e.what()), HasSubstr("max_dimension"));
    }
}

} // namespace test_stability_check
