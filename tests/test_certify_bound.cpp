// The "bounded" level of step certification: certify_by_bound from a Lipschitz constant or a
// logarithmic norm bound and a local error constant. Ground truth: the exact solutions of the
// Dahlquist test equation and of the 3x3 linear system (stepcert::problems), against which the
// certified run must meet the tolerance and stay under the bound at every output time.
#include <algorithm>
#include <array>
#include <cmath>
#include <cstddef>
#include <cstdio>
#include <limits>
#include <string>
#include <vector>

#include <Eigen/Dense>
#include <gtest/gtest.h>

#include "test_certify_support.hpp"

#include "stepcert/bound/logarithmic_norm.hpp"
#include "stepcert/certify/certify_by_bound.hpp"
#include "stepcert/core/error.hpp"
#include "stepcert/methods/classic_rk4.hpp"
#include "stepcert/methods/explicit_euler.hpp"
#include "stepcert/problems/dahlquist.hpp"
#include "stepcert/problems/linear_system.hpp"
#include "stepcert/run/run.hpp"

// Helpers and tests alike live in this namespace: the area's files share one translation unit.
namespace test_certify_bound {

using stepcert::bound_constants;
using stepcert::evidence_level;
using stepcert::refusal;

stepcert::weighted_norm absolute(double atol, stepcert::norm_kind kind = stepcert::norm_kind::max) { return {atol, 0.0, kind}; }

/// Local error constant of a method whose stability function is the Taylor polynomial of e^z of
/// degree p (explicit Euler, classic RK4: Hairer & Wanner, Solving ODEs II, §IV.2 — from memory),
/// on y' = lambda y, y0 = 1, t in [0, T]. One step from y leaves (e^z - R(z)) y, z = h lambda,
/// and by Lagrange's remainder |e^z - R(z)| <= max(1, e^z) |z|^(p+1) / (p+1)! (derived; common
/// practice, no source). |y| along the run is at most max(1, e^{lambda T}): R(z) <= e^z for z >= 0,
/// and |R(z)| <= 1 for z in the method's real stability interval, which h_max must respect.
double taylor_local_constant(double lambda, int p, double h_max, double T) {
    const double factorial = std::tgamma(p + 2.0);
    return std::pow(std::abs(lambda), p + 1) * std::max(1.0, std::exp(lambda * h_max)) * std::max(1.0, std::exp(lambda * T)) /
           factorial;
}

/// The certified run's error against the exact solution at each output time, in tolerance units.
template <class P, class M>
std::vector<double> true_errors(const P& p, const M& m, std::size_t n, std::size_t G, const stepcert::weighted_norm& tol) {
    const auto run = stepcert::run_uniform(p, m, n, n / G);
    std::vector<double> out;
    auto y = p.y0();
    for (std::size_t j = 1; j < run.states.size(); ++j) {
        p.exact()(run.times[j], y);
        out.push_back(tol(run.states[j], y));
    }
    return out;
}

struct holds_summary {
    double worst_truth = 0.0;       ///< largest true error over the grid, tolerance units
    double least_effectivity = 0.0; ///< smallest bound / true error over the grid
};

/// Checks the certificate's bound at every output time t_j (with the j N / G steps up to it)
/// against the true error there: never below it, and the truth within the tolerance.
template <class P, class M>
holds_summary expect_bound_holds(const stepcert::step_certificate& c, const P& p, const M& m, const bound_constants& k,
                                 const stepcert::weighted_norm& tol) {
    const std::size_t G = c.output_times;
    const auto truth = true_errors(p, m, c.steps, G, tol);
    holds_summary s{0.0, std::numeric_limits<double>::infinity()};
    for (std::size_t j = 1; j <= G; ++j) {
        const double t = (c.t1 - c.t0) * static_cast<double>(j) / static_cast<double>(G);
        const double bound = stepcert::uniform_step_bound(k, m.order(), t, j * c.steps / G) / tol.atol;
        EXPECT_LE(truth[j - 1], bound) << c.method << " at t = " << t;
        EXPECT_LE(truth[j - 1], 1.0) << c.method << " at t = " << t;
        s.worst_truth = std::max(s.worst_truth, truth[j - 1]);
        s.least_effectivity = std::min(s.least_effectivity, bound / truth[j - 1]);
    }
    EXPECT_NEAR(stepcert::uniform_step_bound(k, m.order(), c.t1 - c.t0, c.steps) / tol.atol, c.bound, 1e-12);
    return s;
}

template <class M>
void expect_issued(const stepcert::step_certificate& c, const M& m, const bound_constants& k) {
    ASSERT_TRUE(c.issued()) << c.method << ": " << c.reason_detail;
    EXPECT_EQ(c.level, evidence_level::bounded);
    EXPECT_EQ(c.reason, refusal::none);
    EXPECT_EQ(c.steps % c.output_times, 0u);
    EXPECT_LE(c.bound, 1.0);
    EXPECT_GT(c.bound, 0.0);
    EXPECT_LE(c.step, k.max_step);
    EXPECT_TRUE(c.stability.checked && c.stability.stable) << c.stability.worst_mode;
    EXPECT_NE(c.basis.find(k.growth == stepcert::growth_kind::lipschitz ? "Thm II.3.4" : "Dahlquist 1959"), std::string::npos);
    const std::size_t per_step = m.order() == 4 ? 4 : 1;  // classic RK4: 4 stages; explicit Euler: 1
    EXPECT_GE(c.evaluations, c.steps * per_step);
}

template <class E, class F>
std::string message_of(F&& call) {
    try {
        call();
    } catch (const E& e) {
        return e.what();
    } catch (...) {
        return "another exception type";
    }
    return "nothing thrown";
}


// Growing solution, y' = y on [0, 2], L = |lambda| = 1: the classic Lipschitz bound (Hairer,
// Nørsett, Wanner I, Thm II.3.4 — from memory) with C from the method's known local error.
TEST(CertifyBound, DahlquistGrowthWithLipschitzConstant) {
    const double lambda = 1.0, T = 2.0, h_max = 0.1;
    const auto p = stepcert::problems::dahlquist(lambda, T);
    const auto k_euler = bound_constants::lipschitz(lambda, taylor_local_constant(lambda, 1, h_max, T), h_max);
    const auto k_rk4 = bound_constants::lipschitz(lambda, taylor_local_constant(lambda, 4, h_max, T), h_max);
    const auto tol_euler = absolute(1e-3), tol_rk4 = absolute(1e-8);
    const auto euler = stepcert::certify_by_bound(p, stepcert::explicit_euler, tol_euler, k_euler);
    const auto rk4 = stepcert::certify_by_bound(p, stepcert::classic_rk4, tol_rk4, k_rk4);
    expect_issued(euler, stepcert::explicit_euler, k_euler);
    expect_issued(rk4, stepcert::classic_rk4, k_rk4);
    const auto se = expect_bound_holds(euler, p, stepcert::explicit_euler, k_euler, tol_euler);
    const auto sr = expect_bound_holds(rk4, p, stepcert::classic_rk4, k_rk4, tol_rk4);
    // The step is the bound's, not needlessly small: the rounding up to a multiple of 8 costs little.
    EXPECT_GT(euler.bound, 0.9);
    EXPECT_GT(rk4.bound, 0.5);
    std::printf("y' = y on [0, 2], Lipschitz: Euler N = %zu (bound %.4f, truth %.4f, least bound/truth %.3g); "
                "RK4 N = %zu (bound %.4f, truth %.4f, least bound/truth %.3g)\n%s\n",
                euler.steps, euler.bound, se.worst_truth, se.least_effectivity, rk4.steps, rk4.bound, sr.worst_truth,
                sr.least_effectivity, rk4.basis.c_str());
}

// Dissipative, y' = -y: the Lipschitz bound grows as e^{|lambda| T} while the log-norm bound
// with mu = lambda = -1 saturates (Dahlquist 1959; Hairer, Nørsett, Wanner I, §I.10, Thm 10.6 —
// from memory), so theory puts the step ratio at about (e^{|lambda| T})^{1/p} (derived: the ratio
// of C h^p (e^{T} - 1) to C h^p (1 - e^{-T})); both must hold against the exact solution.
TEST(CertifyBound, DissipativeLogNormCertifiesAMuchLargerStep) {
    struct scenario {
        double T, atol, h_max;
        int order;
    };
    // h_max inside the real stability intervals (Euler 2, RK4 2.785: ../shared/reference-values.md §6).
    for (const scenario s : {scenario{6.0, 1e-3, 2.0, 1}, scenario{12.0, 1e-6, 2.5, 4}}) {
        const double lambda = -1.0;
        const auto p = stepcert::problems::dahlquist(lambda, s.T);
        const double C = taylor_local_constant(lambda, s.order, s.h_max, s.T);
        const auto by_l = bound_constants::lipschitz(std::abs(lambda), C, s.h_max);
        const auto by_mu = bound_constants::log_norm(lambda, C, s.h_max);
        const auto tol = absolute(s.atol);
        auto certify = [&](const bound_constants& k) {
            return s.order == 1 ? stepcert::certify_by_bound(p, stepcert::explicit_euler, tol, k)
                                : stepcert::certify_by_bound(p, stepcert::classic_rk4, tol, k);
        };
        const auto cl = certify(by_l), cm = certify(by_mu);
        holds_summary hl, hm;
        if (s.order == 1) {
            expect_issued(cl, stepcert::explicit_euler, by_l);
            expect_issued(cm, stepcert::explicit_euler, by_mu);
            hl = expect_bound_holds(cl, p, stepcert::explicit_euler, by_l, tol);
            hm = expect_bound_holds(cm, p, stepcert::explicit_euler, by_mu, tol);
        } else {
            expect_issued(cl, stepcert::classic_rk4, by_l);
            expect_issued(cm, stepcert::classic_rk4, by_mu);
            hl = expect_bound_holds(cl, p, stepcert::classic_rk4, by_l, tol);
            hm = expect_bound_holds(cm, p, stepcert::classic_rk4, by_mu, tol);
        }
        const double theory = std::exp(std::abs(lambda) * s.T / s.order);
        const double ratio = cm.step / cl.step;
        std::printf("y' = -y on [0, %g], %s, atol %g: Lipschitz N = %zu (least bound/truth %.3g), log norm N = %zu "
                    "(least bound/truth %.3g); step ratio %.2f, theory %.2f\n",
                    s.T, cl.method.c_str(), s.atol, cl.steps, hl.least_effectivity, cm.steps, hm.least_effectivity, ratio, theory);
        ASSERT_GE(theory, 10.0);  // the case is one where theory promises the tenfold step
        EXPECT_GE(ratio, 10.0);
        EXPECT_GE(ratio, 0.8 * theory);   // the fan's sum over the integral, and N rounded up to 8 | N
        EXPECT_LE(ratio, 1.05 * theory);
    }
}

// Why the fan's sum and not the classic closed form with mu < 0: explicit Euler on y' = -y with
// one step of h = 1 lands on 0 (R(-1) = 0), an error of e^{-1} = 0.368; C = 1/2 is a valid local
// error constant (Lagrange remainder, as above). C h (1 - e^{-1}) = 0.316 falls below that
// truth; the sum C h^2 = 0.5 does not (derived).
TEST(CertifyBound, ClassicFormWithNegativeMuIsNoBoundButTheSumIs) {
    const auto k = bound_constants::log_norm(-1.0, 0.5, 2.0);
    const double truth = std::exp(-1.0);
    const double classic = 0.5 * 1.0 * (std::exp(-1.0) - 1.0) / -1.0;
    EXPECT_LT(classic, truth);
    EXPECT_GE(stepcert::uniform_step_bound(k, 1, 1.0, 1), truth);
    const auto p = stepcert::problems::dahlquist(-1.0, 1.0);
    const auto run = stepcert::run_uniform(p, stepcert::explicit_euler, 1);
    EXPECT_EQ(run.states.back()[0], 0.0);
}

// The 3x3 linear system y' = A y with mu from bound/logarithmic_norm.hpp of its constant matrix,
// in the tolerance's norm (max: inf-norm; rms: 2-norm). For RK4, R(hA) is the Taylor polynomial
// of degree 4, so |tau| <= sum_{k>=5} (h a)^k / k! |y| <= (h a)^5 e^{h a} / 5! |y|, a = ||A||
// (derived). |y| on the run is at most Y + atol with Y >= max_t |y(t)| (by induction: a run
// within the bound of the solution stays within atol of it); Y from the eigen-decomposition
// written in problems/linear_system.hpp: |y(t)| <= ||V|| |z(t)|, |z|_inf <= 2, |z|_2 <= sqrt(5).
TEST(CertifyBound, LinearSystemWithTheLogNormOfItsMatrix) {
    const auto p = stepcert::problems::linear_system(1.0);
    const auto a_entries = stepcert::problems::linear_system_matrix<double>();
    Eigen::MatrixXd A(3, 3), V(3, 3);
    for (int i = 0; i < 3; ++i)
        for (int j = 0; j < 3; ++j) A(i, j) = a_entries[static_cast<std::size_t>(i)][static_cast<std::size_t>(j)];
    V << 1, 1, 0, 0, 1, 1, 1, 1, 1;
    const double h_max = 0.05;
    for (const auto kind : {stepcert::norm_kind::max, stepcert::norm_kind::rms}) {
        const auto tol = absolute(1e-6, kind);
        const auto norm = stepcert::constants_norm(tol);
        const double mu = stepcert::logarithmic_norm(A, norm), a = stepcert::operator_norm(A, norm);
        // The rms norm is |.|_2 / sqrt(3).
        const double Y = stepcert::operator_norm(V, norm) * (kind == stepcert::norm_kind::max ? 2.0 : std::sqrt(5.0 / 3.0));
        const double C = std::pow(a, 5) * std::exp(a * h_max) / 120.0 * (Y + tol.atol);
        const auto k = bound_constants::log_norm(mu, C, h_max);
        const auto c = stepcert::certify_by_bound(p, stepcert::classic_rk4, tol, k);
        expect_issued(c, stepcert::classic_rk4, k);
        const auto s = expect_bound_holds(c, p, stepcert::classic_rk4, k, tol);
        std::printf("linear 3x3 on [0, 1], %s: mu = %.4g, ||A|| = %.4g, C = %.4g: N = %zu, bound %.4f, truth %.3g, "
                    "least bound/truth %.3g, evaluations %zu\n",
                    stepcert::matrix_norm_name(norm), mu, a, C, c.steps, c.bound, s.worst_truth, s.least_effectivity, c.evaluations);
    }
}

// ---- Refusals: a certificate at level not_certified with the reason, no exception --------------

// A local error constant that is wrong (far too small) lets the bound allow h = 1/8 on
// y' = -100 y, where h lambda = -12.5 lies outside explicit Euler's interval [-2, 0]
// (../shared/reference-values.md §6): the stability check refuses it.
TEST(CertifyBoundRefusal, AStepOutsideTheStabilityRegionIsRefused) {
    const auto p = stepcert::problems::dahlquist(-100.0, 1.0);
    const auto c = stepcert::certify_by_bound(p, stepcert::explicit_euler, absolute(1e-3), bound_constants::log_norm(-100.0, 1e-12, 1.0));
    EXPECT_FALSE(c.issued());
    EXPECT_EQ(c.reason, refusal::unstable) << c.reason_detail;
    EXPECT_NE(c.reason_detail.find("stability region"), std::string::npos);
    EXPECT_GT(c.evaluations, 0u);
}

// y' = -y on [0, 10] with L = 1: explicit Euler would need about 1e11 steps for 1e-6, far over
// the default budget; refused before any run. An e^{LT} that overflows double is refused too.
TEST(CertifyBoundRefusal, TheBudgetCannotPayForTheLipschitzBound) {
    const auto p = stepcert::problems::dahlquist(-1.0, 10.0);
    const auto c = stepcert::certify_by_bound(p, stepcert::explicit_euler, absolute(1e-6), bound_constants::lipschitz(1.0, 0.5, 2.0));
    EXPECT_FALSE(c.issued());
    EXPECT_EQ(c.reason, refusal::budget_exhausted);
    EXPECT_NE(c.reason_detail.find("over the budget"), std::string::npos) << c.reason_detail;
    EXPECT_LE(c.evaluations, 1u);
    const auto huge = stepcert::certify_by_bound(p, stepcert::explicit_euler, absolute(1e-6), bound_constants::lipschitz(100.0, 0.5, 2.0));
    EXPECT_EQ(huge.reason, refusal::budget_exhausted);
    EXPECT_NE(huge.reason_detail.find("up to 1e18"), std::string::npos) << huge.reason_detail;
}

// 1e-16 absolute is below the rounding of y0 = 1 in double (eps = 2.2e-16; common practice, no
// source): the bound may be met, the run's error cannot.
TEST(CertifyBoundRefusal, AToleranceBelowRoundingIsRefused) {
    const auto p = stepcert::problems::dahlquist(-1.0, 1.0);
    const auto c = stepcert::certify_by_bound(p, stepcert::classic_rk4, absolute(1e-16),
                                              bound_constants::log_norm(-1.0, taylor_local_constant(-1.0, 4, 2.5, 1.0), 2.5));
    EXPECT_EQ(c.reason, refusal::below_round_off_floor) << c.reason_detail;
}

// ---- Bad input: typed exceptions naming the problem --------------------------------------------

using test_certify_support::orderless_euler;

TEST(CertifyBoundBadInput, EachIsATypedErrorWithAClearMessage) {
    const auto p = stepcert::problems::dahlquist(-1.0, 1.0);
    const auto& m = stepcert::classic_rk4;
    const auto tol = absolute(1e-6);
    const double nan = std::numeric_limits<double>::quiet_NaN(), inf = std::numeric_limits<double>::infinity();
    auto with = [&](const bound_constants& k) {
        return message_of<stepcert::invalid_input>([&] { (void)stepcert::certify_by_bound(p, m, tol, k); });
    };
    auto has = [](const std::string& message, const char* phrase) { return message.find(phrase) != std::string::npos; };
    for (double L : {0.0, -1.0, nan, inf})
        EXPECT_TRUE(has(with(bound_constants::lipschitz(L, 1.0, 0.1)), "Lipschitz constant L must be finite and > 0")) << L;
    for (double mu : {nan, inf, -inf})
        EXPECT_TRUE(has(with(bound_constants::log_norm(mu, 1.0, 0.1)), "logarithmic norm bound mu must be finite")) << mu;
    for (double C : {-1.0, nan, inf})
        EXPECT_TRUE(has(with(bound_constants::log_norm(-1.0, C, 0.1)), "local error constant C")) << C;
    for (double h_max : {0.0, -0.1, nan})
        EXPECT_TRUE(has(with(bound_constants::log_norm(-1.0, 1.0, h_max)), "h_max must be > 0")) << h_max;
    const auto good = bound_constants::log_norm(-1.0, 1.0, 0.1);
    EXPECT_TRUE(has(message_of<stepcert::invalid_input>([&] { (void)stepcert::certify_by_bound(p, orderless_euler{}, tol, good); }),
                    "declares no order"));
    const stepcert::weighted_norm relative{1e-6, 1e-3, stepcert::norm_kind::max};
    EXPECT_TRUE(has(message_of<stepcert::invalid_input>([&] { (void)stepcert::certify_by_bound(p, m, relative, good); }),
                    "not a fixed norm"));
    EXPECT_TRUE(has(message_of<stepcert::invalid_input>([&] { (void)stepcert::certify_by_bound(p, m, absolute(0.0), good); }),
                    "not both zero"));
}

} // namespace test_certify_bound
