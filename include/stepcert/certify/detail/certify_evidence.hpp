#pragma once
// The evidence a fixed-step certification weighs, shared by certify and certify_step_count: the
// Richardson band of a run, the difference from a finer run (triangle inequality), the stability
// of a run, coarsening to runs already made and toward the stable step limit, coarsening against
// the truth, and the wording of each.
#include <algorithm>
#include <cmath>
#include <cstddef>
#include <limits>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "stepcert/certify/certificate.hpp"
#include "stepcert/certify/certify_options.hpp"
#include "stepcert/certify/detail/certify_runs.hpp"
#include "stepcert/certify/grid_convergence_index.hpp"
#include "stepcert/certify/stability_check.hpp"
#include "stepcert/core/error.hpp"
#include "stepcert/core/number_text.hpp"
#include "stepcert/core/problem.hpp"
#include "stepcert/methods/method.hpp"

namespace stepcert::detail {

inline std::size_t round_up_to(std::size_t n, std::size_t G) { return std::max<std::size_t>(G, (n + G - 1) / G * G); }

/// Four significant digits, for certificate texts.
inline std::string certificate_number(double x) { return formatted_number(x, "%.4g"); }

template <class P, class M>
void check_certify_arguments(const P& p, const M& m, const weighted_norm& tol, const certify_options& opt,
                             const std::string& who) {
    static_assert(!is_multistep<M>::value,
                  "stepcert::certify: multistep methods are not certified yet (their stability is not that of "
                  "one step); certify a one-step method.");
    check_tolerance(tol, who);
    opt.validate(who);
    if (m.order() <= 0)
        throw invalid_input(who + "method '" + std::string(m.name()) +
                            "' declares no order (order() = " + std::to_string(m.order()) +
                            "); certification scales errors as h^p and needs the design order p >= 1.");
    (void)p;
}

template <class P>
step_certificate blank_certificate(const P& p, std::string_view method, int order, const weighted_norm& tol,
                                   const certify_options& opt) {
    step_certificate c;
    c.problem = p.name();
    c.dimension = p.dimension();
    c.method = std::string(method);
    c.declared_order = order;
    c.t0 = static_cast<double>(p.t0());
    c.t1 = static_cast<double>(p.t1());
    c.tolerance = tol;
    c.measured_at = opt.measured_at;
    c.output_times = opt.output_times;
    for (const auto& b : breakpoints_of(p)) c.breakpoints.push_back(static_cast<double>(b));
    return c;
}

inline step_certificate refuse(step_certificate c, refusal why, std::string detail) {
    c.level = evidence_level::not_certified;
    c.evidence = order_evidence::none;
    c.limited_by = step_limited_by::none;
    c.reason = why;
    c.reason_detail = std::move(detail);
    c.steps = 0;
    c.step = std::numeric_limits<double>::quiet_NaN();
    c.controller_atol = c.controller_rtol = std::numeric_limits<double>::quiet_NaN();
    return c;
}

/// No truth at hand: a refusal when the reference-verified level was required, else the reason
/// noted in the basis (the certificate stays estimated).
inline std::optional<step_certificate> without_truth(step_certificate& c, const certify_options& opt, const std::string& why) {
    if (opt.require_reference)
        return refuse(c, refusal::reference_unavailable,
                      "the reference-verified level was required, but no reference could be had: " + why);
    c.basis += "; no reference check: " + why;
    return std::nullopt;
}

/// The round-off level of one step at y0, in tolerance units: eps |y0| per component.
template <class P>
double round_off_units_at_start(const P& p, const weighted_norm& tol, double factor) {
    using D = rebind_state<typename P::state_type, double>;
    const D y0 = convert_state<D>(p.y0());
    D e = y0;
    for (std::size_t i = 0; i < state_size(e); ++i)
        e[i] = factor * std::numeric_limits<double>::epsilon() * std::abs(y0[i]);
    return tol.of_difference(e, y0);
}

/// "take at least N steps" from a stable step limit, or "take more steps" when none is known.
inline std::string steps_for_limit(double length, double limit) {
    if (!(limit > 0.0) || !std::isfinite(limit) || !(length / limit < 1e15)) return "take more steps";
    return "take at least " + std::to_string(static_cast<std::size_t>(std::ceil(length / limit))) + " steps";
}

/// The stability of step h at the given sample states, as the certificate records it.
template <class P, class M, class S, class T>
stability_record stability_at(const P& p, const M& m, double h, const std::vector<S>& states, const std::vector<T>& times,
                              std::size_t& evaluations) {
    stability_record rec;
    rec.checked = true;
    linear_stability_verdict v;
    try {
        v = check_linear_stability(p, m, h, states, times);
    } catch (const non_finite_value& e) {
        // The run's states have grown so large that the Jacobian overflows there: an unstable run.
        rec.stable = false;
        rec.worst_mode = std::string("no finite Jacobian at the run's states (") + e.what() + ")";
        return rec;
    }
    evaluations += v.rhs_evaluations;
    rec.stable = v.stable;
    rec.margin = v.margin;
    rec.step_limit = v.step_limit;
    if (v.worst) {
        rec.worst_mode = "lambda = " + certificate_number(v.worst->lambda.real()) +
                         (v.worst->lambda.imag() != 0.0 ? " + " + certificate_number(v.worst->lambda.imag()) + "i" : std::string()) +
                         " at t = " + certificate_number(v.worst->time) + ", |R(h lambda)| = " + certificate_number(v.worst->amplification);
    } else {
        rec.worst_mode = "no decaying mode at the samples";
    }
    return rec;
}

/// The stability of the run with n steps, at its output-grid states (the run is already made).
template <class P, class M>
stability_record stability_of_run(const P& p, const M& m, certify_runs<P, M>& runs, std::size_t n,
                                  const certify_options& opt, std::size_t& evaluations) {
    if (!opt.check_stability) return {};
    const auto& r = runs.at(n);
    return stability_at(p, m, static_cast<double>(p.t1() - p.t0()) / static_cast<double>(n), r.states, r.times, evaluations);
}

/// The Richardson error band, in tolerance units, of the run with n steps from the run with
/// partner steps (grid_convergence_index.hpp: the fine or the coarse solution's band).
inline double richardson_band(double difference, std::size_t n, std::size_t partner, double order, double safety) {
    const double r = static_cast<double>(std::max(n, partner)) / static_cast<double>(std::min(n, partner));
    return n > partner ? fine_solution_error_band(difference, r, order, safety)
                       : coarse_solution_error_band(difference, r, order, safety);
}

/// The ladder run to compare N with: ratio nearest 2, at least 1.3 (a smaller ratio divides a
/// difference of the size of rounding by r^p - 1 ~ 0).
inline std::size_t richardson_partner(std::size_t n, const std::vector<std::size_t>& candidates) {
    std::size_t best = 0;
    double best_gap = std::numeric_limits<double>::infinity();
    for (std::size_t c : candidates) {
        const double r = static_cast<double>(std::max(n, c)) / static_cast<double>(std::min(n, c));
        if (r < 1.3) continue;
        const double gap = std::abs(std::log(r / 2.0));
        if (gap < best_gap) best_gap = gap, best = c;
    }
    return best;
}

/// c judged by its difference d from a finer run with fine_steps whose Richardson estimate, band
/// and basis are given: the triangle inequality at each output time bounds c's error by d plus the
/// finer run's error. One wording for certify's coarsening and certify_step_count's re-judging
/// (tests and check_certificate read "from the run with N steps").
inline void judge_from_finer_run(step_certificate& c, double d, std::size_t fine_steps, double fine_estimate,
                                 double fine_band, const std::string& fine_basis) {
    c.basis = "difference " + certificate_number(d) + " from the run with " + std::to_string(fine_steps) +
              " steps plus that run's band " + certificate_number(fine_band) + " (" + fine_basis + ")";
    c.estimated_error = d + fine_estimate;
    c.error_band = d + fine_band;
}

/// A run coarser than the certified one (c.steps, with its band) meets the tolerance if its
/// difference from that run plus that band does, by the triangle inequality at each output time;
/// nothing is assumed about the coarser run's own convergence, so it may lie before the asymptotic
/// range. Only runs already made are judged (no new evaluations but the stability check),
/// coarsest first; the taken run must be stable. Sets what limited the step: stability when a
/// coarser run was close enough but unstable, or blew up while a shorter step was stable.
template <class P, class M>
void coarsen_by_difference(const P& p, const M& m, certify_runs<P, M>& runs, step_certificate& c, const certify_options& opt,
                           std::size_t& stability_evaluations, bool coarser_blew_up_unstable) {
    const std::size_t fine = c.steps;
    bool blocked_by_stability = coarser_blew_up_unstable;
    for (const std::size_t n : runs.completed()) {
        if (n >= fine) break;
        const double d = runs.difference(n, fine);
        if (!(d + c.error_band <= opt.target)) continue;
        const stability_record st = stability_of_run(p, m, runs, n, opt, stability_evaluations);
        if (st.checked && !st.stable) {
            blocked_by_stability = true;
            continue;
        }
        judge_from_finer_run(c, d, fine, c.estimated_error, c.error_band, c.basis);
        c.steps = n;
        c.step = static_cast<double>(p.t1() - p.t0()) / static_cast<double>(n);
        c.stability = st;
        break;
    }
    c.limited_by = blocked_by_stability ? step_limited_by::stability : step_limited_by::accuracy;
}

/// A step set by stability may sit well inside the limit (the ladder doubles): the run at the
/// stable step limit found along the certified run (0.98 of it) is made and judged like the
/// coarser runs above, from the same finer run.
template <class P, class M>
void toward_stability_limit(const P& p, const M& m, certify_runs<P, M>& runs, step_certificate& c, std::size_t fine,
                            double fine_estimate, double fine_band, const std::string& fine_basis, const certify_options& opt,
                            std::size_t& stability_evaluations) {
    if (c.limited_by != step_limited_by::stability || !(c.stability.step_limit > 0.0) || !std::isfinite(c.stability.step_limit))
        return;
    const double length = static_cast<double>(p.t1() - p.t0());
    const std::size_t n = round_up_to(static_cast<std::size_t>(std::min(std::ceil(length / (0.98 * c.stability.step_limit)), 1e18)), opt.output_times);
    if (n >= c.steps) return;
    try {
        const double d = runs.difference(n, fine);
        if (!(d + fine_band <= opt.target)) return;
        const stability_record st = stability_of_run(p, m, runs, n, opt, stability_evaluations);
        if (st.checked && !st.stable) return;
        judge_from_finer_run(c, d, fine, fine_estimate, fine_band, fine_basis);
        c.basis += "; at the stable step limit found along the run";
        c.steps = n;
        c.step = length / static_cast<double>(n);
        c.stability = st;
    } catch (const non_finite_value&) {
        // The run at the limit blew up: keep the step already shown.
    }
}

/// With the truth at hand, a coarser step than the Richardson one may be shown to meet the
/// tolerance directly (before the asymptotic range, where no estimate may be trusted): N is
/// lowered by the measured error's h^p scaling, then bisected, keeping only runs that are
/// stable and meet the tolerance against the truth at every output time (or t1).
template <class P, class M, class Truth>
void coarsen_against_truth(const P& p, const M& m, certify_runs<P, M>& runs, const Truth& truth, step_certificate& c,
                           const certify_options& opt, std::size_t& stability_evaluations) {
    const std::size_t G = opt.output_times;
    const double length = static_cast<double>(p.t1() - p.t0());
    const std::size_t richardson_n = c.steps;
    const double richardson_band_value = c.error_band;
    std::size_t good = c.steps, bad = 0;
    bool bad_by_stability = false;
    double good_error = c.reference_error;
    stability_record good_stability = c.stability;
    bool unstable_failure = false;  // why the last trial failed: instability (or a blow-up), not accuracy
    auto passes = [&](std::size_t n, double& e, stability_record& st) {
        unstable_failure = true;
        try {
            e = runs.error_against(n, truth);
        } catch (const non_finite_value&) {
            return false;
        }
        // A run that misses may miss because it is unstable (growing but still finite): its
        // stability says which limit stopped the coarsening.
        st = stability_of_run(p, m, runs, n, opt, stability_evaluations);
        unstable_failure = st.checked && !st.stable;
        return e <= 1.0 && !unstable_failure;
    };
    for (int attempt = 0; attempt < 24 && good > G; ++attempt) try {
        std::size_t trial;
        if (bad == 0) {
            const double scale = std::pow(std::max(good_error, 1e-300) / 0.95, 1.0 / c.declared_order);
            trial = round_up_to(static_cast<std::size_t>(std::ceil(static_cast<double>(good) * scale)), G);
            if (trial >= good) trial = round_up_to(good / 2, G);
            if (trial >= good) break;
        } else {
            trial = round_up_to((good + bad) / 2, G);
            if (trial >= good || trial <= bad) break;
        }
        double e = 0.0;
        stability_record st;
        if (passes(trial, e, st)) {
            good = trial, good_error = e, good_stability = st;
        } else {
            bad = trial;
            bad_by_stability = unstable_failure;
        }
    } catch (const budget_exhausted&) {
        break;  // keep the step already shown to meet the tolerance
    }
    // The coarsest run that failed next to the one taken says what set the step.
    if (bad != 0) c.limited_by = bad_by_stability ? step_limited_by::stability : step_limited_by::accuracy;
    if (good == c.steps) return;
    c.steps = good;
    c.step = length / static_cast<double>(good);
    c.reference_error = good_error;
    c.stability = good_stability;
    c.estimated_error = std::numeric_limits<double>::quiet_NaN();
    c.error_band = std::numeric_limits<double>::quiet_NaN();
    c.basis = "measured against the reference at " + std::to_string(good) + " steps, coarsened from " +
              std::to_string(richardson_n) + " steps, where " + c.basis + " gave the band " +
              certificate_number(richardson_band_value);
}

} // namespace stepcert::detail
