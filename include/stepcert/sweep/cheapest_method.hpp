#pragma once
// The cheapest method for a target error, read off a sweep and then confirmed by a run.
// Per method, between two ladder points that bracket the target on a monotone piece (more
// evaluations, smaller error), log(evaluations) and log(setting) are interpolated linearly in
// log(error): the usual straight line of an asymptotic range on log–log axes. A measured point
// that already meets the target is a candidate as it is. The method with the least predicted cost
// is then run once at the predicted setting (a step count rounded up to a multiple of the output
// times; tolerances as interpolated). If that run misses the target, the setting moves in log
// steps toward the bracketing ladder point that met it, at most max_tries runs in all; the last
// try is that ladder point itself, so a deterministic method ends with the target met.
#include <algorithm>
#include <cmath>
#include <cstddef>
#include <limits>
#include <string>
#include <vector>

#include "stepcert/core/error.hpp"
#include "stepcert/core/number_text.hpp"
#include "stepcert/sweep/cost_accuracy_sweep.hpp"
#include "stepcert/sweep/sweep_point.hpp"

namespace stepcert {

struct cheapest_options {
    std::size_t max_tries = 4;  ///< confirming runs at most (>= 1)
};

/// What the sweep predicts for one method at the target.
struct method_prediction {
    std::size_t method_index = 0;
    std::string method;
    sweep_setting setting;          ///< predicted setting (step count already rounded up)
    double predicted_error = 0.0;   ///< target, or the measured error of a point taken as is
    double predicted_evaluations = 0.0;
    bool interpolated = false;      ///< false: a measured ladder point that meets the target
    sweep_setting safe_setting;     ///< the ladder point known to meet the target
};

struct cheapest_answer {
    double target = 0.0;
    method_prediction prediction;   ///< the chosen method and what the sweep predicted for it
    std::vector<method_prediction> candidates;  ///< every method that reaches the target, cheapest first
    sweep_point confirmation;       ///< the last confirming run (setting, error, evaluations, status)
    std::size_t tries = 0;          ///< confirming runs made
    bool target_met = false;        ///< confirmation.ok() and confirmation.error <= target

    const std::string& method() const { return prediction.method; }
};

namespace detail {

inline std::string setting_text(const sweep_setting& s) {
    if (s.kind == sweep_kind::fixed_step) return std::to_string(s.steps) + " steps";
    std::string t = "atol ";
    t += formatted_number(s.tolerance.atol, "%g");
    t += ", rtol ";
    t += formatted_number(s.tolerance.rtol, "%g");
    return t;
}

inline double log_lerp(double a, double b, double u) {
    if (a <= 0.0 || b <= 0.0) return b;  // a zero atol or rtol stays as the safer end has it
    return std::exp(std::log(a) + u * (std::log(b) - std::log(a)));
}

/// The setting a fraction u of the way (in logs) from a to b; step counts rounded up to a
/// multiple of G and kept within [a, b].
inline sweep_setting setting_between(const sweep_setting& a, const sweep_setting& b, double u, std::size_t G) {
    if (a.kind == sweep_kind::fixed_step) {
        const double n = log_lerp(static_cast<double>(a.steps), static_cast<double>(b.steps), u);
        std::size_t steps = static_cast<std::size_t>(std::ceil(n / static_cast<double>(G) - 1e-9)) * G;
        steps = std::clamp(steps, std::min(a.steps, b.steps), std::max(a.steps, b.steps));
        return sweep_setting::fixed(std::max(steps, G));
    }
    return sweep_setting::adaptive({log_lerp(a.tolerance.atol, b.tolerance.atol, u), log_lerp(a.tolerance.rtol, b.tolerance.rtol, u)});
}

} // namespace detail

/// Every method that reaches `target` (by a measured point or an interpolation), cheapest
/// predicted cost first. output_times is the sweep's, for rounding step counts.
inline std::vector<method_prediction> predict_at_target(const sweep_result& r, double target) {
    if (!(target > 0.0) || !std::isfinite(target))
        throw invalid_input("stepcert::cheapest_method: the target error is " + detail::formatted_number(target, "%g") +
                            "; give a finite target > 0 in the sweep's error norm.");
    std::vector<method_prediction> out;
    for (std::size_t m = 0; m < r.methods.size(); ++m) {
        std::vector<sweep_point> pts;
        for (const sweep_point& p : r.points)
            if (p.method_index == m && p.ok() && p.evaluations > 0) pts.push_back(p);
        std::stable_sort(pts.begin(), pts.end(), [](const sweep_point& a, const sweep_point& b) { return a.evaluations < b.evaluations; });
        std::vector<method_prediction> cands;
        for (std::size_t k = 0; k < pts.size(); ++k) {
            const sweep_point& b = pts[k];
            if (b.error <= target)
                cands.push_back({m, b.method, b.setting, b.error, static_cast<double>(b.evaluations), false, b.setting});
            if (k == 0) continue;
            const sweep_point& a = pts[k - 1];
            const bool monotone = a.evaluations < b.evaluations && a.error > b.error &&
                                  (a.setting.kind == sweep_kind::fixed_step ? a.setting.steps < b.setting.steps
                                                                            : a.setting.value() > b.setting.value());
            if (!monotone || !(a.error > target && target > b.error && b.error > 0.0)) continue;
            const double u0 = (std::log(target) - std::log(a.error)) / (std::log(b.error) - std::log(a.error));
            const sweep_setting s = detail::setting_between(a.setting, b.setting, u0, r.output_times);
            // Where the rounded setting sits between a and b (u = u0 for tolerances).
            const double u = s.kind == sweep_kind::fixed_step
                                 ? std::log(static_cast<double>(s.steps) / static_cast<double>(a.setting.steps)) /
                                       std::log(static_cast<double>(b.setting.steps) / static_cast<double>(a.setting.steps))
                                 : u0;
            const double evals = detail::log_lerp(static_cast<double>(a.evaluations), static_cast<double>(b.evaluations), u);
            const double err = detail::log_lerp(a.error, b.error, u);
            cands.push_back({m, b.method, s, err, evals, true, b.setting});
        }
        if (cands.empty()) continue;
        out.push_back(*std::min_element(cands.begin(), cands.end(), [](const method_prediction& x, const method_prediction& y) {
            return x.predicted_evaluations < y.predicted_evaluations;
        }));
    }
    std::stable_sort(out.begin(), out.end(), [](const method_prediction& x, const method_prediction& y) {
        return x.predicted_evaluations < y.predicted_evaluations;
    });
    if (out.empty()) {
        std::string msg = "stepcert::cheapest_method: no point of the sweep on problem '";
        msg += r.problem;
        msg += "' reaches the target error ";
        msg += detail::formatted_number(target, "%g");
        const sweep_point* best = nullptr;
        for (const sweep_point& p : r.points)
            if (p.ok() && (!best || p.error < best->error)) best = &p;
        if (best) {
            msg += "; the best reached ";
            msg += detail::formatted_number(best->error, "%.3g");
            msg += " (method '";
            msg += best->method;
            msg += "', ";
            msg += detail::setting_text(best->setting);
            msg += "). Extend the ladders (more steps, tighter tolerances) or loosen the target.";
        } else {
            msg += "; no point of the sweep ran to the end (see each point's status and message).";
        }
        throw accuracy_unreachable(msg);
    }
    return out;
}

/// The cheapest method for `target` (in the sweep's error norm), confirmed by running it:
/// `r` must be the result of sweep.run(). Throws accuracy_unreachable when no point reaches it.
template <class P>
cheapest_answer cheapest_method(cost_accuracy_sweep<P>& sweep, const sweep_result& r, double target, const cheapest_options& opt = {}) {
    if (opt.max_tries == 0)
        throw invalid_input("stepcert::cheapest_method: cheapest_options::max_tries is 0; give at least 1 confirming run.");
    if (r.methods.size() != sweep.method_count() || r.output_times != sweep.options().output_times || r.problem != sweep.problem().name())
        throw invalid_input("stepcert::cheapest_method: the sweep result does not come from this sweep (problem, methods or output "
                            "times differ); pass the result of this sweep's run().");
    cheapest_answer a;
    a.target = target;
    a.candidates = predict_at_target(r, target);
    a.prediction = a.candidates.front();
    const method_prediction& p = a.prediction;
    for (std::size_t k = 0; k < opt.max_tries; ++k) {
        // Try k sits k/(max_tries - 1) of the way (in logs) from the prediction to the safe point.
        const sweep_setting s = k == 0 ? p.setting
                                       : k + 1 == opt.max_tries
                                             ? p.safe_setting
                                             : detail::setting_between(p.setting, p.safe_setting,
                                                                       static_cast<double>(k) / static_cast<double>(opt.max_tries - 1),
                                                                       r.output_times);
        a.confirmation = sweep.run_point(p.method_index, s);
        a.tries = k + 1;
        a.target_met = a.confirmation.ok() && a.confirmation.error <= target;
        if (a.target_met) break;
    }
    return a;
}

} // namespace stepcert
