#pragma once
// Per-step local truncation error (LTE) records, shared by every estimator. Sign convention:
// the local error of a step is the computed value minus the exact solution through the step's
// starting state, y_1 - y(t_0 + h; t_0, y_0) (E. Hairer, S. P. Nørsett, G. Wanner, Solving ODEs I,
// §II.3 — from memory). Records hold its size in a weighted norm, and the principal error
// function estimate / h^(q) with q the power the estimate scales with (p + 1 for a method of
// order p): in the asymptotic range that function is smooth in t and independent of h.
#include <algorithm>
#include <cstddef>
#include <string>
#include <vector>

#include "stepcert/core/norm.hpp"
#include "stepcert/methods/method.hpp"

namespace stepcert {

enum class local_error_estimator {
    step_doubling,    ///< one step of h against two of h/2, scaled by 2^p / (2^p - 1)
    embedded_pair,    ///< h sum (b_i - b_hat_i) k_i: the local error of the lower-order solution
    reference_truth,  ///< one step from the reference state y(t_n), compared with y(t_n + h)
    milne_device,     ///< Adams PECE: the corrector's local error from the predictor-corrector difference
};

inline const char* estimator_name(local_error_estimator e) {
    switch (e) {
    case local_error_estimator::step_doubling: return "step doubling";
    case local_error_estimator::embedded_pair: return "embedded pair";
    case local_error_estimator::reference_truth: return "true local error (reference)";
    case local_error_estimator::milne_device: return "Milne's device (predictor-corrector difference)";
    }
    return "?";
}

struct local_error_step {
    double t = 0.0;          ///< start of the step
    double h = 0.0;          ///< its length
    double estimate = 0.0;   ///< weighted norm of the (estimated) local error
    double principal = 0.0;  ///< estimate / h^power: the principal error function
    /// How far the estimate itself may be off in absolute terms, where that is known: for true
    /// local errors, the reference's own uncertainty (10^-digits of the state); else 0.
    double uncertainty = 0.0;
};

/// The per-step local errors of one run on a uniform grid.
struct local_error_profile {
    std::string problem;
    std::string method;
    local_error_estimator estimator = local_error_estimator::step_doubling;
    int order = 0;  ///< order p of the solution whose local error is estimated
    int power = 0;  ///< the estimate scales as h^power (p + 1)
    weighted_norm norm;
    std::vector<local_error_step> steps;
    /// Per step, the local error vector in double (only when asked for: keep_vectors).
    std::vector<std::vector<double>> vectors;
    run_stats cost;  ///< evaluations spent by the estimator (the propagated run included)

    double largest() const {
        double m = 0.0;
        for (const auto& s : steps) m = std::max(m, s.estimate);
        return m;
    }
};

struct local_error_options {
    weighted_norm norm;               ///< how a local error vector is measured (scaled by the state at the step's end)
    bool keep_vectors = false;        ///< also keep every step's local error vector
    std::size_t max_evaluations = 50'000'000;  ///< budget over the whole profile
};

} // namespace stepcert
