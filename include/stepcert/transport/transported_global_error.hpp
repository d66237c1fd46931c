#pragma once
// Global error estimate by linearized error transport: the run's local errors (step doubling,
// or any profile with vectors) carried along the variational equation, e_(j+1) = Phi_j e_j +
// tau_j (transport/error_ledger.hpp). One extra pass beside the run gives the estimated global
// error at every step, where Richardson needs a second run and gives it only at common times.
// Same result type as richardson_global_error and true_global_error, so effectivity() compares them.
#include <cstddef>
#include <string>
#include <type_traits>

#include "stepcert/core/concepts.hpp"
#include "stepcert/core/error.hpp"
#include "stepcert/estimate/global_error.hpp"
#include "stepcert/estimate/local_error.hpp"
#include "stepcert/estimate/step_doubling.hpp"
#include "stepcert/methods/method.hpp"
#include "stepcert/run/run.hpp"
#include "stepcert/transport/error_ledger.hpp"

namespace stepcert {

/// The transported error of a run at G grid times (G divides the run's steps), from its local
/// error vectors. Forward sweep only (no contributions).
template <problem_like P, class S>
global_error_estimate transported_global_error(const P& p, const trajectory<S>& run, const local_error_profile& local,
                                               const global_error_options& opt = {}) {
    constexpr const char* who = "stepcert::transported_global_error";
    const std::size_t n = local.steps.size();
    if (opt.grid_points == 0 || n % opt.grid_points != 0)
        throw invalid_input(std::string(who) + ": the grid of " + std::to_string(opt.grid_points) +
                            " points must divide the " + std::to_string(n) + " steps.");
    const error_ledger ledger = detail::sweep_error_ledger(p, run, local, opt.max_evaluations, false, who);
    global_error_estimate out;
    out.problem = ledger.problem;
    out.method = ledger.method;
    out.steps = n;
    out.declared_order = ledger.order;
    out.order_used = ledger.order;
    out.norm = ledger.norm;
    out.cost = ledger.cost;
    const std::size_t stride = n / opt.grid_points;
    for (std::size_t j = stride; j <= n; j += stride) {
        out.times.push_back(ledger.steps[j - 1].t + ledger.steps[j - 1].h);
        out.estimate.push_back(ledger.steps[j - 1].global);
    }
    if (opt.keep_vectors) out.vectors.push_back(ledger.final_error);  // only e_N is kept by the sweep
    return out;
}

/// Runs m with n uniform steps, estimates its local errors by step doubling (in the norm of opt)
/// and transports them: the whole estimate in one call. Its cost counts the run, the step
/// doubling and the Jacobians.
template <class T = void, problem_like P, fixed_step_method M>
global_error_estimate transported_global_error(const P& p, const M& m, std::size_t n, const global_error_options& opt = {}) {
    opt.norm.validate();
    if (n == 0) throw invalid_input("stepcert::transported_global_error: the number of steps must be at least 1.");
    run_options ro;
    ro.max_evaluations = opt.max_evaluations;
    const auto run = run_uniform<T>(p, m, n, 1, ro);
    local_error_options lo;
    lo.norm = opt.norm;
    lo.keep_vectors = true;
    lo.max_evaluations = opt.max_evaluations - std::min(opt.max_evaluations, run.stats.evaluations);
    const local_error_profile local = step_doubling_profile<T>(p, m, n, lo);
    global_error_options rest = opt;
    rest.max_evaluations = lo.max_evaluations - std::min(lo.max_evaluations, local.cost.evaluations);
    global_error_estimate out = transported_global_error(p, run, local, rest);
    out.cost.steps += run.stats.steps + local.cost.steps;
    out.cost.evaluations += run.stats.evaluations + local.cost.evaluations;
    return out;
}

} // namespace stepcert
