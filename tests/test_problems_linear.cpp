// linear_system(): its matrix has the documented eigen-decomposition, and its closed-form
// solution agrees with Eigen's matrix exponential (unsupported/Eigen/MatrixFunctions, an
// outside general-purpose library) in double.
#include <array>
#include <cmath>
#include <limits>

#include <Eigen/Dense>
#include <gtest/gtest.h>
#include <unsupported/Eigen/MatrixFunctions>

#include "stepcert/problems/linear_system.hpp"

namespace {

namespace pr = stepcert::problems;

Eigen::Matrix3d system_matrix() {
    const auto a = pr::linear_system_matrix<double>();
    Eigen::Matrix3d A;
    for (int i = 0; i < 3; ++i)
        for (int j = 0; j < 3; ++j) A(i, j) = a[i][j];
    return A;
}

// A V = V B with the integer V and the block-diagonal B of the header (derived: all entries are
// multiples of 1/4, so double arithmetic here is exact and the comparison is equality).
TEST(LinearSystem, MatrixHasTheDocumentedEigenDecomposition) {
    const Eigen::Matrix3d A = system_matrix();
    Eigen::Matrix3d V, B, Vinv;
    V << 1, 1, 0, 0, 1, 1, 1, 1, 1;
    Vinv << 0, -1, 1, 1, 1, -1, -1, 0, 1;
    B << -1, 0, 0, 0, -0.25, 1.5, 0, -1.5, -0.25;
    EXPECT_EQ(V * Vinv, Eigen::Matrix3d::Identity());
    EXPECT_EQ(A * V, V * B);
    // The right-hand side is y' = A y with this A.
    const auto p = pr::linear_system();
    const std::array<double, 3> y{0.5, -1.25, 2.0};
    std::array<double, 3> f{};
    auto rhs = p.rhs();
    rhs(y, f, 0.0);
    const Eigen::Vector3d Ay = A * Eigen::Vector3d(y[0], y[1], y[2]);
    for (int i = 0; i < 3; ++i) EXPECT_EQ(f[i], Ay(i));
    // The Jacobian is A.
    Eigen::Matrix3d J;
    p.jacobian()(y, 0.0, J);
    EXPECT_EQ(J, A);
}

// Outside check: y(t) = exp(A t) y0 with Eigen's MatrixExponential (scaling and squaring with
// Padé approximants; Eigen documentation). Tolerance 64 eps relative to max |y|: the exponential
// of this well-conditioned 3x3 matrix is accurate to a few eps (common practice, no source).
TEST(LinearSystem, ExactSolutionAgreesWithEigenMatrixExponential) {
    const auto p = pr::linear_system();
    const Eigen::Matrix3d A = system_matrix();
    const Eigen::Vector3d y0(p.y0()[0], p.y0()[1], p.y0()[2]);
    const double eps = std::numeric_limits<double>::epsilon();
    for (double t : {0.0, 0.125, 0.7, 1.0, 2.5, 4.0, 10.0}) {
        const Eigen::Matrix3d At = A * t;
        const Eigen::Vector3d expected = At.exp() * y0;
        std::array<double, 3> y{};
        p.exact()(t, y);
        const double scale = std::max(1e-300, expected.cwiseAbs().maxCoeff());
        for (int i = 0; i < 3; ++i)
            EXPECT_NEAR(y[i], expected(i), 64 * eps * scale) << "t = " << t << ", component " << i;
    }
}

} // namespace
