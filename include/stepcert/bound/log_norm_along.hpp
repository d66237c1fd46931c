#pragma once
// The logarithmic norm of the Jacobian sampled along a run, as an estimate of the growth rate the
// transported bounds need (needs Eigen). The Jacobian is the problem's own (with_jacobian:
// jac(y, t, J) writing an n x n matrix) or central differences of the right-hand side with step
// delta_j = eps^(1/3) max(1, |y_j|) (common practice, no source). Sampled at the run's output
// states only, the largest value is an estimate, not a bound: between samples, and between the
// numerical and the exact solution, mu can be larger.
#include <algorithm>
#include <cmath>
#include <cstddef>
#include <limits>
#include <string>
#include <vector>

#include <Eigen/Dense>

#include "stepcert/bound/logarithmic_norm.hpp"
#include "stepcert/core/concepts.hpp"
#include "stepcert/core/error.hpp"
#include "stepcert/core/norm.hpp"
#include "stepcert/core/state.hpp"
#include "stepcert/run/run.hpp"

namespace stepcert {

/// The induced norm that matches a weighted norm with fixed weights: max -> inf-norm, rms -> 2-norm.
inline matrix_norm matrix_norm_for(const weighted_norm& norm) {
    return norm.kind == norm_kind::max ? matrix_norm::infinity : matrix_norm::two;
}

struct log_norm_samples {
    matrix_norm kind = matrix_norm::two;
    std::vector<double> times;
    std::vector<double> mu;
    bool user_jacobian = false;
    std::string how;

    double largest() const {
        double m = -std::numeric_limits<double>::infinity();
        for (double x : mu) m = std::max(m, x);
        return m;
    }
};

/// The Jacobian of p at (y, t) in double: the problem's own, checked for size and finiteness,
/// or central differences of its right-hand side.
template <problem_like P, class S>
Eigen::MatrixXd jacobian_at(const P& p, const S& state, double t) {
    using D = rebind_state<typename P::state_type, double>;
    const D y = convert_state<D>(state);
    const std::size_t n = state_size(y);
    const auto N = static_cast<Eigen::Index>(n);
    Eigen::MatrixXd J = Eigen::MatrixXd::Zero(N, N);
    if constexpr (P::has_jacobian) {
        p.jacobian()(y, t, J);
        if (J.rows() != N || J.cols() != N)
            throw invalid_input("stepcert::jacobian_at: the Jacobian of problem '" + p.name() + "' came back " +
                                std::to_string(J.rows()) + " x " + std::to_string(J.cols()) + "; the state has " +
                                std::to_string(n) + " components, so it must be " + std::to_string(n) + " x " +
                                std::to_string(n) + ".");
    } else {
        static_assert(P::template rhs_accepts<double>,
                      "stepcert::jacobian_at: without a Jacobian the right-hand side is differenced in double; "
                      "make it accept double states, or attach a Jacobian with problem.with_jacobian(jac).");
        D plus = y, minus = y, fp = state_traits<D>::make(n), fm = state_traits<D>::make(n);
        const double root3_eps = std::cbrt(std::numeric_limits<double>::epsilon());
        for (std::size_t j = 0; j < n; ++j) {
            const double delta = root3_eps * std::max(1.0, std::abs(y[j]));
            plus[j] = y[j] + delta;
            minus[j] = y[j] - delta;
            p.rhs()(static_cast<const D&>(plus), fp, t);
            p.rhs()(static_cast<const D&>(minus), fm, t);
            for (std::size_t i = 0; i < n; ++i)
                J(static_cast<Eigen::Index>(i), static_cast<Eigen::Index>(j)) = (fp[i] - fm[i]) / (plus[j] - minus[j]);
            plus[j] = y[j];
            minus[j] = y[j];
        }
    }
    if (!J.allFinite())
        throw non_finite_value("stepcert::jacobian_at: the Jacobian of problem '" + p.name() + "' at t = " +
                               detail::time_text(t) + " has a NaN or infinite entry; check it (or the right-hand side) there.");
    return J;
}

/// mu[J(y(t), t)] at every state of a run (a trajectory from run_uniform or run_adaptive).
template <problem_like P, class Trajectory>
log_norm_samples log_norm_along(const P& p, const Trajectory& run, matrix_norm kind) {
    if (run.states.empty()) throw invalid_input("stepcert::log_norm_along: the run has no states.");
    log_norm_samples out;
    out.kind = kind;
    out.user_jacobian = P::has_jacobian;
    out.how = std::string(matrix_norm_name(kind)) + " logarithmic norm of " +
              (P::has_jacobian ? "the problem's Jacobian" : "a central-difference Jacobian (delta = eps^(1/3) max(1, |y_j|))") +
              " at " + std::to_string(run.states.size()) + " states of the run (an estimate: mu is not bounded between samples)";
    for (std::size_t k = 0; k < run.states.size(); ++k) {
        const double t = static_cast<double>(run.times[k]);
        out.times.push_back(t);
        out.mu.push_back(logarithmic_norm(jacobian_at(p, run.states[k], t), kind));
    }
    return out;
}

} // namespace stepcert
