// Global error bounds from local errors transported by a Lipschitz constant or a logarithmic
// norm, and the matrix norms they use. Ground truth: the exact solution of a dissipative linear
// system (a cooling rod, our own scenario) written through its eigen-decomposition.
#include <array>
#include <cmath>
#include <cstddef>
#include <iostream>
#include <limits>
#include <string>
#include <vector>

#include <Eigen/Dense>
#include <gtest/gtest.h>

#include <boost/math/constants/constants.hpp>

#include "stepcert/bound/log_norm_along.hpp"
#include "stepcert/bound/logarithmic_norm.hpp"
#include "stepcert/bound/transported_bound.hpp"
#include "stepcert/estimate/step_doubling.hpp"
#include "stepcert/estimate/true_global_error.hpp"
#include "stepcert/estimate/true_local_error.hpp"
#include "stepcert/methods/classic_rk4.hpp"
#include "stepcert/problems/linear_system.hpp"

namespace {

constexpr std::size_t rod_nodes = 8;
constexpr double rod_rate = 10.0;  // conductance / capacity per cell, 1/s

// A rod of 8 cells between two ice baths: T_i' = a (T_(i-1) - 2 T_i + T_(i+1)), T_0 = T_9 = 0.
// The matrix is a times tridiag(1, -2, 1); its eigenpairs are lambda_k = -4 a sin^2(k pi / 18),
// v_k(j) = sin(j k pi / 9) (common practice, no source: the discrete sine basis). Starting from
// v_1 + v_3 / 2 the exact solution is e^{lambda_1 t} v_1 + e^{lambda_3 t} v_3 / 2.
struct rod_rhs {
    template <class S, class T>
    void operator()(const S& y, S& d, const T&) const {
        using U = stepcert::scalar_of<S>;
        for (std::size_t i = 0; i < rod_nodes; ++i) {
            const U left = i == 0 ? U(0) : U(y[i - 1]), right = i + 1 == rod_nodes ? U(0) : U(y[i + 1]);
            d[i] = U(rod_rate) * (left - 2 * y[i] + right);
        }
    }
};

struct rod_exact {
    template <class T, class S>
    void operator()(const T& time, S& y) const {
        using U = stepcert::scalar_of<S>;
        using std::exp;
        using std::sin;
        const U pi = boost::math::constants::pi<U>();
        const U t = static_cast<U>(time);
        auto lambda = [&](int k) { return -4 * U(rod_rate) * sin(k * pi / 18) * sin(k * pi / 18); };
        for (std::size_t j = 1; j <= rod_nodes; ++j) {
            const U x = static_cast<U>(static_cast<double>(j)) * pi / 9;
            y[j - 1] = exp(lambda(1) * t) * sin(x) + exp(lambda(3) * t) * sin(3 * x) / 2;
        }
    }
};

auto cooling_rod() {
    std::array<double, rod_nodes> y0{};
    rod_exact{}(0.0, y0);
    return stepcert::make_problem("cooling rod", rod_rhs{}, y0, 0.0, 1.0).with_exact(rod_exact{});
}

Eigen::MatrixXd rod_matrix() {
    Eigen::MatrixXd a = Eigen::MatrixXd::Zero(rod_nodes, rod_nodes);
    for (Eigen::Index i = 0; i < static_cast<Eigen::Index>(rod_nodes); ++i) {
        a(i, i) = -2 * rod_rate;
        if (i > 0) a(i, i - 1) = rod_rate;
        if (i + 1 < static_cast<Eigen::Index>(rod_nodes)) a(i, i + 1) = rod_rate;
    }
    return a;
}

TEST(MatrixNorms, LogarithmicAndOperatorNormsOfASmallMatrix) {
    // A = [-3 1; 2 -4]. From the definitions (Dahlquist 1959; Hairer, Nørsett, Wanner, Solving
    // ODEs I, §I.10 — from memory), derived by hand: mu_inf = max(-3 + 1, -4 + 2) = -2,
    // mu_1 = max(-3 + 2, -4 + 1) = -1, mu_2 = largest eigenvalue of [-3 1.5; 1.5 -4] = (-7 + sqrt 10)/2;
    // ||A||_inf = 6, ||A||_1 = 5, ||A||_2 = sqrt(15 + sqrt 125) (A^T A = [13 -11; -11 17]).
    Eigen::MatrixXd a(2, 2);
    a << -3, 1, 2, -4;
    const double eps = std::numeric_limits<double>::epsilon();
    EXPECT_EQ(stepcert::logarithmic_norm(a, stepcert::matrix_norm::infinity), -2.0);
    EXPECT_EQ(stepcert::logarithmic_norm(a, stepcert::matrix_norm::one), -1.0);
    EXPECT_NEAR(stepcert::logarithmic_norm(a, stepcert::matrix_norm::two), (-7.0 + std::sqrt(10.0)) / 2, 16 * eps);
    EXPECT_EQ(stepcert::operator_norm(a, stepcert::matrix_norm::infinity), 6.0);
    EXPECT_EQ(stepcert::operator_norm(a, stepcert::matrix_norm::one), 5.0);
    EXPECT_NEAR(stepcert::operator_norm(a, stepcert::matrix_norm::two), std::sqrt(15.0 + std::sqrt(125.0)), 16 * eps * 6);
    // The rod: mu_2 = lambda_1 = -4 a sin^2(pi/18), mu_inf = 0 (interior rows sum to 0), ||A||_inf = 4a.
    const auto r = rod_matrix();
    EXPECT_NEAR(stepcert::logarithmic_norm(r, stepcert::matrix_norm::two), -4 * rod_rate * std::pow(std::sin(boost::math::constants::pi<double>() / 18), 2), 1e-12);
    EXPECT_EQ(stepcert::logarithmic_norm(r, stepcert::matrix_norm::infinity), 0.0);
    EXPECT_EQ(stepcert::operator_norm(r, stepcert::matrix_norm::infinity), 4 * rod_rate);
    // Any Eigen matrix of doubles: a fixed-size matrix, a block and an expression give the same norms.
    Eigen::Matrix2d f;
    f << -3, 1, 2, -4;
    Eigen::MatrixXd big = Eigen::MatrixXd::Zero(3, 3);
    big.topLeftCorner(2, 2) = a;
    for (const auto kind : {stepcert::matrix_norm::one, stepcert::matrix_norm::two, stepcert::matrix_norm::infinity}) {
        EXPECT_EQ(stepcert::logarithmic_norm(f, kind), stepcert::logarithmic_norm(a, kind));
        EXPECT_EQ(stepcert::logarithmic_norm(big.topLeftCorner(2, 2), kind), stepcert::logarithmic_norm(a, kind));
        EXPECT_EQ(stepcert::operator_norm(2.0 * a, kind), 2.0 * stepcert::operator_norm(a, kind));
    }
}

TEST(TransportedBounds, NeverBelowTheTrueErrorAndTheLogNormOneIsFarTighter) {
    // RK4, 100 steps over 1 s on the rod, errors in the rms norm (so the 2-norm log norm applies).
    // Local errors: the true ones (reference), so with the given constants the bounds are rigorous.
    // Theory (Hairer, Nørsett, Wanner I, §I.10 — from memory): mu_2 = -1.206 < 0 < L = ||A||_2
    // = 38.8, so the log-norm bound stays near the sum of the local errors while the Lipschitz one
    // grows like e^{L t}: at t = 1 the ratio is astronomically above the required 10x.
    const auto rod = cooling_rod();
    const std::size_t n = 100;
    stepcert::local_error_options lo;
    lo.norm = {1.0, 0.0, stepcert::norm_kind::rms};
    const auto local = stepcert::true_local_error_profile(rod, stepcert::classic_rk4, n, 20, lo);
    stepcert::global_error_options go;
    go.norm = lo.norm;
    go.grid_points = n;
    const auto truth = stepcert::true_global_error(rod, stepcert::classic_rk4, n, go);
    const auto a = rod_matrix();
    const double mu = stepcert::logarithmic_norm(a, stepcert::matrix_norm::two);
    const double lip = stepcert::operator_norm(a, stepcert::matrix_norm::two);
    const auto by_mu = stepcert::log_norm_error_bound(local, mu);
    const auto by_lip = stepcert::lipschitz_error_bound(local, lip);
    EXPECT_TRUE(by_mu.rigorous);
    EXPECT_TRUE(by_lip.rigorous);
    ASSERT_EQ(by_mu.bound.size(), truth.estimate.size());
    for (std::size_t j = 0; j < n; ++j) {
        EXPECT_NEAR(by_mu.times[j], truth.times[j], 1e-12);
        EXPECT_GE(by_mu.bound[j], truth.estimate[j]) << "t = " << truth.times[j];
        EXPECT_GE(by_lip.bound[j], truth.estimate[j]) << "t = " << truth.times[j];
        EXPECT_LE(by_mu.bound[j], by_lip.bound[j]);
    }
    EXPECT_GE(by_lip.at_end(), 10 * by_mu.at_end());
    // Their effectivity (bound / true error) at every step end: at least 1 for a bound.
    const auto eff_mu = stepcert::effectivity(by_mu, truth);
    const auto eff_lip = stepcert::effectivity(by_lip, truth);
    EXPECT_EQ(eff_mu.counted, n);
    EXPECT_GE(eff_mu.smallest, 1.0);
    EXPECT_GE(eff_lip.smallest, eff_mu.smallest);
    std::cout << "bound effectivity, log norm " << eff_mu.smallest << " .. " << eff_mu.largest << ", Lipschitz "
              << eff_lip.smallest << " .. " << eff_lip.largest << "\n";
    stepcert::global_error_options other_grid = go;
    other_grid.grid_points = 3;  // no longer a grid of step ends of a 100-step run
    EXPECT_THROW((void)stepcert::effectivity(by_mu, stepcert::true_global_error(rod, stepcert::classic_rk4, 99, other_grid)),
                 stepcert::invalid_input);
    // The log-norm bound follows only the slowest decay (mu = lambda_1), while the error's fast
    // modes die out: measured 684x the true error at t = 1 (and 10^15 times below the Lipschitz one).
    EXPECT_LE(by_mu.at_end(), 1000 * truth.estimate.back());
    // With step-doubling local errors the same bound is labelled estimated.
    const auto estimated = stepcert::log_norm_error_bound(stepcert::step_doubling_profile(rod, stepcert::classic_rk4, n, lo), mu);
    EXPECT_FALSE(estimated.rigorous);
    EXPECT_NE(estimated.basis.find("estimated"), std::string::npos) << estimated.basis;
}

TEST(TransportedBounds, LogNormAlongTheRunMatchesTheMatrixAndTheFiniteDifferences) {
    // The catalogue's linear system carries its Jacobian; the rod has none (central differences).
    // Both are linear, so every sample equals mu of the constant matrix (differences: to 1e-8).
    const auto rod = cooling_rod();
    const auto run = stepcert::run_uniform(rod, stepcert::classic_rk4, 20, 5);
    const auto s = stepcert::log_norm_along(rod, run, stepcert::matrix_norm::two);
    EXPECT_FALSE(s.user_jacobian);
    ASSERT_EQ(s.mu.size(), 5u);
    for (double m : s.mu) EXPECT_NEAR(m, stepcert::logarithmic_norm(rod_matrix(), stepcert::matrix_norm::two), 1e-8);
    const auto lin = stepcert::problems::linear_system(4.0);
    const auto s2 = stepcert::log_norm_along(lin, stepcert::run_uniform(lin, stepcert::classic_rk4, 8, 2), stepcert::matrix_norm::infinity);
    EXPECT_TRUE(s2.user_jacobian);
    // A = (1/4)[-7 3 3; -12 -7 12; -12 -3 8]: row sums of the off-diagonal moduli, derived: 
    // (-7 + 6)/4, (-7 + 24)/4, (8 + 15)/4 -> mu_inf = 23/4.
    for (double m : s2.mu) EXPECT_EQ(m, 23.0 / 4.0);
}

TEST(TransportedBounds, BadInputsAreTypedErrors) {
    const auto lin = stepcert::problems::linear_system(4.0);
    const auto local = stepcert::step_doubling_profile(lin, stepcert::classic_rk4, 8);
    EXPECT_THROW((void)stepcert::lipschitz_error_bound(local, 0.0), stepcert::invalid_input);
    EXPECT_THROW((void)stepcert::lipschitz_error_bound(local, -1.0), stepcert::invalid_input);
    EXPECT_THROW((void)stepcert::log_norm_error_bound(local, std::numeric_limits<double>::quiet_NaN()), stepcert::invalid_input);
    stepcert::local_error_options relative;
    relative.norm = {1e-6, 1e-3};
    EXPECT_THROW((void)stepcert::log_norm_error_bound(stepcert::step_doubling_profile(lin, stepcert::classic_rk4, 8, relative), -1.0),
                 stepcert::invalid_input);
    EXPECT_THROW((void)stepcert::logarithmic_norm(Eigen::MatrixXd(2, 3), stepcert::matrix_norm::two), stepcert::invalid_input);
    // A Jacobian of the wrong size, and one that returns NaN.
    auto wrong_size = [](const auto&, double, Eigen::MatrixXd& J) { J = Eigen::MatrixXd::Zero(2, 2); };
    const auto p1 = lin.with_jacobian(wrong_size);
    const auto run = stepcert::run_uniform(lin, stepcert::classic_rk4, 4);
    EXPECT_THROW((void)stepcert::log_norm_along(p1, run, stepcert::matrix_norm::two), stepcert::invalid_input);
    auto nan_jacobian = [](const auto&, double, Eigen::MatrixXd& J) { J(0, 0) = std::numeric_limits<double>::quiet_NaN(); };
    const auto p2 = lin.with_jacobian(nan_jacobian);
    EXPECT_THROW((void)stepcert::log_norm_along(p2, run, stepcert::matrix_norm::two), stepcert::non_finite_value);
}

} // namespace
