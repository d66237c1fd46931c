#pragma once
// Logarithmic norms and operator norms of a square matrix (needs Eigen). For the induced norm
// ||.||, mu[A] = lim_{h->0+} (||I + hA|| - 1)/h (G. Dahlquist 1959; E. Hairer, S. P. Nørsett,
// G. Wanner, Solving ODEs I, §I.10, Thm 10.5 — from memory):
//   mu_1[A]   = max_j ( a_jj + sum_{i != j} |a_ij| )   (columns),
//   mu_inf[A] = max_i ( a_ii + sum_{j != i} |a_ij| )   (rows),
//   mu_2[A]   = largest eigenvalue of (A + A^T)/2       (Eigen's SelfAdjointEigenSolver).
// mu may be negative (contraction: the solutions of y' = Ay draw together); ||A|| >= |mu[A]|.
#include <algorithm>
#include <cmath>
#include <limits>
#include <string>
#include <type_traits>

#include <Eigen/Dense>

#include "stepcert/core/error.hpp"

namespace stepcert {

enum class matrix_norm { one, two, infinity };

inline const char* matrix_norm_name(matrix_norm k) {
    switch (k) {
    case matrix_norm::one: return "1-norm";
    case matrix_norm::two: return "2-norm";
    case matrix_norm::infinity: return "inf-norm";
    }
    return "?";
}

namespace detail {
template <class Derived>
void require_square_finite(const Eigen::MatrixBase<Derived>& a, const char* who) {
    if (a.rows() == 0 || a.rows() != a.cols())
        throw invalid_input(std::string(who) + ": the matrix must be square and non-empty (got " + std::to_string(a.rows()) +
                            " x " + std::to_string(a.cols()) + ").");
    if (!a.allFinite())
        throw non_finite_value(std::string(who) + ": the matrix has a NaN or infinite entry (a Jacobian that returned "
                               "non-finite values?); check it at this state.");
}
} // namespace detail

// The norms take any Eigen matrix of doubles (MatrixXd, a fixed-size matrix, a block, an
// expression). They are templates so that Eigen's eigenvalue and SVD solvers are compiled only
// where a norm is used, not in every file that includes this header (about 4 s each).

/// mu[A] in the chosen norm.
template <class Derived>
double logarithmic_norm(const Eigen::MatrixBase<Derived>& a, matrix_norm kind) {
    static_assert(std::is_same_v<typename Derived::Scalar, double>, "stepcert::logarithmic_norm: the matrix must have double entries (Eigen::MatrixXd or an expression of one).");
    detail::require_square_finite(a, "stepcert::logarithmic_norm");
    const auto& m = a.eval();  // a plain matrix is not copied
    const Eigen::Index n = m.rows();
    if (kind == matrix_norm::two) {
        const Eigen::MatrixXd sym = 0.5 * (m + m.transpose());
        Eigen::SelfAdjointEigenSolver<Eigen::MatrixXd> solver(sym, Eigen::EigenvaluesOnly);
        if (solver.info() != Eigen::Success)
            throw error("stepcert::logarithmic_norm: the symmetric eigenvalue solver did not converge.");
        return solver.eigenvalues().maxCoeff();
    }
    double best = -std::numeric_limits<double>::infinity();
    for (Eigen::Index i = 0; i < n; ++i) {
        double s = 0.0;
        for (Eigen::Index j = 0; j < n; ++j) {
            const double x = kind == matrix_norm::infinity ? m(i, j) : m(j, i);
            s += i == j ? x : std::abs(x);
        }
        best = std::max(best, s);
    }
    return best;
}

/// ||A|| induced by the chosen norm (the Lipschitz constant of y -> Ay).
template <class Derived>
double operator_norm(const Eigen::MatrixBase<Derived>& a, matrix_norm kind) {
    static_assert(std::is_same_v<typename Derived::Scalar, double>, "stepcert::operator_norm: the matrix must have double entries (Eigen::MatrixXd or an expression of one).");
    detail::require_square_finite(a, "stepcert::operator_norm");
    const auto& m = a.eval();
    switch (kind) {
    case matrix_norm::one: return m.cwiseAbs().colwise().sum().maxCoeff();
    case matrix_norm::infinity: return m.cwiseAbs().rowwise().sum().maxCoeff();
    case matrix_norm::two: {
        const Eigen::JacobiSVD<Eigen::MatrixXd> svd(m);
        return svd.singularValues()(0);
    }
    }
    return std::numeric_limits<double>::quiet_NaN();
}

} // namespace stepcert
