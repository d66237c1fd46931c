#pragma once
// The linearized propagator of one step: the matrix Phi with e(t + h) ~ Phi e(t) for a small
// perturbation e of the solution, i.e. the solution operator of the variational equation
// e' = J(s, y(s)) e over [t, t + h] (E. Hairer, S. P. Nørsett, G. Wanner, Solving ODEs I, §I.14 —
// from memory). It is integrated by classic RK4 on the matrix equation, with J taken at the two
// ends of the step and at its midpoint; the midpoint state comes from the cubic Hermite
// interpolant of the run's end states and slopes, y_m = (y_0 + y_1)/2 + h (f_0 - f_1)/8
// (common practice, no source). The propagator only needs to be good to a few per cent: it
// carries error estimates, whose own accuracy is no better.
#include <cstddef>

#include <Eigen/Dense>

namespace stepcert::detail {

/// Phi = RK4 step for Y' = J(s) Y, Y(0) = I, from J at the start, the midpoint and the end.
inline Eigen::MatrixXd rk4_propagator(const Eigen::MatrixXd& j_start, const Eigen::MatrixXd& j_mid,
                                      const Eigen::MatrixXd& j_end, double h) {
    const auto n = j_start.rows();
    const Eigen::MatrixXd I = Eigen::MatrixXd::Identity(n, n);
    const Eigen::MatrixXd k1 = j_start;
    const Eigen::MatrixXd k2 = j_mid * (I + 0.5 * h * k1);
    const Eigen::MatrixXd k3 = j_mid * (I + 0.5 * h * k2);
    const Eigen::MatrixXd k4 = j_end * (I + h * k3);
    return I + (h / 6.0) * (k1 + 2.0 * k2 + 2.0 * k3 + k4);
}

} // namespace stepcert::detail
