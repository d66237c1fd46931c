#pragma once
// Global error bounds from local errors carried forward by the problem's dynamics. With local
// errors tau_k (per step, in some norm) and a growth rate r such that two solutions of the ODE
// separate no faster than e^{r t} in that norm, the global error after step n obeys
//   E_n <= e^{r h_n} E_{n-1} + tau_n,   E_0 = 0,
// i.e. E_n <= sum_k tau_k e^{r (t_n - t_k)} ("Lady Windermere's fan": E. Hairer, S. P. Nørsett,
// G. Wanner, Solving ODEs I, §II.3, Thm 3.4 — from memory). r is either
//   * a Lipschitz constant L of f (r = L > 0): the classic bound, which for uniform steps and
//     tau_k <= tau is at most (tau / h)(e^{L(t_n - t_0)} - 1)/L;
//   * an upper bound mu of the logarithmic norm of the Jacobian along the solutions (Dahlquist
//     1959; Hairer, Nørsett, Wanner I, §I.10, Thm 10.6 — from memory), which may be negative on
//     dissipative problems, where the Lipschitz bound grows exponentially for nothing.
// The recursion is used as is (not the closed form), so it holds for any sign of r and for
// local errors that vary from step to step; each local error enters with its recorded
// uncertainty (for true local errors: the reference's). The bound is rigorous when its inputs are: a growth
// rate given by the user that holds along and between the solutions, and true local errors
// (true_local_error_profile, within its reference's vouched digits). With an estimated rate or
// estimated local errors it is labelled estimated.
#include <algorithm>
#include <cmath>
#include <cstddef>
#include <limits>
#include <string>
#include <vector>

#include "stepcert/core/error.hpp"
#include "stepcert/estimate/effectivity.hpp"
#include "stepcert/estimate/global_error.hpp"
#include "stepcert/estimate/local_error.hpp"

namespace stepcert {

enum class growth_kind { lipschitz, logarithmic_norm };

/// A growth rate and where it came from.
struct growth_rate {
    growth_kind kind = growth_kind::logarithmic_norm;
    double value = 0.0;
    bool given = true;  ///< true: a bound supplied by the user; false: estimated along the run
};

struct global_error_bound {
    std::string problem;
    std::string method;
    growth_rate growth;
    bool rigorous = false;  ///< every input is a bound (see the header comment); else "estimated"
    std::string basis;      ///< what it rests on, in words
    std::vector<double> times;  ///< step ends
    std::vector<double> bound;  ///< bound on the global error there, in the local errors' norm

    double at_end() const { return bound.empty() ? 0.0 : bound.back(); }
    double largest() const {
        double m = 0.0;
        for (double b : bound) m = std::max(m, b);
        return m;
    }
};

/// Carries the local errors of `local` forward with growth rate `rate`.
inline global_error_bound transported_error_bound(const local_error_profile& local, const growth_rate& rate) {
    const std::string who = "stepcert::transported_error_bound: ";
    if (!std::isfinite(rate.value))
        throw invalid_input(who + "the growth rate must be finite (got " + std::to_string(rate.value) + ").");
    if (rate.kind == growth_kind::lipschitz && !(rate.value > 0.0))
        throw invalid_input(who + "a Lipschitz constant must be > 0 (got " + std::to_string(rate.value) +
                            "); for a contracting problem give a logarithmic norm instead, which may be negative.");
    if (local.norm.rtol != 0.0)
        throw invalid_input(who + "the local errors were measured with a relative part (rtol = " +
                            std::to_string(local.norm.rtol) +
                            "), whose weights change along the run; growth rates hold for a fixed norm: use rtol = 0.");
    if (local.steps.empty()) throw invalid_input(who + "the local error profile has no steps.");
    global_error_bound out;
    out.problem = local.problem;
    out.method = local.method;
    out.growth = rate;
    const bool truth = local.estimator == local_error_estimator::reference_truth;
    out.rigorous = rate.given && truth;
    out.basis = std::string(rate.kind == growth_kind::lipschitz ? "Lipschitz constant L = " : "logarithmic norm bound mu = ") +
                std::to_string(rate.value) + (rate.given ? " (given)" : " (estimated along the run)") + "; local errors: " +
                estimator_name(local.estimator) + (truth ? "" : " (estimated)");
    // Each step's sum is rounded up by 16 eps, which covers the rounding of the recursion and of
    // the norms, so a bound built on true local errors never falls below the error by rounding.
    const double inflation = 1.0 + 16.0 * std::numeric_limits<double>::epsilon();
    double e = 0.0;
    for (const auto& s : local.steps) {
        if (!std::isfinite(s.estimate)) throw non_finite_value(who + "a local error in the profile is not finite.");
        e = (std::exp(rate.value * s.h) * e + s.estimate + s.uncertainty) * inflation;
        out.times.push_back(s.t + s.h);
        out.bound.push_back(e);
    }
    return out;
}

/// The classic bound with a Lipschitz constant L > 0 of f in the profile's norm.
inline global_error_bound lipschitz_error_bound(const local_error_profile& local, double lipschitz, bool given = true) {
    return transported_error_bound(local, {growth_kind::lipschitz, lipschitz, given});
}

/// The bound with an upper bound mu of the logarithmic norm of the Jacobian (any sign).
inline global_error_bound log_norm_error_bound(const local_error_profile& local, double mu, bool given = true) {
    return transported_error_bound(local, {growth_kind::logarithmic_norm, mu, given});
}

/// Effectivity of a bound against the true global error (true_global_error) at the truth's grid
/// times, each of which must be one of the bound's step ends: bound / true error, which is at
/// least 1 wherever the bound holds; how far above 1 says how pessimistic it is.
inline effectivity_summary effectivity(const global_error_bound& bound, const global_error_estimate& truth, double floor = 0.0) {
    const std::string who = "stepcert::effectivity: ";
    detail::check_floor(floor, who);
    std::vector<double> at;
    std::size_t k = 0;
    for (double t : truth.times) {
        while (k < bound.times.size() && bound.times[k] < t - 1e-9 * std::max(1.0, std::abs(t))) ++k;
        if (k == bound.times.size() || std::abs(bound.times[k] - t) > 1e-9 * std::max(1.0, std::abs(t)))
            throw invalid_input(who + "the true error's time " + std::to_string(t) +
                                " is not a step end of the bound; compare a bound and a truth of the same run.");
        at.push_back(bound.bound[k]);
    }
    return detail::ratio_summary(at, truth.estimate, floor);
}

} // namespace stepcert
