#pragma once
// The logarithmic norm of the Jacobian sampled along a run, as an estimate of the growth rate the
// transported bounds need (needs Eigen). The Jacobian is the problem's own (with_jacobian:
// jac(y, t, J) writing an n x n matrix) or central differences of the right-hand side with step
// delta_j = eps^(1/3) max(1, |y_j|) (common practice, no source). Sampled at the run's output
// states only, the largest value is an estimate, not a bound: between samples, and between the
// numerical and the exact solution, mu can be larger. The Jacobian comes from jacobian_at
// (transport/jacobian.hpp).
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
#include "stepcert/run/run.hpp"
#include "stepcert/transport/jacobian.hpp"

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

/// mu[J(y(t), t)] at every state of a run (a trajectory from run_uniform or run_adaptive).
template <problem_like P, class Trajectory>
log_norm_samples log_norm_along(const P& p, const Trajectory& run, matrix_norm kind) {
    if (run.states.empty()) throw invalid_input("stepcert::log_norm_along: the run has no states.");
    log_norm_samples out;
    out.kind = kind;
    out.user_jacobian = P::has_jacobian;
    out.how = std::string(matrix_norm_name(kind)) + " logarithmic norm of " +
              jacobian_source(p) +
              " at " + std::to_string(run.states.size()) + " states of the run (an estimate: mu is not bounded between samples)";
    for (std::size_t k = 0; k < run.states.size(); ++k) {
        const double t = static_cast<double>(run.times[k]);
        out.times.push_back(t);
        out.mu.push_back(logarithmic_norm(jacobian_at(p, run.states[k], t), kind));
    }
    return out;
}

} // namespace stepcert
