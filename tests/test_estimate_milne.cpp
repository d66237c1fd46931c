// Milne's device for Adams–Bashforth–Moulton PECE (milne_local_error_profile) against the true
// multistep local error (true_multistep_local_error_profile): the error constants, the run
// against Boost.Odeint's, effectivity in double and float128, the principal error function, and
// the typed errors. Problems with exact solutions: Kepler e = 0.5 (DETEST class D, Hull et al.,
// SIAM J. Numer. Anal. 9 (1972)) and the linear 3x3 system (exact by its eigen-decomposition).
#include <algorithm>
#include <array>
#include <cmath>
#include <concepts>
#include <cstddef>
#include <iostream>
#include <limits>
#include <sstream>
#include <string>
#include <type_traits>
#include <vector>

#include <gtest/gtest.h>

#include <boost/multiprecision/cpp_int.hpp>
#include <boost/numeric/odeint/integrate/integrate_n_steps.hpp>

#include "stepcert/estimate/effectivity.hpp"
#include "stepcert/estimate/milne_device.hpp"
#include "stepcert/estimate/milne_monitor.hpp"
#include "stepcert/estimate/true_multistep_local_error.hpp"
#include "stepcert/methods/adams_bashforth_moulton.hpp"
#include "stepcert/methods/classic_rk4.hpp"
#include "stepcert/problems/kepler.hpp"
#include "stepcert/problems/linear_system.hpp"
#include "stepcert/reference/multiprecision_types.hpp"
#include "stepcert/run/run.hpp"

namespace {
using boost::multiprecision::cpp_rational;
namespace odeint = boost::numeric::odeint;

const auto milne_kepler = stepcert::problems::kepler(0.5, 20.0);
const auto milne_linear = stepcert::problems::linear_system(4.0);

// ---- The refusal of other methods, at compile time -------------------------------------------

// A one-step method reaches only the refusing overload (its body's static_assert names the
// estimators to use instead); its result is not a profile, which a requires-expression can see.
template <class P, class M>
concept milne_accepts = requires(const P& p, const M& m, std::size_t n) {
    { stepcert::milne_local_error_profile(p, m, n) } -> std::same_as<stepcert::local_error_profile>;
};
static_assert(milne_accepts<decltype(milne_kepler), decltype(stepcert::adams_bashforth_moulton<4>)>);
static_assert(milne_accepts<decltype(milne_kepler), decltype(stepcert::adams_bashforth_moulton<1>)>);
static_assert(!milne_accepts<decltype(milne_kepler), decltype(stepcert::classic_rk4)>);
static_assert(stepcert::adams_predictor_corrector<decltype(stepcert::adams_bashforth_moulton<8>)>);
static_assert(!stepcert::adams_predictor_corrector<decltype(stepcert::classic_rk4)>);

// ---- Error constants ---------------------------------------------------------------------------

cpp_rational quoted_milne_factor(std::size_t steps) {
    const auto c = stepcert::detail::adams_pece_error_constants<cpp_rational>(steps);
    return c.corrector / (c.predictor - c.corrector);
}

TEST(MilneDeviceConstants, FactorIsTheOneCommonlyQuoted) {
    // Milne's device for the 4th-order ABM pair: y(t+h) - y_c ~ -19/270 (y_c - y_p); for the
    // 2nd-order pair (AB2, trapezoidal rule) -1/6 (Hairer, Nørsett, Wanner, Solving ODEs I,
    // §III.1 — from memory). Euler / backward Euler: C = 1/2, C* = -1/2, so -1/2 (derived).
    EXPECT_EQ(quoted_milne_factor(4), cpp_rational(-19, 270));
    EXPECT_EQ(quoted_milne_factor(2), cpp_rational(-1, 6));
    EXPECT_EQ(quoted_milne_factor(1), cpp_rational(-1, 2));
    // stepcert records computed - exact: the opposite sign.
    EXPECT_EQ(stepcert::detail::milne_device_factor<cpp_rational>(4), cpp_rational(19, 270));
    EXPECT_EQ(stepcert::detail::milne_device_factor<cpp_rational>(2), cpp_rational(1, 6));
}

// Residual of y(h) - y(0) - h sum w_i y'(s_i h) for y = t^q / q!: zero for q <= p (order p), and
// the error constant at q = p + 1 (derived: Taylor expansion, common practice, no source).
cpp_rational residual(const std::vector<cpp_rational>& w, const std::vector<int>& s, int q) {
    cpp_rational factorial = 1;
    for (int k = 2; k <= q; ++k) factorial *= k;
    cpp_rational sum = 0;
    for (std::size_t i = 0; i < w.size(); ++i) {
        cpp_rational power = 1;
        for (int k = 0; k < q - 1; ++k) power *= s[i];
        sum += w[i] * power;
    }
    return 1 / factorial - sum * q / factorial;  // y'(s) = s^(q-1) / (q-1)! = q s^(q-1) / q!
}

template <std::size_t Steps>
void expect_constants_from_odeint_tables() {
    // Predictor weights b_i at nodes 0, -1, ..., 1-Steps; corrector c_0 at 1, c_i at 1-i (odeint's
    // buffers hold f_n, f_(n-1), ... newest first). Exact rationals from odeint's own tables.
    const odeint::detail::adams_bashforth_coefficients<cpp_rational, Steps> b;
    const odeint::detail::adams_moulton_coefficients<cpp_rational, Steps> c;
    std::vector<cpp_rational> wb(b.begin(), b.end()), wc(c.begin(), c.end());
    std::vector<int> sb, sc;
    for (int i = 0; i < static_cast<int>(Steps); ++i) {
        sb.push_back(-i);
        sc.push_back(1 - i);
    }
    const int p = static_cast<int>(Steps);
    for (int q = 1; q <= p; ++q) {
        EXPECT_EQ(residual(wb, sb, q), 0) << "AB" << Steps << " q = " << q;
        EXPECT_EQ(residual(wc, sc, q), 0) << "AM" << Steps << " q = " << q;
    }
    const auto k = stepcert::detail::adams_pece_error_constants<cpp_rational>(Steps);
    EXPECT_EQ(residual(wb, sb, p + 1), k.predictor) << "Steps = " << Steps;
    EXPECT_EQ(residual(wc, sc, p + 1), k.corrector) << "Steps = " << Steps;
}

TEST(MilneDeviceConstants, ErrorConstantsMatchOdeintsCoefficientTables) {
    // The gamma_k, gamma*_k stored in adams_pece.hpp (recalled from Hairer, Nørsett, Wanner I,
    // §III.1) against the error constants derived from the coefficients odeint actually uses.
    expect_constants_from_odeint_tables<1>();
    expect_constants_from_odeint_tables<2>();
    expect_constants_from_odeint_tables<3>();
    expect_constants_from_odeint_tables<4>();
    expect_constants_from_odeint_tables<5>();
    expect_constants_from_odeint_tables<6>();
    expect_constants_from_odeint_tables<7>();
    expect_constants_from_odeint_tables<8>();
}

// ---- The PECE run against Boost.Odeint ----------------------------------------------------------

template <std::size_t Steps>
void expect_same_run_as_odeint(std::size_t n) {
    // Outside reference: Boost.Odeint's adams_bashforth_moulton<Steps> (through run_uniform),
    // start-up by RK4 (Steps <= 4) or Fehlberg 7(8) (Steps = 5). Measured in double: identical
    // (0 eps) for Steps = 2, 4, 5; the tolerance leaves room for other compilers' contractions.
    const auto m = stepcert::adams_bashforth_moulton<Steps>;
    const auto run = stepcert::run_uniform(milne_kepler, m, n, 1);
    using S = std::decay_t<decltype(run.states[0])>;
    S y = stepcert::convert_state<S>(milne_kepler.y0());
    const double h = (milne_kepler.t1() - milne_kepler.t0()) / static_cast<double>(n);
    std::size_t evaluations = 0;
    const auto f = milne_kepler.rhs();
    auto counted = [&](const S& x, S& d, double t) {
        ++evaluations;
        f(x, d, t);
    };
    std::size_t j = Steps - 1, visits = 0;
    double worst = 0.0;
    stepcert::detail::adams_pece_run<Steps>(counted, y, milne_kepler.t0(), h, n, [&](double t, const S&, const S& corrected) {
        EXPECT_DOUBLE_EQ(t, run.times[j]);
        for (std::size_t i = 0; i < corrected.size(); ++i) worst = std::max(worst, std::abs(corrected[i] - run.states[j + 1][i]));
        ++j;
        ++visits;
    });
    EXPECT_EQ(visits, n - Steps + 1);
    const double eps = std::numeric_limits<double>::epsilon();
    EXPECT_LE(worst, 4 * eps * static_cast<double>(n)) << "Steps = " << Steps << ": " << worst / eps << " eps";
    EXPECT_EQ(evaluations, run.stats.evaluations) << "Steps = " << Steps;
    std::cout << "[ measured ] PECE run vs odeint, Steps = " << Steps << ", n = " << n
              << ": largest difference " << worst / eps << " eps\n";
}

TEST(MilnePeceRun, ReproducesOdeintsAdamsBashforthMoulton) {
    expect_same_run_as_odeint<2>(200);
    expect_same_run_as_odeint<4>(200);
    expect_same_run_as_odeint<5>(200);
}

template <std::size_t Steps>
void expect_monitor_matches_profile_and_odeint(std::size_t n) {
    // Inside odeint's own integrate_n_steps, the monitor takes odeint's adams_bashforth_moulton
    // steps bit for bit (it wraps this very stepper: a check of the monitor, not of the method)
    // and records what milne_local_error_profile records for the same run.
    using S = std::array<double, 4>;
    const double h = 20.0 / static_cast<double>(n);
    stepcert::local_error_profile log;
    stepcert::adams_milne_monitor<Steps, S> monitor(log);
    S y = milne_kepler.y0(), plain = y;
    odeint::integrate_n_steps(monitor, milne_kepler.rhs(), y, 0.0, h, n);
    odeint::integrate_n_steps(stepcert::odeint_stepper::adams_bashforth_moulton<Steps, S>(), milne_kepler.rhs(), plain, 0.0, h, n);
    EXPECT_EQ(y, plain) << "Steps = " << Steps;
    const auto profile = stepcert::milne_local_error_profile(milne_kepler, stepcert::adams_bashforth_moulton<Steps>, n);
    ASSERT_EQ(log.steps.size(), profile.steps.size());
    EXPECT_EQ(log.power, profile.power);
    EXPECT_EQ(log.estimator, stepcert::local_error_estimator::milne_device);
    for (std::size_t j = 0; j < log.steps.size(); ++j) {
        EXPECT_NEAR(log.steps[j].t, profile.steps[j].t, 1e-12);
        EXPECT_EQ(log.steps[j].estimate, profile.steps[j].estimate) << "step " << j;
    }
}

TEST(MilneMonitor, InsideOdeintsIntegrateFunctionsSameStepsAndRecords) {
    expect_monitor_matches_profile_and_odeint<2>(400);
    expect_monitor_matches_profile_and_odeint<4>(400);
    expect_monitor_matches_profile_and_odeint<5>(400);
    // A changed step is refused (fixed Adams coefficients), not silently mis-stepped.
    using S = std::array<double, 4>;
    stepcert::local_error_profile log;
    stepcert::adams_milne_monitor<4, S> monitor(log);
    S y = milne_kepler.y0();
    monitor.do_step(milne_kepler.rhs(), y, 0.0, 0.01);
    EXPECT_THROW(monitor.do_step(milne_kepler.rhs(), y, 0.01, 0.02), stepcert::invalid_input);
    EXPECT_THROW((stepcert::adams_milne_monitor<4, S>(log, stepcert::weighted_norm{0.0, 0.0})), stepcert::invalid_input);
}

// ---- Effectivity --------------------------------------------------------------------------------

// One reference per problem, shared by every n dividing its grid and by both scalar types.
const auto& kepler_reference() {
    static const auto r = stepcert::reference_solution(milne_kepler, 24, stepcert::uniform_times{2000});
    return r;
}
const auto& linear_reference() {
    static const auto r = stepcert::reference_solution(milne_linear, 24, stepcert::uniform_times{800});
    return r;
}

template <class T, std::size_t Steps, class P, class R>
stepcert::effectivity_summary milne_effectivity(const P& p, std::size_t n, const R& reference, const char* label) {
    const auto m = stepcert::adams_bashforth_moulton<Steps>;
    const auto estimate = stepcert::milne_local_error_profile<T>(p, m, n);
    const auto truth = stepcert::true_multistep_local_error_profile<T>(p, m, n, reference);
    EXPECT_EQ(estimate.steps.size(), n - Steps + 1);
    EXPECT_EQ(estimate.power, static_cast<int>(Steps) + 1);
    EXPECT_EQ(estimate.estimator, stepcert::local_error_estimator::milne_device);
    const auto e = stepcert::effectivity(estimate, truth);
    std::ostringstream os;
    os << e.smallest << " / " << e.median << " / " << e.largest << " (" << e.counted << " steps)";
    ::testing::Test::RecordProperty(std::string("effectivity ") + label, os.str());
    std::cout << "[ measured ] Milne effectivity " << label << " (smallest / median / largest): " << os.str() << "\n";
    return e;
}

template <class T>
class MilneEffectivity : public ::testing::Test {};
#if defined(STEPCERT_HAVE_FLOAT128)
using Scalars = ::testing::Types<double, stepcert::float128>;
#else
using Scalars = ::testing::Types<double>;  // Clang: no float128
#endif
TYPED_TEST_SUITE(MilneEffectivity, Scalars);

TYPED_TEST(MilneEffectivity, NearOneInTheAsymptoticRange) {
    // Milne's device (Hairer, Nørsett, Wanner I, §III.1 — from memory): the PECE value differs
    // from the implicit corrector's by h c_0 df/dy (y_p - y(t+h)) = O(h^(p+2)), so the effectivity
    // is 1 + O(h ||df/dy||) (derived; see milne_device.hpp). Asymptotic from h = 0.01 (Kepler
    // n = 2000, linear n = 400): at half these n, Kepler ABM2 reached 0.67 .. 1.51, ABM4 0.76 ..
    // 1.33, linear ABM4 0.80 .. 1.30 (measured in double). Acceptance: every multistep step in
    // [0.8, 1.25], median within 5% of 1. Measured (smallest / median / largest), double and
    // float128 alike to the digits shown: Kepler ABM2 0.826 / 0.999 / 1.209, ABM4 0.860 / 1.003 /
    // 1.169; linear ABM2 0.902 / 0.995 / 1.082, ABM4 0.894 / 0.980 / 1.158.
    using T = TypeParam;
    const bool quad = !std::is_same_v<T, double>;
    for (const auto& e : {milne_effectivity<T, 2>(milne_kepler, 2000, kepler_reference(), quad ? "Kepler ABM2 float128" : "Kepler ABM2 double"),
                          milne_effectivity<T, 4>(milne_kepler, 2000, kepler_reference(), quad ? "Kepler ABM4 float128" : "Kepler ABM4 double"),
                          milne_effectivity<T, 2>(milne_linear, 400, linear_reference(), quad ? "linear ABM2 float128" : "linear ABM2 double"),
                          milne_effectivity<T, 4>(milne_linear, 400, linear_reference(), quad ? "linear ABM4 float128" : "linear ABM4 double")}) {
        EXPECT_TRUE(e.within(0.8, 1.25)) << e.smallest << " .. " << e.largest;
        EXPECT_EQ(e.counted, e.per_step.size());
        EXPECT_NEAR(e.median, 1.0, 0.05);
    }
}

TEST(MilneEffectivityRate, DeviationFromOneHalvesWithH) {
    // The O(h) term above (derived): halving h should about halve the largest |effectivity - 1|.
    // Measured on the linear system, n = 400 -> 800: ABM2 0.098 -> 0.052, ABM4 0.158 -> 0.080.
    auto deviation = [](const stepcert::effectivity_summary& e) { return std::max(1.0 - e.smallest, e.largest - 1.0); };
    const double d2 = deviation(milne_effectivity<double, 2>(milne_linear, 400, linear_reference(), "linear ABM2 double"));
    const double d2h = deviation(milne_effectivity<double, 2>(milne_linear, 800, linear_reference(), "linear ABM2 double, n = 800"));
    const double d4 = deviation(milne_effectivity<double, 4>(milne_linear, 400, linear_reference(), "linear ABM4 double"));
    const double d4h = deviation(milne_effectivity<double, 4>(milne_linear, 800, linear_reference(), "linear ABM4 double, n = 800"));
    EXPECT_GT(d2h, 0.35 * d2);
    EXPECT_LT(d2h, 0.65 * d2);
    EXPECT_GT(d4h, 0.35 * d4);
    EXPECT_LT(d4h, 0.65 * d4);
}

TEST(MilneDevice, SignAgreesWithTheTrueLocalError) {
    // Both are computed - exact: the vectors point the same way (positive inner product) at every
    // step, which fixes the sign of the factor (+19/270 here, -19/270 for exact - computed).
    stepcert::local_error_options keep;
    keep.keep_vectors = true;
    for (const std::size_t steps : {2u, 4u}) {
        const auto estimate = steps == 2 ? stepcert::milne_local_error_profile(milne_linear, stepcert::adams_bashforth_moulton<2>, 400, keep)
                                         : stepcert::milne_local_error_profile(milne_linear, stepcert::adams_bashforth_moulton<4>, 400, keep);
        const auto truth = steps == 2
                               ? stepcert::true_multistep_local_error_profile(milne_linear, stepcert::adams_bashforth_moulton<2>, 400, linear_reference(), keep)
                               : stepcert::true_multistep_local_error_profile(milne_linear, stepcert::adams_bashforth_moulton<4>, 400, linear_reference(), keep);
        ASSERT_EQ(estimate.vectors.size(), truth.vectors.size());
        ASSERT_EQ(estimate.vectors.size(), 401 - steps);
        std::size_t agreeing = 0;
        for (std::size_t j = 0; j < truth.vectors.size(); ++j) {
            double dot = 0.0;
            for (std::size_t i = 0; i < truth.vectors[j].size(); ++i) dot += estimate.vectors[j][i] * truth.vectors[j][i];
            agreeing += dot > 0.0 ? 1 : 0;
        }
        EXPECT_EQ(agreeing, truth.vectors.size()) << "Steps = " << steps;
    }
}

TEST(MilneDevice, CostsWhatTheRunCosts) {
    // y_p is a by-product of each PECE step: the profile costs exactly the method's run
    // (odeint's count through run_uniform): (Steps - 1) start-up steps, then 2 per step.
    const std::size_t n = 100;
    const auto p4 = stepcert::milne_local_error_profile(milne_kepler, stepcert::adams_bashforth_moulton<4>, n);
    EXPECT_EQ(p4.cost.evaluations, stepcert::run_uniform(milne_kepler, stepcert::adams_bashforth_moulton<4>, n).stats.evaluations);
    EXPECT_EQ(p4.cost.evaluations, 3u * 4u + 2u * (n - 3u));
    EXPECT_EQ(p4.cost.steps, n);
    const auto p6 = stepcert::milne_local_error_profile(milne_kepler, stepcert::adams_bashforth_moulton<6>, n);
    EXPECT_EQ(p6.cost.evaluations, stepcert::run_uniform(milne_kepler, stepcert::adams_bashforth_moulton<6>, n).stats.evaluations);
    EXPECT_EQ(p6.steps.size(), n - 5u);
    // The first record is the first multistep step, from t_(Steps-1).
    EXPECT_DOUBLE_EQ(p4.steps.front().t, 3 * 20.0 / n);
    EXPECT_DOUBLE_EQ(p4.steps.back().t, 20.0 - 20.0 / n);
}

TEST(MilneDevice, PrincipalErrorFunctionIndependentOfH) {
    // In the asymptotic range estimate / h^(p+1) is a smooth function of t alone (common practice,
    // no source), up to the O(h) relative term of the PECE correction (see the effectivity test).
    // ABM4 on Kepler, n = 2000 against 4000, at the coarse grid's times: measured largest relative
    // difference 0.067 (median 0.013); the largest estimate falls by 2^5 = 32 (measured 31.95).
    const auto coarse = stepcert::milne_local_error_profile(milne_kepler, stepcert::adams_bashforth_moulton<4>, 2000);
    const auto fine = stepcert::milne_local_error_profile(milne_kepler, stepcert::adams_bashforth_moulton<4>, 4000);
    std::vector<double> rel;
    for (std::size_t i = 0; i < coarse.steps.size(); ++i) {
        const std::size_t j = i + 3;        // the coarse record i starts at t_j
        const std::size_t fi = 2 * j - 3;   // the fine record starting at t_(2j)
        ASSERT_NEAR(fine.steps[fi].t, coarse.steps[i].t, 1e-12);
        rel.push_back(std::abs(coarse.steps[i].principal / fine.steps[fi].principal - 1.0));
    }
    std::sort(rel.begin(), rel.end());
    std::cout << "[ measured ] principal error function, ABM4 Kepler n = 2000 vs 4000: largest relative difference "
              << rel.back() << ", median " << rel[rel.size() / 2] << ", largest estimates' ratio "
              << coarse.largest() / fine.largest() << "\n";
    EXPECT_LT(rel.back(), 0.1);
    EXPECT_LT(rel[rel.size() / 2], 0.03);
    EXPECT_NEAR(coarse.largest() / fine.largest(), 32.0, 32.0 * 0.1);
}

// ---- Bad input ------------------------------------------------------------------------------------

TEST(MilneInput, FewerStepsThanTheMethodNeedsIsInvalid) {
    try {
        (void)stepcert::milne_local_error_profile(milne_linear, stepcert::adams_bashforth_moulton<4>, 3);
        FAIL() << "expected invalid_input";
    } catch (const stepcert::invalid_input& e) {
        EXPECT_NE(std::string(e.what()).find("at least 4 steps"), std::string::npos) << e.what();
    }
    EXPECT_THROW((void)stepcert::milne_local_error_profile(milne_linear, stepcert::adams_bashforth_moulton<1>, 0), stepcert::invalid_input);
}

TEST(MilneInput, TruthWithFewerStepsThanTheMethodNeedsIsInvalid) {
    EXPECT_THROW((void)stepcert::true_multistep_local_error_profile(milne_linear, stepcert::adams_bashforth_moulton<4>, 2, 20),
                 stepcert::invalid_input);
}

TEST(MilneInput, TruthOnAReferenceOfAnotherGridIsInvalid) {
    EXPECT_THROW((void)stepcert::true_multistep_local_error_profile(milne_linear, stepcert::adams_bashforth_moulton<2>, 300, linear_reference()),
                 stepcert::invalid_input);
}

// A right-hand side that returns NaN from time `after` on: never a small error.
auto nan_problem(double after) {
    auto f = [after](const auto& y, auto& d, auto t) {
        d[0] = t > after ? std::numeric_limits<double>::quiet_NaN() : -static_cast<double>(y[0]);
    };
    return stepcert::make_problem("NaN after " + std::to_string(after), f, std::vector<double>{1.0}, 0.0, 1.0);
}

TEST(MilneInput, NonFiniteRightHandSideInTheMultistepStepsIsRefused) {
    try {
        (void)stepcert::milne_local_error_profile(nan_problem(0.5), stepcert::adams_bashforth_moulton<4>, 20);
        FAIL() << "expected non_finite_value";
    } catch (const stepcert::non_finite_value& e) {
        EXPECT_NE(std::string(e.what()).find("NaN"), std::string::npos) << e.what();
    }
}

TEST(MilneInput, NonFiniteRightHandSideInTheStartUpIsRefused) {
    // NaN from the second start-up step on: it reaches the history, so the first record is NaN.
    EXPECT_THROW((void)stepcert::milne_local_error_profile(nan_problem(0.04), stepcert::adams_bashforth_moulton<4>, 20),
                 stepcert::non_finite_value);
}

TEST(MilneInput, EvaluationBudgetBoundsTheRun) {
    stepcert::local_error_options small_budget;
    small_budget.max_evaluations = 100;
    EXPECT_THROW((void)stepcert::milne_local_error_profile(milne_linear, stepcert::adams_bashforth_moulton<4>, 100, small_budget),
                 stepcert::budget_exhausted);
    EXPECT_THROW((void)stepcert::true_multistep_local_error_profile(milne_linear, stepcert::adams_bashforth_moulton<4>, 400, linear_reference(),
                                                                    small_budget),
                 stepcert::budget_exhausted);
}

} // namespace
