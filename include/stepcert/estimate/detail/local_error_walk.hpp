#pragma once
// What the local error estimators share: argument checks, the refusal of multistep methods,
// and recording one step (norm, principal error function, optional vector, NaN refused).
#include <cmath>
#include <cstddef>
#include <string>
#include <string_view>
#include <type_traits>
#include <utility>
#include <vector>

#include "stepcert/core/error.hpp"
#include "stepcert/core/state.hpp"
#include "stepcert/estimate/local_error.hpp"
#include "stepcert/run/run.hpp"

namespace stepcert::detail {

template <class M>
constexpr void require_one_step_method() {
    static_assert(!is_multistep<M>::value,
                  "stepcert: this local error estimator restarts the method from a given state at every step; a "
                  "multistep method's step depends on its history, so it cannot be restarted that way. Estimate "
                  "its local error with milne_local_error_profile (Milne's device: the predictor-corrector difference) instead.");
}

/// Checks shared by the estimators, then the profile's description. order is the p of the
/// solution whose local error is estimated.
template <class P, class M>
local_error_profile start_local_error_profile(const P& p, const M& m, std::size_t n, const local_error_options& opt,
                                              local_error_estimator estimator, int order, std::string_view who) {
    require_separable_if_needed(p, m, who);
    refuse_breakpoints(p, std::string(who));
    opt.norm.validate();
    if (n == 0) throw invalid_input(std::string(who) + ": the number of steps must be at least 1.");
    if (order <= 0)
        throw invalid_input(std::string(who) + ": method '" + std::string(m.name()) +
                            "' declares no positive order (p = " + std::to_string(order) +
                            "); the local error estimate scales as h^(p+1) and needs p >= 1.");
    local_error_profile out;
    out.problem = p.name();
    out.method = std::string(m.name());
    out.estimator = estimator;
    out.order = order;
    out.power = order + 1;
    out.norm = opt.norm;
    out.steps.reserve(n);
    return out;
}

/// Appends one step: the local error `diff`, measured relative to the state `scale`.
template <class D, class S, class T>
void record_local_error(local_error_profile& out, const local_error_options& opt, const T& t, const T& h, const D& diff,
                        const S& scale, std::string_view who, double relative_uncertainty = 0.0) {
    const double estimate = out.norm.of_difference(diff, scale);
    const double td = static_cast<double>(t), hd = static_cast<double>(h);
    if (!std::isfinite(estimate))
        throw non_finite_value(std::string(who) + ": problem '" + out.problem + "', method '" + out.method +
                               "': the local error of the step from t = " + time_text(t) +
                               " is NaN or infinite (the right-hand side returned a non-finite value, or the step "
                               "is unstable); check the right-hand side there or reduce the step.");
    const double uncertainty = relative_uncertainty > 0.0 ? relative_uncertainty * out.norm.of_difference(scale, scale) : 0.0;
    out.steps.push_back({td, hd, estimate, estimate / std::pow(hd, out.power), uncertainty});
    if (opt.keep_vectors) {
        std::vector<double> v(state_size(diff));
        for (std::size_t i = 0; i < v.size(); ++i) v[i] = static_cast<double>(diff[i]);
        out.vectors.push_back(std::move(v));
    }
}

} // namespace stepcert::detail
