// Step certification of fixed-step methods: certify (the largest step for a tolerance),
// certify_step_count (a given step), check_certificate (a stored certificate after a change).
// Ground truth: exact solutions and stepcert's multiprecision reference; the stability limits
// are published values (../shared/reference-values.md).
#include <array>
#include <cmath>
#include <cstddef>
#include <limits>
#include <string>
#include <vector>

#include <gtest/gtest.h>

#include "test_certify_support.hpp"

#include "stepcert/certify/check_certificate.hpp"
#include "stepcert/certify/certify_fixed_step.hpp"
#include "stepcert/certify/certify_step_count.hpp"
#include "stepcert/core/error.hpp"
#include "stepcert/methods/classic_rk4.hpp"
#include "stepcert/methods/dormand_prince54.hpp"
#include "stepcert/methods/explicit_midpoint.hpp"
#include "stepcert/problems/dahlquist.hpp"
#include "stepcert/problems/kepler.hpp"
#include "stepcert/problems/prothero_robinson.hpp"
#include "stepcert/problems/suspension_rig.hpp"
#include "stepcert/run/run.hpp"

namespace test_certify_fixed_step {

using stepcert::evidence_level;
using stepcert::refusal;

stepcert::weighted_norm absolute(double atol) { return {atol, 0.0, stepcert::norm_kind::max}; }

/// Largest error over the grid of G points of the run with n steps, against the exact solution.
template <class P, class M>
double exact_error(const P& p, const M& m, std::size_t n, std::size_t G, const stepcert::weighted_norm& tol) {
    const auto run = stepcert::run_uniform(p, m, n, n / G);
    double worst = 0.0;
    auto y = p.y0();
    for (std::size_t j = 1; j < run.states.size(); ++j) {
        p.exact()(run.times[j], y);
        worst = std::max(worst, tol(run.states[j], y));
    }
    return worst;
}

/// The smallest multiple of G whose run meets the tolerance, by bisection (errors fall with n in
/// the asymptotic range, which holds on the bracket used here).
template <class P, class M>
std::size_t fewest_steps_meeting(const P& p, const M& m, std::size_t G, const stepcert::weighted_norm& tol,
                                 std::size_t lo, std::size_t hi) {
    while (hi - lo > G) {
        const std::size_t mid = (lo + hi) / 2 / G * G;
        if (mid <= lo) break;
        (exact_error(p, m, mid, G, tol) <= 1.0 ? hi : lo) = mid;
    }
    return hi;
}

} // namespace test_certify_fixed_step

using namespace test_certify_fixed_step;

// Kepler e = 0.5 has an exact solution (Kepler's equation); RK4 is of order 4 (Kutta 1901;
// common practice, no source). The Richardson step must meet the tolerance against it and be at
// least half the largest uniform step that truly meets it (issue 5's sharpness criterion); with
// the reference at hand the certification then coarsens to the step the truth allows.
TEST(CertifyFixedStep, KeplerRK4IsReferenceVerifiedAndSharp) {
    const auto p = stepcert::problems::kepler(0.5, 20.0);
    const auto tol = absolute(1e-6);
    stepcert::certify_options richardson_only;
    richardson_only.coarsen_with_reference = false;
    const auto c = stepcert::certify(p, stepcert::classic_rk4, tol, richardson_only);
    ASSERT_TRUE(c.issued()) << c.reason_detail;
    EXPECT_EQ(c.level, evidence_level::reference_verified);
    EXPECT_EQ(c.steps % 8, 0u);
    EXPECT_LE(c.reference_error, 1.0);
    EXPECT_LE(c.error_band, 0.9);
    EXPECT_NEAR(c.observed_order, 4.0, 0.35);
    EXPECT_TRUE(c.stability.checked && c.stability.stable);
    const double truth = exact_error(p, stepcert::classic_rk4, c.steps, 8, tol);
    EXPECT_NEAR(truth, c.reference_error, 1e-6);  // exact solution in double here, in 50 digits there
    EXPECT_LE(truth, 1.0);
    const std::size_t fewest = fewest_steps_meeting(p, stepcert::classic_rk4, 8, tol, 8, c.steps);
    const double sharpness = static_cast<double>(fewest) / static_cast<double>(c.steps);
    std::printf("Kepler RK4 1e-6: Richardson N = %zu, fewest meeting N = %zu, h ratio %.3f, evaluations %zu\n%s\n", c.steps,
                fewest, sharpness, c.evaluations, c.basis.c_str());
    EXPECT_GE(sharpness, 0.5);
    const auto coarsened = stepcert::certify(p, stepcert::classic_rk4, tol);
    ASSERT_TRUE(coarsened.issued());
    EXPECT_EQ(coarsened.level, evidence_level::reference_verified);
    EXPECT_LE(coarsened.steps, c.steps);
    EXPECT_GE(coarsened.steps, fewest);
    EXPECT_LE(exact_error(p, stepcert::classic_rk4, coarsened.steps, 8, tol), 1.0);
    EXPECT_NE(coarsened.basis.find("coarsened"), std::string::npos);
}

// Between the asymptotic range and the round-off floor: 1e-14 absolute is above eps |y0| (so
// the quick check lets it through) but below what a double run of Kepler reaches (the error
// wanders between 2e-13 and 6e-12 below h = 1.2e-4; ../shared/reference-values.md §12,
// measured with Boost 1.81): the differences hit the floor and the certification refuses.
TEST(CertifyRefusal, ToleranceInsideTheRoundOffPlateau) {
    const auto p = stepcert::problems::kepler(0.5, 20.0);
    const auto c = stepcert::certify(p, stepcert::classic_rk4, absolute(1e-14));
    EXPECT_FALSE(c.issued());
    EXPECT_EQ(c.reason, refusal::below_round_off_floor) << c.reason_detail;
}

// Without the reference, the level is "estimated"; checked here against the exact solution.
TEST(CertifyFixedStep, EstimatedLevelMeetsTheToleranceAgainstTheExactSolution) {
    const auto p = stepcert::problems::kepler(0.5, 20.0);
    stepcert::certify_options opt;
    opt.verify_with_reference = false;
    for (double atol : {1e-4, 1e-7}) {
        const auto tol = absolute(atol);
        for (const auto& c : {stepcert::certify(p, stepcert::classic_rk4, tol, opt),
                              stepcert::certify(p, stepcert::explicit_midpoint, tol, opt)}) {
            ASSERT_TRUE(c.issued()) << c.method << " " << atol << ": " << c.reason_detail;
            EXPECT_EQ(c.level, evidence_level::estimated);
            EXPECT_TRUE(std::isnan(c.reference_error));
            const double truth = c.method == "classic RK4" ? exact_error(p, stepcert::classic_rk4, c.steps, 8, tol)
                                                           : exact_error(p, stepcert::explicit_midpoint, c.steps, 8, tol);
            EXPECT_LE(truth, 1.0) << c.method << " " << atol;
        }
    }
}

// Measured at t1 only, the certified step may be larger than when every output time counts
// (never smaller: t1 is one of the output times).
// y' = -40 y on [0, 1] (exact solution e^(-40 t)) with Dormand-Prince 5 at 1e-3: the 5th order
// (Dormand and Prince 1980; common practice, no source) only shows from about 200 steps, while
// about 32 meet the tolerance. Below the asymptotic range a run is judged by its difference from
// the Richardson-certified finer run plus that run's band (triangle inequality), which reaches a
// sharp step; the search itself spends at most 3 production runs of the finest run it needed.
// certify_step_count re-judges the coarse step the same way, and refuses a step that misses.
TEST(CertifyFixedStep, CoarserRunBeforeTheAsymptoticRangeIsJudgedByItsDifference) {
    const auto p = stepcert::problems::dahlquist(-40.0, 1.0);
    const auto& m = stepcert::dormand_prince54;
    const stepcert::weighted_norm tol{1e-3, 1e-3, stepcert::norm_kind::max};
    stepcert::certify_options opt;
    opt.verify_with_reference = false;
    const auto c = stepcert::certify(p, m, tol, opt);
    ASSERT_TRUE(c.issued()) << c.reason_detail;
    EXPECT_EQ(c.level, evidence_level::estimated);
    EXPECT_NE(c.basis.find("difference"), std::string::npos) << c.basis;
    EXPECT_LE(exact_error(p, m, c.steps, 8, tol), 1.0);
    EXPECT_LE(c.error_band, 0.9);
    EXPECT_TRUE(c.stability.checked && c.stability.stable);
    const std::size_t fewest = fewest_steps_meeting(p, m, 8, tol, 8, c.steps);
    EXPECT_GE(static_cast<double>(fewest) / static_cast<double>(c.steps), 0.5) << "N = " << c.steps << ", fewest " << fewest;
    const std::size_t finest = test_certify_support::finest_run_of_evidence(c);
    EXPECT_GT(finest, 2 * c.steps) << c.basis;
    EXPECT_LE(c.evaluations, 3 * stepcert::run_uniform(p, m, finest).stats.evaluations);

    const auto again = stepcert::certify_step_count(p, m, c.steps, tol, opt);
    ASSERT_TRUE(again.issued()) << again.reason_detail;
    EXPECT_EQ(again.level, evidence_level::estimated);
    EXPECT_NE(again.basis.find("difference"), std::string::npos) << again.basis;
    ASSERT_GT(fewest, 8u);
    const std::size_t missing = fewest - 8;
    ASSERT_GT(exact_error(p, m, missing, 8, tol), 1.0);
    const auto short_step = stepcert::certify_step_count(p, m, missing, tol, opt);
    EXPECT_FALSE(short_step.issued());
    EXPECT_EQ(short_step.reason, refusal::tolerance_not_met) << short_step.reason_detail;
}

TEST(CertifyFixedStep, FinalTimeOnlyNeverNeedsMoreSteps) {
    const auto p = stepcert::problems::kepler(0.5, 20.0);
    stepcert::certify_options every, final_only;
    final_only.measured_at = stepcert::error_measured_at::final_time;
    const auto a = stepcert::certify(p, stepcert::classic_rk4, absolute(1e-6), every);
    const auto b = stepcert::certify(p, stepcert::classic_rk4, absolute(1e-6), final_only);
    ASSERT_TRUE(a.issued() && b.issued());
    EXPECT_LE(b.steps, a.steps + 8);
}

// A problem without a closed form: the suspension rig against stepcert's multiprecision reference.
TEST(CertifyFixedStep, SuspensionRigAgainstTheMultiprecisionReference) {
    const auto p = stepcert::problems::suspension_rig(1.5);
    const stepcert::weighted_norm tol{1e-7, 1e-5, stepcert::norm_kind::max};
    const auto c = stepcert::certify(p, stepcert::classic_rk4, tol);
    ASSERT_TRUE(c.issued()) << c.reason_detail;
    EXPECT_EQ(c.level, evidence_level::reference_verified);
    EXPECT_GE(c.reference_digits, 8.0);
    EXPECT_GT(c.reference_evaluations, 0u);
    EXPECT_LE(c.reference_error, 1.0);
}

// ---- Refusals ---------------------------------------------------------------------------------

// 1e-17 is below double's resolution of a state of size 1 (eps = 2.2e-16; common practice, no
// source): no step can meet it.
TEST(CertifyRefusal, ToleranceBelowRoundOffFloorInDouble) {
    const auto p = stepcert::problems::kepler(0.5, 20.0);
    const auto c = stepcert::certify(p, stepcert::classic_rk4, absolute(1e-17));
    EXPECT_FALSE(c.issued());
    EXPECT_EQ(c.reason, refusal::below_round_off_floor);
    EXPECT_NE(c.reason_detail.find("multiprecision"), std::string::npos);
    const auto d = stepcert::certify_step_count(p, stepcert::classic_rk4, 8000, absolute(1e-17));
    EXPECT_EQ(d.reason, refusal::below_round_off_floor);
}

// Prothero–Robinson with lambda = -500 is stiff for RK4, whose real stability interval is
// [-2.785293563405282, 0] (J. D. Lambert, Numerical Methods for Ordinary Differential Systems,
// Wiley 1991, §5.12 gives 2.78 — from memory; 18 digits derived in ../shared/reference-values.md).
// The solution sits on the slow manifold, so the unstable stiff mode starts from rounding: with
// 35 steps over [0, 0.2] (h lambda = -2.857, |R| = 1.11) a halving loop sees two runs agree and
// would accept the step; the stability check refuses it.
TEST(CertifyRefusal, UnstableStepANaiveHalvingLoopWouldAccept) {
    const auto p = stepcert::problems::prothero_robinson(-500.0, 0.2);
    const auto tol = absolute(1e-3);
    const auto coarse = stepcert::run_uniform(p, stepcert::classic_rk4, 35);
    const auto fine = stepcert::run_uniform(p, stepcert::classic_rk4, 70);
    const double halving_difference = tol(coarse.final_state(), fine.final_state());
    std::printf("halving loop: |y_35 - y_70| = %.3g of the tolerance\n", halving_difference);
    ASSERT_LE(halving_difference, 1.0);  // the naive loop accepts
    stepcert::certify_options opt;
    opt.output_times = 5;
    const auto c = stepcert::certify_step_count(p, stepcert::classic_rk4, 35, tol, opt);
    EXPECT_FALSE(c.issued());
    EXPECT_EQ(c.reason, refusal::unstable) << c.reason_detail;
    EXPECT_LT(c.stability.margin, 1.0);
    EXPECT_NEAR(c.stability.step_limit, 2.785293563405282 / 500.0, 1e-6 * 2.785293563405282 / 500.0);
    // certify() itself lands on a stable step.
    const auto s = stepcert::certify(p, stepcert::classic_rk4, tol, opt);
    ASSERT_TRUE(s.issued()) << s.reason_detail;
    EXPECT_LE(s.step, 2.785293563405282 / 500.0);
    EXPECT_GE(s.stability.margin, 1.0);
}

TEST(CertifyRefusal, GivenStepTooLargeForTheTolerance) {
    const auto p = stepcert::problems::kepler(0.5, 20.0);
    const auto c = stepcert::certify_step_count(p, stepcert::classic_rk4, 800, absolute(1e-9));
    EXPECT_FALSE(c.issued());
    EXPECT_TRUE(c.reason == refusal::tolerance_not_met || c.reason == refusal::outside_asymptotic_range) << c.reason_detail;
}

TEST(CertifyRefusal, BudgetExhaustedIsACertificateNotACrash) {
    const auto p = stepcert::problems::kepler(0.5, 20.0);
    stepcert::certify_options opt;
    opt.max_evaluations = 2000;
    const auto c = stepcert::certify(p, stepcert::classic_rk4, absolute(1e-10), opt);
    EXPECT_FALSE(c.issued());
    EXPECT_EQ(c.reason, refusal::budget_exhausted);
    EXPECT_LE(c.evaluations, 2000u);
}

// ---- Bad input ----------------------------------------------------------------------------------

namespace test_certify_fixed_step {
using test_certify_support::orderless_euler;
} // namespace test_certify_fixed_step

TEST(CertifyBadInput, EachIsATypedErrorWithAClearMessage) {
    const auto p = stepcert::problems::kepler(0.5, 20.0);
    const auto& m = stepcert::classic_rk4;
    auto message_of = [](auto&& call) -> std::string {
        try {
            call();
        } catch (const stepcert::invalid_input& e) {
            return e.what();
        }
        return "no invalid_input thrown";
    };
    EXPECT_NE(message_of([&] { stepcert::certify(p, m, absolute(0.0)); }).find("not both zero"), std::string::npos);
    EXPECT_NE(message_of([&] { stepcert::certify(p, m, absolute(-1e-6)); }).find("atol >= 0"), std::string::npos);
    EXPECT_NE(message_of([&] { stepcert::certify(p, m, absolute(std::nan(""))); }).find("not finite"), std::string::npos);
    EXPECT_NE(message_of([&] { stepcert::certify(p, m, stepcert::weighted_norm{1e-6, INFINITY}); }).find("not finite"),
              std::string::npos);
    stepcert::certify_options no_budget;
    no_budget.max_evaluations = 0;
    EXPECT_NE(message_of([&] { stepcert::certify(p, m, absolute(1e-6), no_budget); }).find("budget is zero"), std::string::npos);
    EXPECT_NE(message_of([&] { stepcert::certify(p, orderless_euler{}, absolute(1e-6)); }).find("declares no order"),
              std::string::npos);
    EXPECT_NE(message_of([&] { stepcert::certify_step_count(p, m, 801, absolute(1e-6)); }).find("multiple of"), std::string::npos);
    // An interval of zero length cannot even be a problem.
    EXPECT_NE(message_of([&] { (void)p.on_interval(1.0, 1.0); }).find("t1 <= t0"), std::string::npos);
}

// ---- Stored certificates ----------------------------------------------------------------------

TEST(CheckCertificate, HoldsForTheSameModelAndFailsAfterAChange) {
    const auto rig = stepcert::problems::suspension_rig(1.5);
    const stepcert::weighted_norm tol{1e-6, 1e-4, stepcert::norm_kind::max};
    stepcert::certify_options opt;
    opt.verify_with_reference = false;
    const auto stored = stepcert::certify(rig, stepcert::classic_rk4, tol, opt);
    ASSERT_TRUE(stored.issued()) << stored.reason_detail;
    const auto same = stepcert::check_certificate(stored, rig, stepcert::classic_rk4, opt);
    EXPECT_TRUE(same.holds) << same.why;
    // A stiffer tyre and a sharper bump (the same rig name): the old step no longer suffices.
    stepcert::problems::suspension_data changed;
    changed.tyre_n_per_m = 720000;
    changed.bump_width_ms = 20;
    const auto stiffer = stepcert::problems::suspension_rig(1.5, changed);
    const auto after = stepcert::check_certificate(stored, stiffer, stepcert::classic_rk4, opt);
    EXPECT_FALSE(after.holds);
    EXPECT_FALSE(after.why.empty());
    // Another method is another certificate.
    const auto other = stepcert::check_certificate(stored, rig, stepcert::explicit_midpoint, opt);
    EXPECT_FALSE(other.holds);
    EXPECT_NE(other.why.find("method"), std::string::npos);
}

// A right-hand side written for double only cannot run in multiprecision: no reference can vouch
// for the digits the tolerance needs. The certificate then stays estimated and says why, or, when
// the reference-verified level is required, is refused with that reason.
TEST(CertifyRefusal, ReferenceUnavailableForADoubleOnlyRightHandSide) {
    const auto damped = stepcert::make_problem(
        "damped spring, double only",
        [](const std::array<double, 2>& y, std::array<double, 2>& dydt, double) {
            dydt[0] = y[1];
            dydt[1] = -4.0 * y[0] - 0.4 * y[1];
        },
        std::array<double, 2>{1.0, 0.0}, 0.0, 5.0);
    const auto tol = absolute(1e-9);
    const auto estimated = stepcert::certify(damped, stepcert::classic_rk4, tol);
    ASSERT_TRUE(estimated.issued()) << estimated.reason_detail;
    EXPECT_EQ(estimated.level, evidence_level::estimated);
    EXPECT_NE(estimated.basis.find("no reference check"), std::string::npos);
    stepcert::certify_options strict;
    strict.require_reference = true;
    const auto refused = stepcert::certify(damped, stepcert::classic_rk4, tol, strict);
    EXPECT_FALSE(refused.issued());
    EXPECT_EQ(refused.reason, refusal::reference_unavailable) << refused.reason_detail;
}
