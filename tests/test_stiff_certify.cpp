// Certification with Rosenbrock 4 on a stiff model: the certified step or controller tolerance
// meets the tolerance against an independent truth (Boost.Odeint's Bulirsch–Stoer in long double,
// outside stepcert), and stability never limits it, where the explicit RK4 is held by stability.
#include <algorithm>
#include <cmath>
#include <cstddef>
#include <cstdio>
#include <string>
#include <type_traits>
#include <vector>

#include <gtest/gtest.h>

#include <boost/numeric/ublas/matrix.hpp>

#include <boost/numeric/odeint/integrate/integrate_adaptive.hpp>
#include <boost/numeric/odeint/stepper/bulirsch_stoer.hpp>

#include "stepcert/certify/certify_adaptive.hpp"
#include "stepcert/certify/certify_fixed_step.hpp"
#include "stepcert/core/problem.hpp"
#include "stepcert/methods/classic_rk4.hpp"
#include "stepcert/methods/rosenbrock4.hpp"
#include "stepcert/methods/rosenbrock4_adaptive.hpp"
#include "stepcert/problems/stiff_reactor.hpp"
#include "stepcert/run/run.hpp"
#include "stepcert/transport/autodiff_jacobian.hpp"

namespace test_stiff_certify {

using stepcert::evidence_level;

/// The three-species reactor (problems/stiff_reactor.hpp, invented rate constants), the model of
/// the hard-model suite's row 2.
using reactor_kinetics = stepcert::problems::stiff_reactor_rhs;

/// The states at j/8, j = 1..8, by odeint's Bulirsch–Stoer in long double at tolerance 1e-17
/// (independent of stepcert; the hard-model suite checks it against a run at 1e-15).
std::vector<std::vector<long double>> truth_at_eighths() {
    namespace odeint = boost::numeric::odeint;
    std::vector<std::vector<long double>> out;
    std::vector<long double> y{1.0L, 0.0L, 0.0L};
    long double t = 0.0L;
    for (int j = 1; j <= 8; ++j) {
        const long double next = static_cast<long double>(j) / 8.0L;
        odeint::bulirsch_stoer<std::vector<long double>, long double> stepper(1e-17L, 1e-17L);
        odeint::integrate_adaptive(stepper, reactor_kinetics{}, y, t, next, (next - t) / 16);
        t = next;
        out.push_back(y);
    }
    return out;
}

template <class Run>
double worst_error(const Run& run, const std::vector<std::vector<long double>>& truth, const stepcert::weighted_norm& tol) {
    double worst = 0.0;
    for (std::size_t j = 1; j <= 8; ++j) {
        const std::vector<double> t(truth[j - 1].begin(), truth[j - 1].end());
        worst = std::max(worst, tol(run.states[j], t));
    }
    return worst;
}

const auto reactor = stepcert::problems::stiff_reactor();
const stepcert::weighted_norm atol_1e6{1e-6, 0.0, stepcert::norm_kind::max};

TEST(StiffCertify, AdaptiveRosenbrockCertifiesTheReactorAtBothLevels) {
    const auto truth = truth_at_eighths();
    std::vector<double> eighths;
    for (int j = 1; j <= 8; ++j) eighths.push_back(j / 8.0);
    for (const bool verify : {false, true}) {
        stepcert::certify_options opt;
        opt.verify_with_reference = verify;
        const auto c = stepcert::certify(reactor, stepcert::rosenbrock4_adaptive, atol_1e6, opt);
        ASSERT_TRUE(c.issued()) << stepcert::to_string(c.reason) << ": " << c.reason_detail;
        EXPECT_EQ(c.level, verify ? evidence_level::reference_verified : evidence_level::estimated) << c.basis;
        const auto run = stepcert::run_adaptive(reactor, stepcert::rosenbrock4_adaptive,
                                                stepcert::controller_tolerance{c.controller_atol, c.controller_rtol}, eighths);
        const double e = worst_error(run, truth, atol_1e6);
        std::printf("[ figures ] reactor, adaptive Rosenbrock 4, 1e-6 (%s): controller tolerance %.3g, %zu steps, %zu evaluations "
                    "a run, true error %.3g of the tolerance; certification cost %zu evaluations\n",
                    verify ? "reference-verified" : "estimated", c.controller_atol, run.stats.steps, run.stats.evaluations, e,
                    c.evaluations);
        EXPECT_LE(e, 1.0);
    }
}

TEST(StiffCertify, FixedStepRosenbrockIsNeverLimitedByStability) {
    // RK4 is certified at 768 steps there, held by its stability region (hard-model suite, row 2).
    // Rosenbrock 4's stability check passes at the certified step (the stability function of an
    // L-stable method stays below 1 in modulus on the negative real axis, Hairer & Wanner II §IV.3
    // and §VI.4, from memory), so accuracy, not stability, sets its step. Its coarse runs (fewer than 640 steps)
    // blow up even so: the first step linearizes B + B -> C at B = 0, where it is not stiff yet,
    // overshoots, and a negative B then grows without bound in the model itself (B' = -k2 B^2 < 0)
    // — measured: errors 1e129 .. 1e286 of the tolerance from 8 to 256 steps.
    stepcert::certify_options opt;
    opt.verify_with_reference = false;
    const auto c = stepcert::certify(reactor, stepcert::rosenbrock4_fixed, atol_1e6, opt);
    ASSERT_TRUE(c.issued()) << stepcert::to_string(c.reason) << ": " << c.reason_detail;
    EXPECT_NE(c.limited_by, stepcert::step_limited_by::stability) << c.basis;
    EXPECT_TRUE(c.stability.checked && c.stability.stable);
    const auto truth = truth_at_eighths();
    const auto run = stepcert::run_uniform(reactor, stepcert::rosenbrock4_fixed, c.steps, c.steps / 8);
    const double e = worst_error(run, truth, atol_1e6);
    std::printf("[ figures ] reactor, fixed-step Rosenbrock 4, 1e-6 (estimated): N = %zu, true error %.3g of the tolerance, "
                "certification cost %zu evaluations\n",
                c.steps, e, c.evaluations);
    EXPECT_LE(e, 1.0);
}

TEST(StiffCertify, ReactorJacobianMatchesAutodiff) {
    // Reference: Boost.Math's forward-mode autodiff of the same right-hand side, exact to rounding.
    const std::vector<double> y{0.7, 3e-5, 0.29997};
    boost::numeric::ublas::matrix<double> given(3, 3), by_autodiff(3, 3);
    stepcert::problems::stiff_reactor_jacobian{}(y, 0.4, given);
    stepcert::autodiff_jacobian(reactor_kinetics{})(y, 0.4, by_autodiff);
    for (std::size_t i = 0; i < 3; ++i)
        for (std::size_t j = 0; j < 3; ++j)
            EXPECT_NEAR(given(i, j), by_autodiff(i, j), 1e-15 * (1.0 + std::abs(by_autodiff(i, j)))) << i << ", " << j;
}

} // namespace test_stiff_certify
