// The matrix-free stability check (extreme eigenvalues from Jacobian-vector products, Lanczos or
// Spectra's Arnoldi) against the dense one and against closed forms: the busbar's
// second-difference matrix, whose largest eigenvalue magnitude is 4 (n + 1)^2 cos^2(pi / (2 (n + 1)))
// for diffusivity 1 (common practice, no source), and a chain of damped oscillators with Rayleigh
// damping (invented), whose modes decouple (common practice, no source) into
// lambda = -(a + b w^2)/2 +/- i sqrt(w^2 - (a + b w^2)^2/4), w^2 = 4 kappa sin^2(j pi / (2 (m + 1)))
// (derived from the 2x2 mode equation x'' + (a + b w^2) x' + w^2 x = 0). Classic RK4's real
// stability interval [-2.785293563405281624, 0] is from the shared reference values §6 (derived to
// 18 digits; J. D. Lambert 1991, §5.12, gives 2.78 — from memory).
#include <algorithm>
#include <cmath>
#include <complex>
#include <cstddef>
#include <cstdio>
#include <string>
#include <vector>

#include <gmock/gmock.h>
#include <gtest/gtest.h>

#include "stepcert/certify/certify_fixed_step.hpp"
#include "stepcert/certify/stability_check.hpp"
#include "stepcert/core/problem.hpp"
#include "stepcert/methods/classic_rk4.hpp"
#include "stepcert/problems/busbar_cooling.hpp"
#include "stepcert/transport/extreme_eigenvalues.hpp"
#include "stepcert/transport/jacobian_product.hpp"

namespace test_stability_matrix_free {
using cplx = std::complex<double>;
using testing::HasSubstr;
namespace sp = stepcert::problems;

constexpr double rk4_beta = 2.785293563405281624;   // shared reference values §6 (derived)
constexpr double pi = 3.14159265358979323846;       // common practice, no source

/// Largest |lambda| of the busbar's second-difference matrix on n cells, diffusivity 1 (closed form).
double busbar_largest(std::size_t cells) {
    const double n1 = static_cast<double>(cells + 1);
    return 4.0 * n1 * n1 * std::pow(std::cos(pi / (2.0 * n1)), 2);
}

/// Dense or matrix-free, nothing else changed.
stepcert::linear_stability_options on(stepcert::eigenvalue_path path) {
    stepcert::linear_stability_options opt;
    opt.eigenvalues = path;
    return opt;
}

/// The check at the initial state only.
template <class P, class M>
stepcert::linear_stability_verdict at_start(const P& p, const M& m, double h, const stepcert::linear_stability_options& opt = {}) {
    using S = typename P::state_type;
    return stepcert::check_linear_stability(p, m, h, std::vector<S>{p.y0()}, std::vector<double>{0.0}, opt);
}

// A bank of n independent capacitors discharging through resistors of spread time constants
// (invented): y_i' = -k_i y_i, k_i = 1 + 99 i / (n - 1), exact y_i = exp(-k_i t). Symmetric
// (diagonal) Jacobian, eigenvalues -k_i in [-100, -1].
struct decay_rate {
    std::size_t n;
    template <class U>
    U operator()(std::size_t i) const {
        return U(1) + U(99) * static_cast<U>(i) / static_cast<U>(n - 1);
    }
};
struct decays_rhs {
    template <class S, class T>
    void operator()(const S& y, S& dy, T) const {
        using U = std::decay_t<decltype(y[0])>;
        const decay_rate k{y.size()};
        for (std::size_t i = 0; i < y.size(); ++i) dy[i] = -k.template operator()<U>(i) * y[i];
    }
};
struct decays_exact {
    template <class T, class S>
    void operator()(const T& t, S& y) const {
        using U = std::decay_t<decltype(y[0])>;
        using std::exp;
        const decay_rate k{y.size()};
        for (std::size_t i = 0; i < y.size(); ++i) y[i] = exp(-k.template operator()<U>(i) * static_cast<U>(t));
    }
};
struct decays_jacobian {
    template <class S, class T, class M>
    void operator()(const S& y, T, M& J) const {
        const decay_rate k{y.size()};
        for (std::size_t i = 0; i < y.size(); ++i) J(static_cast<long>(i), static_cast<long>(i)) = -k.template operator()<double>(i);
    }
};
auto decoupled_decays(std::size_t n, double t1) {
    return stepcert::make_problem("decoupled decays(n=" + std::to_string(n) + ")", decays_rhs{}, std::vector<double>(n, 1.0), 0.0, t1)
        .with_exact(decays_exact{});
}

// A chain of m masses between two walls, springs kappa, Rayleigh damping a M + b K (invented):
// x' = v, v' = -K x - (a + b K) v, K = kappa tridiag(-1, 2, -1). State (x_1..x_m, v_1..v_m).
struct chain_rhs {
    double kappa, a, b;
    template <class S, class T>
    void operator()(const S& y, S& dy, T) const {
        const std::size_t m = y.size() / 2;
        for (std::size_t i = 0; i < m; ++i) {
            auto stiffness = [&](std::size_t off) {  // (K z)_i for z = y[off .. off + m)
                const double left = i > 0 ? y[off + i - 1] : 0.0, right = i + 1 < m ? y[off + i + 1] : 0.0;
                return kappa * (2.0 * y[off + i] - left - right);
            };
            dy[i] = y[m + i];
            dy[m + i] = -stiffness(0) - a * y[m + i] - b * stiffness(m);
        }
    }
};
auto damped_chain(std::size_t m, double kappa, double a, double b) {
    std::vector<double> y0(2 * m, 0.0);
    for (std::size_t i = 0; i < m; ++i) y0[i] = std::sin(pi * static_cast<double>(i + 1) / static_cast<double>(m + 1));
    return stepcert::make_problem("damped chain(m=" + std::to_string(m) + ")", chain_rhs{kappa, a, b}, std::move(y0), 0.0, 1.0);
}
/// The chain's eigenvalues with Im >= 0 (closed form above; all modes underdamped here).
std::vector<cplx> chain_eigenvalues(std::size_t m, double kappa, double a, double b) {
    std::vector<cplx> out;
    for (std::size_t j = 1; j <= m; ++j) {
        const double s = std::sin(static_cast<double>(j) * pi / (2.0 * static_cast<double>(m + 1)));
        const double w2 = 4.0 * kappa * s * s, c = a + b * w2;
        out.emplace_back(-c / 2.0, std::sqrt(w2 - c * c / 4.0));
    }
    return out;
}
/// RK4's step limit on a set of eigenvalues: the first crossing of |R(s lambda)| = 1 along each ray,
/// R(z) = 1 + z + z^2/2 + z^3/6 + z^4/24 (E. Hairer, G. Wanner, Solving ODEs II, §IV.2 — from memory),
/// found on a grid of 400 points up to 4/|lambda| and bisected.
double rk4_limit(const std::vector<cplx>& lambdas) {
    auto unstable = [](cplx z) { return std::abs(1.0 + z * (1.0 + z * (0.5 + z * (1.0 / 6.0 + z / 24.0)))) > 1.0; };
    double limit = 1e300;
    for (const cplx l : lambdas) {
        const double ds = 4.0 / std::abs(l) / 400.0;
        for (int k = 1; k <= 400; ++k) {
            if (!unstable(k * ds * l)) continue;
            double lo = (k - 1) * ds, hi = k * ds;
            for (int it = 0; it < 60; ++it) {
                const double mid = 0.5 * (lo + hi);
                (unstable(mid * l) ? hi : lo) = mid;
            }
            limit = std::min(limit, lo);
            break;
        }
    }
    return limit;
}

/// Dense and matrix-free agree on a busbar of the given cells within 1 %, both against the closed form.
void expect_busbar_paths_agree(std::size_t cells) {
    const double largest = busbar_largest(cells);
    const double limit = rk4_beta / largest;
    const auto p = sp::busbar_cooling(cells, 100 * limit);
    const auto dense = at_start(p, stepcert::classic_rk4, 0.5 * limit, on(stepcert::eigenvalue_path::dense));
    const auto free = at_start(p, stepcert::classic_rk4, 0.5 * limit, on(stepcert::eigenvalue_path::matrix_free));
    EXPECT_EQ(dense.path, stepcert::eigenvalue_path::dense);
    EXPECT_EQ(free.path, stepcert::eigenvalue_path::matrix_free);
    ASSERT_TRUE(dense.worst && free.worst) << free.basis;
    // Dense: the central-difference Jacobian of a linear right-hand side is exact to rounding.
    EXPECT_NEAR(dense.worst->lambda.real() / -largest, 1.0, 1e-8) << dense.basis;
    EXPECT_NEAR(dense.step_limit / limit, 1.0, 1e-8) << dense.basis;
    // Matrix-free: the Ritz value within 1 % of the closed form, and moved outward past it.
    EXPECT_NEAR(free.worst->estimate.real() / -largest, 1.0, 0.01) << free.basis;
    EXPECT_GE(-free.worst->lambda.real(), largest) << free.basis;
    EXPECT_TRUE(free.estimates_converged) << free.basis;
    EXPECT_LT(free.worst->radius / std::abs(free.worst->estimate), 0.01) << free.basis;
    EXPECT_LT(free.largest_radius, 0.02) << free.basis;  // interior Ritz values: larger residuals, capped at the extreme
    // Both paths: step limit and spectral radius within 1 %, the matrix-free one on the safe side.
    EXPECT_NEAR(free.step_limit / dense.step_limit, 1.0, 0.01);
    EXPECT_LE(free.step_limit, dense.step_limit);
    EXPECT_NEAR(free.spectral_radius / dense.spectral_radius, 1.0, 0.01);
    EXPECT_TRUE(dense.stable && free.stable);
    EXPECT_THAT(free.basis, HasSubstr("matrix-free path"));
    EXPECT_THAT(free.basis, HasSubstr("Lanczos"));
    EXPECT_THAT(dense.basis, HasSubstr("dense path"));
    std::printf("busbar %zu cells: closed form %.10g; dense %.10g; matrix-free Ritz %.10g (%.2e), measured %.10g; step limits "
                "matrix-free / dense %.6f; %zu products\n",
                cells, -largest, dense.worst->lambda.real(), free.worst->estimate.real(), free.worst->estimate.real() / -largest - 1.0,
                free.worst->lambda.real(), free.step_limit / dense.step_limit, free.jacobian_products);
}

} // namespace test_stability_matrix_free

using namespace test_stability_matrix_free;

// The agreement check on 1,000 cells (dense: every eigenvalue of a 1000 x 1000 matrix, a few
// seconds unoptimized, so left out of the sanitizer pass; its sibling below runs there).
TEST(MatrixFreeStability, AgreesWithTheDensePathOnTheThousandCellBusbar) { expect_busbar_paths_agree(1000); }
TEST(MatrixFreeStability, AgreesWithTheDensePathOnASmallBusbar) { expect_busbar_paths_agree(150); }

// 5,000 unknowns: the dense path would refuse (max_dimension 2000); automatic takes the
// matrix-free one, and certify issues a certificate.
TEST(MatrixFreeStability, FiveThousandDecoupledDecaysGetACertificate) {
    const auto p = decoupled_decays(5000, 1.0);
    const auto v = at_start(p, stepcert::classic_rk4, 0.01);
    EXPECT_EQ(v.path, stepcert::eigenvalue_path::matrix_free);
    ASSERT_TRUE(v.limit_found) << v.basis;
    // Largest rate 100: RK4's limit 2.785293563405281624 / 100, approached from the safe side.
    EXPECT_NEAR(v.step_limit / (rk4_beta / 100.0), 1.0, 0.01) << v.basis;
    EXPECT_LE(v.step_limit, rk4_beta / 100.0 * (1.0 + 1e-12)) << v.basis;
    EXPECT_THROW((void)at_start(p, stepcert::classic_rk4, 0.01, on(stepcert::eigenvalue_path::dense)),
                 stepcert::unsupported_operation);

    stepcert::weighted_norm tol;
    tol.atol = 1e-7;
    tol.rtol = 1e-7;
    stepcert::step_certificate c;
    ASSERT_NO_THROW(c = stepcert::certify(p, stepcert::classic_rk4, tol));
    EXPECT_NE(c.level, stepcert::evidence_level::not_certified) << c.reason_detail;
    EXPECT_TRUE(c.stability.checked);
    EXPECT_TRUE(c.stability.stable) << c.stability.worst_mode;
    EXPECT_LE(c.step, rk4_beta / 100.0) << c.basis;
}

// On a small system with its own Jacobian the matrix-free path multiplies by it exactly (no
// right-hand-side evaluation); the limit is the same as the dense path's to the radius.
TEST(MatrixFreeStability, SmallSystemWithItsOwnJacobianUsesExactProducts) {
    const auto p = decoupled_decays(150, 1.0).with_jacobian(decays_jacobian{});
    const auto dense = at_start(p, stepcert::classic_rk4, 0.01, on(stepcert::eigenvalue_path::dense));
    const auto free = at_start(p, stepcert::classic_rk4, 0.01, on(stepcert::eigenvalue_path::matrix_free));
    EXPECT_EQ(free.rhs_evaluations, 0U) << free.basis;
    EXPECT_GT(free.jacobian_products, 0U);
    EXPECT_THAT(free.basis, HasSubstr("problem's own Jacobian"));
    EXPECT_NEAR(dense.step_limit / (rk4_beta / 100.0), 1.0, 1e-9) << dense.basis;
    EXPECT_NEAR(free.step_limit / dense.step_limit, 1.0, 0.01) << free.basis;
    EXPECT_LE(free.step_limit, dense.step_limit * (1.0 + 1e-12)) << free.basis;
}

// Just above and just below RK4's real limit on a 20,000-cell busbar (only the matrix-free path
// runs at this size): the step is caught, and the one below passes, because the estimate's radius
// (reported) is well under the 1 % margin.
TEST(MatrixFreeStability, CatchesAStepJustAboveTheRk4LimitOnALargeSystem) {
    const std::size_t cells = 20000;
    const double limit = rk4_beta / busbar_largest(cells);
    const auto p = sp::busbar_cooling(cells, 100 * limit);
    for (const double factor : {1.01, 0.99}) {
        const auto v = at_start(p, stepcert::classic_rk4, factor * limit);
        EXPECT_EQ(v.path, stepcert::eigenvalue_path::matrix_free);
        EXPECT_EQ(v.stable, factor < 1.0) << v.basis;
        ASSERT_TRUE(v.worst.has_value()) << v.basis;
        EXPECT_LT(v.worst->radius / std::abs(v.worst->estimate), 0.005) << v.basis;
        EXPECT_LE(v.step_limit, limit) << v.basis;
        EXPECT_GT(v.step_limit, 0.995 * limit) << v.basis;
        EXPECT_THAT(v.basis, HasSubstr(factor > 1.0 ? "UNSTABLE" : "Stable"));
        // No n x n matrix: a forward-difference product per Lanczos step plus f(y).
        EXPECT_EQ(v.rhs_evaluations, v.jacobian_products + 1) << v.basis;
        EXPECT_LT(v.jacobian_products, 200U) << v.basis;
    }
}

// Non-symmetric, complex spectrum: the damped chain (100 masses, 200 unknowns) on both paths.
TEST(MatrixFreeStability, DampedChainWithComplexEigenvaluesAgreesWithTheDensePath) {
    const std::size_t m = 100;
    const double kappa = 1e4, a = 0.5, b = 2e-3;
    const auto exact = chain_eigenvalues(m, kappa, a, b);
    const double limit = rk4_limit(exact);
    const auto p = damped_chain(m, kappa, a, b);
    const auto dense = at_start(p, stepcert::classic_rk4, 0.5 * limit, on(stepcert::eigenvalue_path::dense));
    const auto free = at_start(p, stepcert::classic_rk4, 0.5 * limit, on(stepcert::eigenvalue_path::matrix_free));
    ASSERT_TRUE(dense.limit_found && free.limit_found) << free.basis;
    EXPECT_NEAR(dense.step_limit / limit, 1.0, 1e-6) << dense.basis;
    EXPECT_NEAR(free.step_limit / dense.step_limit, 1.0, 0.01) << free.basis;
    EXPECT_LE(free.step_limit, dense.step_limit) << free.basis;
    EXPECT_THAT(free.basis, HasSubstr("Arnoldi"));
    // The estimate behind the worst mode is one of the chain's eigenvalues (to 1e-3).
    const cplx e = free.worst->estimate;
    const double gap = std::abs(std::min_element(exact.begin(), exact.end(), [&](cplx x, cplx y) {
        return std::abs(x - e) < std::abs(y - e);
    })[0] - e);
    EXPECT_LT(gap, 1e-3 * std::abs(e)) << e;
    EXPECT_GT(e.imag(), 0.0);
    EXPECT_TRUE(dense.stable && free.stable);
    std::printf("damped chain, %zu unknowns: step limits closed form %.6g, dense %.6g, matrix-free %.6g; worst estimate "
                "%.6g%+.6gi (nearest exact at %.2e relative); %zu products\n",
                2 * m, limit, dense.step_limit, free.step_limit, e.real(), e.imag(), gap / std::abs(e), free.jacobian_products);
}

// The same chain at 10^4 unknowns, matrix-free only, against the closed form.
TEST(MatrixFreeStability, LargeDampedChainAgainstTheClosedForm) {
    const std::size_t m = 5000;
    const double kappa = 1e4, a = 0.5, b = 2e-3;
    const double limit = rk4_limit(chain_eigenvalues(m, kappa, a, b));
    const auto v = at_start(damped_chain(m, kappa, a, b), stepcert::classic_rk4, 0.5 * limit);
    EXPECT_EQ(v.path, stepcert::eigenvalue_path::matrix_free);
    EXPECT_TRUE(v.estimates_converged) << v.basis;
    EXPECT_LE(v.step_limit, limit) << v.basis;
    EXPECT_GT(v.step_limit, 0.99 * limit) << v.basis;
    std::printf("damped chain, %zu unknowns: matrix-free step limit / closed form %.6f, %zu products\n", 2 * m,
                v.step_limit / limit, v.jacobian_products);
}

// The automatic choice follows dense_up_to; a too-small budget gives a conservative, flagged
// answer, never a hang.
TEST(MatrixFreeStability, PathChoiceAndBudget) {
    const auto small = sp::busbar_cooling(200, 1e-6), large = sp::busbar_cooling(201, 1e-6);
    EXPECT_EQ(at_start(small, stepcert::classic_rk4, 1e-6).path, stepcert::eigenvalue_path::dense);
    EXPECT_EQ(at_start(large, stepcert::classic_rk4, 1e-6).path, stepcert::eigenvalue_path::matrix_free);

    const std::size_t cells = 5000;
    const double limit = rk4_beta / busbar_largest(cells);
    auto tight = on(stepcert::eigenvalue_path::automatic);
    tight.extreme.max_products = 12;
    const auto v = at_start(sp::busbar_cooling(cells, 100 * limit), stepcert::classic_rk4, 0.5 * limit, tight);
    EXPECT_FALSE(v.estimates_converged);
    EXPECT_LE(v.jacobian_products, 12U);
    EXPECT_THAT(v.basis, HasSubstr("NOT converged"));
    EXPECT_LE(v.step_limit, limit) << v.basis;  // a larger radius: still on the safe side
}

TEST(MatrixFreeStability, BadOptionsAndStatesAreRejected) {
    const auto p = sp::busbar_cooling(500, 1e-6);
    auto bad = on(stepcert::eigenvalue_path::matrix_free);
    bad.extreme.tolerance = 0.0;
    EXPECT_THROW((void)at_start(p, stepcert::classic_rk4, 1e-7, bad), stepcert::invalid_input);
    bad = on(stepcert::eigenvalue_path::matrix_free);
    bad.extreme.krylov_dimension = 4;  // below 2 count + 1
    try {
        (void)at_start(p, stepcert::classic_rk4, 1e-7, bad);
        ADD_FAILURE() << "no exception";
    } catch (const stepcert::invalid_input& e) {
        EXPECT_THAT(e.what(), HasSubstr("krylov_dimension"));
        EXPECT_THAT(e.what(), HasSubstr(p.name()));
    }
    std::vector<double> broken = p.y0();
    broken[7] = std::nan("");
    EXPECT_THROW((stepcert::jacobian_product<std::decay_t<decltype(p)>>(p, broken, 0.0, 10)), stepcert::non_finite_value);
    stepcert::jacobian_product<std::decay_t<decltype(p)>> op(p, p.y0(), 0.0, 2);
    std::vector<double> v(500, 1.0), out(500);
    op.apply(v.data(), out.data());
    op.apply(v.data(), out.data());
    EXPECT_THROW(op.apply(v.data(), out.data()), stepcert::budget_exhausted);
    EXPECT_THROW((stepcert::jacobian_product<std::decay_t<decltype(p)>>(p, p.y0(), 0.0, 10,
                                                                        stepcert::jacobian_product_source::problem_jacobian)),
                 stepcert::invalid_input);
}

// The estimator alone, on an operator whose products are exact: the second-difference matrix of
// 3,000 cells scaled to the busbar (symmetric: Lanczos), and a small one assembled whole.
TEST(ExtremeEigenvalues, LanczosOnTheSecondDifferenceMatrix) {
    struct second_difference {
        std::size_t n;
        std::size_t size() const { return n; }
        void apply(const double* v, double* out) const {
            const double c = static_cast<double>((n + 1) * (n + 1));
            for (std::size_t i = 0; i < n; ++i)
                out[i] = c * ((i > 0 ? v[i - 1] : 0.0) - 2.0 * v[i] + (i + 1 < n ? v[i + 1] : 0.0));
        }
    };
    for (const std::size_t n : {std::size_t{12}, std::size_t{3000}}) {
        second_difference op{n};
        const auto est = stepcert::estimate_extreme_eigenvalues(op);
        EXPECT_TRUE(est.symmetric);
        EXPECT_TRUE(est.converged) << est.method;
        const auto left = std::min_element(est.eigenvalues.begin(), est.eigenvalues.end(),
                                           [](const auto& x, const auto& y) { return x.value.real() < y.value.real(); });
        EXPECT_NEAR(left->value.real() / -busbar_largest(n), 1.0, n < 20 ? 1e-12 : 5e-3) << est.method;
        EXPECT_LE(left->value.real() - left->radius, -busbar_largest(n)) << est.method;  // the radius covers the error
        EXPECT_NEAR(est.spectral_radius() / busbar_largest(n), 1.0, 0.01);
        EXPECT_THAT(left->role, HasSubstr("leftmost"));
    }
}
