#pragma once
// What a certification run that blew up says about the problem. The run's replay (run/run.hpp)
// measured where the first NaN or infinity came from; here the step is judged at the state it
// came from. An unstable step there (h lambda outside the stability region for a decaying mode)
// makes the blow-up numerical: a shorter step cures it. A stable step leaves the model: a NaN
// from the right-hand side at a finite state, or growth along modes that grow by themselves.
// One such run proves nothing (a coarse step may reach a state where the model is undefined);
// the same failure at the same time on successive step halvings does.
#include <cmath>
#include <cstddef>
#include <limits>
#include <string>
#include <vector>

#include "stepcert/certify/certify_options.hpp"
#include "stepcert/certify/stability_check.hpp"
#include "stepcert/core/error.hpp"
#include "stepcert/core/number_text.hpp"
#include "stepcert/core/state.hpp"

namespace stepcert::detail {

struct failure_reading {
    enum class kind { model, growth, instability, unknown };
    kind what = kind::unknown;
    std::size_t steps = 0;
    double time = std::numeric_limits<double>::quiet_NaN();  ///< where the failure was first seen
    std::size_t component = 0;
    std::string message;       ///< the run's own message (with the site when it was measured)
    std::string stability;     ///< the stability verdict at the failing state, in words
    double step_limit = std::numeric_limits<double>::quiet_NaN();  ///< largest stable h found there
};

template <class P, class M>
failure_reading read_failure(const P& p, const M& m, std::size_t n, const non_finite_value& e, const certify_options& opt,
                             std::size_t& evaluations) {
    failure_reading r;
    r.steps = n;
    r.message = e.what();
    const non_finite_site* site = e.site();
    if (site == nullptr) return r;
    r.time = site->time;
    r.component = site->component;
    const bool model = site->what == non_finite_site::cause::right_hand_side;
    r.what = model ? failure_reading::kind::model : failure_reading::kind::growth;
    if (!opt.check_stability || site->states.empty()) {
        if (!model) r.what = failure_reading::kind::unknown;  // growth not judged: could be either
        return r;
    }
    using D = rebind_state<typename P::state_type, double>;
    const double h = static_cast<double>(p.t1() - p.t0()) / static_cast<double>(n);
    try {
        std::vector<D> states;
        for (const auto& y : site->states) states.push_back(convert_state<D>(y));
        const auto v = check_linear_stability(p, m, h, states, site->state_times);
        evaluations += v.rhs_evaluations;
        r.step_limit = v.limit_found ? v.step_limit : std::numeric_limits<double>::infinity();
        const std::string where = "at t = " + formatted_number(site->state_times.front(), "%.6g") +
                                  (states.size() > 1 ? " .. " + formatted_number(site->state_times.back(), "%.6g") : std::string());
        if (!v.stable) {
            r.what = failure_reading::kind::instability;
            r.stability = "h = " + formatted_number(h, "%.4g") + " is unstable " + where +
                          (v.worst ? " (lambda = " + formatted_number(v.worst->lambda.real(), "%.4g") +
                                         (v.worst->lambda.imag() != 0.0 ? " + " + formatted_number(v.worst->lambda.imag(), "%.4g") + "i" : std::string()) +
                                         " at t = " + formatted_number(v.worst->time, "%.6g") + ", |R(h lambda)| = " +
                                         formatted_number(v.worst->amplification, "%.4g") + ")"
                                   : std::string());
        } else {
            r.stability = "h = " + formatted_number(h, "%.4g") + " is stable at the " + std::to_string(states.size()) +
                          " states sampled " + where;
        }
    } catch (const error&) {
        // No Jacobian there (the model is not finite around that state) or the check cannot run:
        // a model failure stays one; a growth is not judged.
        if (!model) r.what = failure_reading::kind::unknown;
    }
    return r;
}

/// The last three readings (of runs in a row, each finer than the last) are of one kind, at
/// times that agree within four of the coarser run's steps: a failure the step cannot move.
inline bool same_failure_persists(const std::vector<failure_reading>& f, failure_reading::kind k, double length) {
    if (f.size() < 3) return false;
    for (std::size_t i = f.size() - 3; i < f.size(); ++i) {
        if (f[i].what != k || !std::isfinite(f[i].time)) return false;
        if (i > f.size() - 3) {
            const double h_coarse = length / static_cast<double>(f[i - 1].steps);
            if (f[i].steps <= f[i - 1].steps || std::abs(f[i].time - f[i - 1].time) > 4.0 * h_coarse) return false;
        }
    }
    return true;
}

} // namespace stepcert::detail
