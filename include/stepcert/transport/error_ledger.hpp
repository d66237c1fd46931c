#pragma once
// The error ledger of a fixed-step run: where the global error at the final time is made. With
// tau_j the local error of step j (from t_j to t_(j+1)) and Phi_j the step's linearized
// propagator (transport/step_propagator.hpp), the global error obeys, to first order,
//   e_(j+1) = Phi_j e_j + tau_j,   e_0 = 0
// (propagated error plus fresh local error; E. Hairer, S. P. Nørsett, G. Wanner, Solving ODEs I,
// §II.3, the "Lady Windermere's fan" argument — from memory), hence
//   e_N = sum_j c_j,   c_j = Phi_(N-1) ... Phi_(j+1) tau_j,
// the contribution of step j: its local error as it arrives at t1. The forward sweep gives the
// transported global error along the whole run; a backward sweep of the propagator products gives
// the contributions. Both are linearized estimates: as good as the local errors fed in (true
// ones from the reference, or an estimator's) and the first-order transport.
// Cost: one right-hand side evaluation per state for the slopes, two Jacobians per step (each 2n
// evaluations when differenced), and O(n^3) work per step for the products; memory N n^2 doubles
// for the propagators when contributions are wanted.
#include <algorithm>
#include <cmath>
#include <cstddef>
#include <limits>
#include <string>
#include <vector>

#include <Eigen/Dense>

#include "stepcert/core/concepts.hpp"
#include "stepcert/core/error.hpp"
#include "stepcert/core/norm.hpp"
#include "stepcert/core/state.hpp"
#include "stepcert/estimate/local_error.hpp"
#include "stepcert/methods/method.hpp"
#include "stepcert/run/run.hpp"
#include "stepcert/run/trajectory.hpp"
#include "stepcert/transport/jacobian.hpp"
#include "stepcert/transport/step_propagator.hpp"

namespace stepcert {

/// One step of the ledger. Sizes are weighted norms: fresh, propagated and global scaled by the
/// state at the step's end, contribution by the final state.
struct ledger_step {
    double t = 0.0;             ///< start of the step
    double h = 0.0;             ///< its length
    double fresh = 0.0;         ///< |tau_j|: the local error committed in this step
    double propagated = 0.0;    ///< |Phi_j e_j|: the error carried in from the earlier steps
    double global = 0.0;        ///< |e_(j+1)| = |Phi_j e_j + tau_j|: the transported global error at t + h
    double contribution = 0.0;  ///< |c_j|: this step's local error as it arrives at t1
    /// Signed part of the final error, <c_j, e_N> / <e_N, e_N> in the norm's weights: the shares
    /// add up to 1; a negative share cancels error made elsewhere. NaN when e_N is exactly 0.
    double share = 0.0;
};

struct error_ledger {
    std::string problem;
    std::string method;
    std::string local_source;  ///< which local errors were fed in (estimator name)
    std::string jacobian_how;  ///< how the Jacobian was formed
    int order = 0;             ///< order p of the method
    int power = 0;             ///< local errors scale as h^power (p + 1)
    weighted_norm norm;
    std::vector<ledger_step> steps;
    /// c_j per step (empty when only the forward sweep was asked for).
    std::vector<std::vector<double>> contributions;
    std::vector<double> final_error;  ///< e_N = sum of the contributions (the transported error at t1)
    std::vector<double> final_state;  ///< y_N, which scales the contributions
    double final_size = 0.0;          ///< |e_N|
    run_stats cost;                   ///< evaluations spent on slopes and Jacobians (not the run's)

    double t0() const { return steps.empty() ? 0.0 : steps.front().t; }
    double t1() const { return steps.empty() ? 0.0 : steps.back().t + steps.back().h; }
};

namespace detail {

inline std::vector<double> to_std(const Eigen::VectorXd& v) { return {v.data(), v.data() + v.size()}; }

/// Checks that run and local errors describe the same steps, then runs the sweeps.
template <problem_like P, class S>
error_ledger sweep_error_ledger(const P& p, const trajectory<S>& run, const local_error_profile& local,
                                std::size_t max_evaluations, bool with_contributions, const char* who_c) {
    const std::string who = std::string(who_c) + ": ";
    using D = rebind_state<typename P::state_type, double>;
    static_assert(P::template rhs_accepts<double>,
                  "stepcert: the error transport evaluates the right-hand side in double (slopes for the midpoint "
                  "state, and the Jacobian by differences); make the right-hand side accept double states.");
    const std::size_t N = local.steps.size();
    if (N == 0) throw invalid_input(who + "the local error profile has no steps.");
    if (local.vectors.size() != N)
        throw invalid_input(who + "the local error profile holds no error vectors; compute it with "
                                  "local_error_options::keep_vectors = true (the transport needs directions, not only sizes).");
    if (run.states.size() != N + 1)
        throw invalid_input(who + "the run has " + std::to_string(run.states.size()) + " states; the ledger needs the state "
                                  "at every step (" + std::to_string(N + 1) + "): run it with output stride 1.");
    const std::size_t n = state_size(run.states.front());
    for (std::size_t j = 0; j < N; ++j) {
        const double t = static_cast<double>(run.times[j]);
        const double h = static_cast<double>(run.times[j + 1]) - t;
        const double slack = 1e-9 * std::max({1.0, std::abs(t), std::abs(h)});
        if (std::abs(local.steps[j].t - t) > slack || std::abs(local.steps[j].h - h) > slack)
            throw invalid_input(who + "step " + std::to_string(j) + " of the local errors starts at t = " +
                                time_text(local.steps[j].t) + " but the run's at t = " + time_text(t) +
                                "; feed local errors of the same grid as the run.");
        if (local.vectors[j].size() != n)
            throw invalid_input(who + "the local error vector of step " + std::to_string(j) + " has " +
                                std::to_string(local.vectors[j].size()) + " components, the state " + std::to_string(n) + ".");
    }
    if (with_contributions && static_cast<double>(N) * static_cast<double>(n * n) > 5e7)
        throw invalid_input(who + std::to_string(N) + " steps of a " + std::to_string(n) +
                                  "-component state need more than 400 MB of propagators for the contributions; use "
                                  "fewer steps, or transported_global_error (forward sweep only).");

    error_ledger out;
    out.problem = p.name();
    out.method = local.method;
    out.local_source = estimator_name(local.estimator);
    out.jacobian_how = jacobian_source(p);
    out.order = local.order;
    out.power = local.power;
    out.norm = local.norm;
    out.steps.resize(N);
    const auto dim = static_cast<Eigen::Index>(n);
    const std::size_t per_jacobian = jacobian_evaluations(p, n);
    auto spend = [&](std::size_t evaluations) {
        out.cost.evaluations += evaluations;
        if (out.cost.evaluations > max_evaluations)
            throw budget_exhausted(who + "the evaluation budget of " + std::to_string(max_evaluations) +
                                   " was spent on slopes and Jacobians before the last step; raise max_evaluations.");
    };
    auto state_d = [&](std::size_t j) { return convert_state<D>(run.states[j]); };
    auto slope = [&](const D& y, double t) {
        D f = state_traits<D>::make(n);
        p.rhs()(y, f, t);
        spend(1);
        return f;
    };
    std::vector<Eigen::MatrixXd> propagators;
    if (with_contributions) propagators.reserve(N);

    D y0 = state_d(0);
    D f0 = slope(y0, static_cast<double>(run.times[0]));
    spend(per_jacobian);
    Eigen::MatrixXd j0 = jacobian_at(p, y0, static_cast<double>(run.times[0]));
    Eigen::VectorXd e = Eigen::VectorXd::Zero(dim);
    std::vector<double> tmp(n);
    for (std::size_t j = 0; j < N; ++j) {
        const double t = static_cast<double>(run.times[j]);
        const double t_end = static_cast<double>(run.times[j + 1]);
        const double h = t_end - t;
        const D y1 = state_d(j + 1);
        const D f1 = slope(y1, t_end);
        D ym = y1;
        for (std::size_t i = 0; i < n; ++i) ym[i] = 0.5 * (y0[i] + y1[i]) + h * (f0[i] - f1[i]) / 8.0;
        spend(2 * per_jacobian);
        const Eigen::MatrixXd jm = jacobian_at(p, ym, t + 0.5 * h);
        const Eigen::MatrixXd j1 = jacobian_at(p, y1, t_end);
        Eigen::MatrixXd phi = rk4_propagator(j0, jm, j1, h);
        const Eigen::VectorXd carried = phi * e;
        const Eigen::VectorXd tau = Eigen::Map<const Eigen::VectorXd>(local.vectors[j].data(), dim);
        e = carried + tau;
        ledger_step& s = out.steps[j];
        s.t = t;
        s.h = h;
        s.fresh = local.norm.of_difference(local.vectors[j], y1);
        s.propagated = local.norm.of_difference(to_std(carried), y1);
        s.global = local.norm.of_difference(to_std(e), y1);
        if (!std::isfinite(s.global))
            throw non_finite_value(who + "the transported error became NaN or infinite at t = " + time_text(t_end) +
                                   " (a non-finite Jacobian or local error); check the right-hand side there.");
        if (with_contributions) propagators.push_back(std::move(phi));
        y0 = y1;
        f0 = f1;
        j0 = j1;
    }
    out.cost.steps = N;
    out.final_error = to_std(e);
    out.final_state = convert_state<std::vector<double>>(state_d(N));
    out.final_size = local.norm.of_difference(out.final_error, out.final_state);
    if (!with_contributions) return out;

    // Backward sweep: M = Phi_(N-1) ... Phi_(j+1), so c_j = M tau_j.
    Eigen::VectorXd w2(dim);  // squared weights of the norm at the final state
    for (Eigen::Index i = 0; i < dim; ++i) {
        const double wi = 1.0 / (out.norm.atol + out.norm.rtol * std::abs(out.final_state[static_cast<std::size_t>(i)]));
        w2(i) = wi * wi;
    }
    const Eigen::VectorXd eN = Eigen::Map<const Eigen::VectorXd>(out.final_error.data(), dim);
    const double denominator = eN.dot(w2.cwiseProduct(eN));
    out.contributions.resize(N);
    Eigen::MatrixXd M = Eigen::MatrixXd::Identity(dim, dim);
    for (std::size_t k = N; k-- > 0;) {
        const Eigen::VectorXd c = M * Eigen::Map<const Eigen::VectorXd>(local.vectors[k].data(), dim);
        out.contributions[k] = to_std(c);
        out.steps[k].contribution = out.norm.of_difference(out.contributions[k], out.final_state);
        out.steps[k].share = denominator > 0.0 ? c.dot(w2.cwiseProduct(eN)) / denominator
                                               : std::numeric_limits<double>::quiet_NaN();
        M = M * propagators[k];
    }
    return out;
}

} // namespace detail

/// The ledger of a run: `run` holds the state at every step (run_uniform with stride 1, or
/// run_on_grid), `local` the local error vectors of the same steps (keep_vectors), from an
/// estimator or from true_local_error_profile. max_evaluations bounds the slopes and Jacobians.
template <problem_like P, class S>
error_ledger build_error_ledger(const P& p, const trajectory<S>& run, const local_error_profile& local,
                                std::size_t max_evaluations = 50'000'000) {
    return detail::sweep_error_ledger(p, run, local, max_evaluations, true, "stepcert::build_error_ledger");
}

} // namespace stepcert
