#pragma once
// Certification of a step the user already runs with: N uniform steps of a fixed-step method.
// The step must be stable. With the exact solution or a multiprecision reference (asked for and
// available) its error against that truth decides: reference-verified. Otherwise the runs with N,
// 2N and 4N steps give the observed order (it must agree with the declared one) and the
// Richardson band of the run with N steps, safety * |y_N - y_2N| 2^p / (2^p - 1), which must
// meet the tolerance: estimated. Where N is before the asymptotic range, a finer run inside it
// stands in as a reference: its difference from the run with N steps plus its own band must meet
// the tolerance. check_certificate uses it to re-judge a stored certificate.
#include <cmath>
#include <cstddef>
#include <limits>
#include <optional>
#include <string>

#include "stepcert/certify/certify_fixed_step.hpp"
#include "stepcert/certify/detail/search_ladder.hpp"

namespace stepcert {

namespace detail {

/// Richardson's evidence for the run with n steps from the runs with 2n and 4n: fills the
/// certificate's observed order, estimate, band, evidence and basis and returns "" when it holds;
/// else sets c.reason and returns why it does not (non-finite runs, round-off, outside the range).
/// As certify does: the declared order confirmed (safety factor 1.25), the observed order above
/// it (the declared order, safety factor 3), or the runs agreeing to rounding (their difference
/// plus the round-off level, safety factor 3) where that is well inside the tolerance.
template <class P, class M>
std::string judge_by_richardson(certify_runs<P, M>& runs, std::size_t n, int p_declared, const certify_options& opt,
                                step_certificate& c) {
    double d1 = 0.0, d2 = 0.0;
    try {
        d1 = runs.difference(n, 2 * n);
        d2 = runs.difference(2 * n, 4 * n);
    } catch (const non_finite_value& e) {
        c.reason = refusal::non_finite;
        return e.what();
    }
    if (!std::isfinite(d1) || !std::isfinite(d2)) {
        c.reason = refusal::non_finite;
        return "the runs with N, 2N or 4N steps are not finite.";
    }
    const double floor2 = runs.round_off_floor_units(2 * n), floor4 = runs.round_off_floor_units(4 * n);
    if (d2 <= floor4 || d1 <= floor2) {
        // The runs agree to rounding (2N and 4N at least): the run with n steps is off by about d1
        // plus the rounding level.
        const double level = std::max(floor2, floor4);
        const double band = opt.unconfirmed_safety_factor * (d1 + level);
        if (!(band <= opt.target)) {
            if (d1 <= floor2) {
                c.reason = refusal::below_round_off_floor;
                return "the runs with N, 2N and 4N steps agree to rounding (" + certificate_number(d1) + " and " +
                       certificate_number(d2) + " of the tolerance, round-off level " + certificate_number(level) +
                       "), so no run resolves the error below about " + certificate_number(band) +
                       " of the tolerance; loosen it, or run a multiprecision state.";
            }
            c.reason = refusal::tolerance_not_met;
            return "the run with N steps differs by " + certificate_number(d1) + " of the tolerance from the run with 2N steps, "
                   "which agrees with the one with 4N to rounding: with safety factor " +
                   certificate_number(opt.unconfirmed_safety_factor) + " the band " + certificate_number(band) +
                   " exceeds the tolerance; take more steps.";
        }
        c.estimated_error = d1 + level;
        c.safety_factor = opt.unconfirmed_safety_factor;
        c.error_band = band;
        c.evidence = order_evidence::round_off_plateau;
        c.basis = "round-off plateau: the runs with " + std::to_string(n) + ", " + std::to_string(2 * n) + " and " +
                  std::to_string(4 * n) + " steps differ by " + certificate_number(d1) + " and " + certificate_number(d2) +
                  ", the finer pair within the round-off level " + certificate_number(level) +
                  " (tolerance units): estimated at the first difference plus that level, safety factor " +
                  certificate_number(opt.unconfirmed_safety_factor);
        return "";
    }
    const double observed = std::log2(d1 / d2);
    c.observed_order = observed;
    const bool confirmed = std::abs(observed - p_declared) <= opt.order_tolerance;
    bool above = false;
    if (!confirmed && observed > p_declared + opt.order_tolerance) {
        // One reading above is no evidence yet (readings approach the declared order from above
        // before the asymptotic range): the run with 8N steps must show it steady, or be down at
        // rounding (the readings then stayed above across the whole usable range).
        try {
            const double d3 = runs.difference(4 * n, 8 * n);
            above = d3 <= runs.round_off_floor_units(8 * n) || steady_above(observed, std::log2(d2 / d3), p_declared, opt.order_tolerance);
        } catch (const non_finite_value&) {
        }
    }
    if (!confirmed && !above) {
        c.reason = refusal::outside_asymptotic_range;
        return "the order observed on N, 2N, 4N steps is " + certificate_number(observed) + ", not within " +
               certificate_number(opt.order_tolerance) + " of the declared " + std::to_string(p_declared) +
               " nor above it: the step is outside the asymptotic range, so Richardson's estimate does not hold; take more steps.";
    }
    const double p_used = confirmed ? std::min(observed, static_cast<double>(p_declared)) : p_declared;
    const double safety = confirmed ? opt.safety_factor : opt.unconfirmed_safety_factor;
    c.evidence = confirmed ? order_evidence::declared_confirmed : order_evidence::above_declared;
    c.error_band = richardson_band(d1, n, 2 * n, p_used, safety);
    c.estimated_error = c.error_band / safety;
    c.safety_factor = safety;
    c.basis = "Richardson: runs with " + std::to_string(n) + ", " + std::to_string(2 * n) + " and " + std::to_string(4 * n) +
              " steps, order " + certificate_number(p_used) + " (observed " + certificate_number(observed) +
              (confirmed ? std::string(")") : std::string(", above the declared: the declared order is used)")) +
              ", safety factor " + certificate_number(safety);
    return "";
}

/// Before the asymptotic range Richardson says nothing about the run with n steps, but a finer
/// run m = 2^j n inside the range does (its runs m, 2m, 4m show the order), and then
/// |y_n - y_m| + band(m) bounds the error of y_n at each output time (triangle inequality), as
/// certify's coarsening does. Fills c and returns "" when such an m is found within
/// finer_levels doublings, else returns why not (c.reason set).
template <class P, class M>
std::string judge_by_finer_run(certify_runs<P, M>& runs, std::size_t n, int p_declared, const certify_options& opt,
                               step_certificate& c, std::string why_not) {
    constexpr int finer_levels = 10;
    std::size_t m = n;
    for (int j = 1; j <= finer_levels; ++j) {
        m *= 2;
        step_certificate f = c;
        const std::string problem = judge_by_richardson(runs, m, p_declared, opt, f);
        if (!problem.empty()) {
            if (f.reason != refusal::outside_asymptotic_range) return c.reason = f.reason, problem;
            continue;
        }
        double d = std::numeric_limits<double>::infinity();
        try {
            d = runs.difference(n, m);
        } catch (const non_finite_value&) {
        }
        c.reason = refusal::none;
        c.observed_order = f.observed_order;
        c.safety_factor = f.safety_factor;
        c.evidence = f.evidence;
        judge_from_finer_run(c, d, m, f.estimated_error, f.error_band, f.basis);
        return "";
    }
    c.reason = refusal::outside_asymptotic_range;
    return why_not + " Nor did the runs up to " + std::to_string(m) + " steps show the declared order, so no finer run "
                     "can stand in as a reference.";
}

} // namespace detail

template <problem_like P, fixed_step_method M>
step_certificate certify_step_count(const P& p, const M& m, std::size_t n, const weighted_norm& tol,
                                    const certify_options& opt = {}) {
    const std::string who = "stepcert::certify_step_count: ";
    detail::check_certify_arguments(p, m, tol, opt, who);
    const std::size_t G = opt.output_times;
    if (n == 0 || n % G != 0)
        throw invalid_input(who + "the step count " + std::to_string(n) + " must be >= 1 and a multiple of the " +
                            std::to_string(G) + " output times (set output_times to a divisor of it).");
    const double length = static_cast<double>(p.t1() - p.t0());
    const int p_declared = m.order();
    step_certificate c = detail::blank_certificate(p, m.name(), p_declared, tol, opt);
    if (detail::round_off_units_at_start(p, tol, opt.round_off_factor) >= opt.target)
        return detail::refuse(c, refusal::below_round_off_floor,
                              "the tolerance is below the rounding of the initial state in double; no step can meet it "
                              "in this scalar type: loosen it, or run a multiprecision state (e.g. float128).");
    detail::certify_runs<P, M> runs(p, m, tol, opt);
    std::size_t stability_evaluations = 0;
    auto finish = [&](step_certificate out) {
        out.evaluations = runs.evaluations() + stability_evaluations;
        return out;
    };
    try {
        try {
            // Stability first: an unstable step's errors are no evidence of anything.
            runs.at(n);
        } catch (const non_finite_value& e) {
            const auto fr = detail::read_failure(p, m, n, e, opt, stability_evaluations);
            if (fr.what == detail::failure_reading::kind::instability)
                return finish(detail::refuse(c, refusal::unstable,
                                             "the run blew up from an unstable step: " + fr.stability + ". " + fr.message +
                                                 (std::isfinite(fr.step_limit) ? " The stable step there is at most " +
                                                      detail::certificate_number(fr.step_limit) + ": " +
                                                      detail::steps_for_limit(length, fr.step_limit) + "."
                                                                               : std::string())));
            return finish(detail::refuse(c, refusal::non_finite, fr.message));
        }
        c.stability = detail::stability_of_run(p, m, runs, n, opt, stability_evaluations);
        if (c.stability.checked && !c.stability.stable)
            return finish(detail::refuse(
                c, refusal::unstable,
                "h = " + detail::certificate_number(length / static_cast<double>(n)) +
                    " puts h lambda outside the method's stability region (" + c.stability.worst_mode +
                    "); the largest stable step found is " + detail::certificate_number(c.stability.step_limit) + ": " +
                    detail::steps_for_limit(length, c.stability.step_limit) + "."));
        // With the truth at hand it decides; Richardson is then only reported (when it holds).
        detail::truth_once<P> truths(p, G, tol);
        const auto* truth = opt.verify_with_reference ? truths.get(c) : nullptr;
        if (truths.non_finite()) return finish(detail::refuse_non_finite_reference(c, truths.why()));
        if (truth) {
            c.reference_error = runs.error_against(n, *truth);
            if (!(c.reference_error <= 1.0))
                return finish(detail::refuse(c, refusal::tolerance_not_met,
                                             "the run's error against the reference is " +
                                                 detail::certificate_number(c.reference_error) +
                                                 " times the tolerance: this step does not meet it; take more steps."));
        }
        std::string richardson_problem = detail::judge_by_richardson(runs, n, p_declared, opt, c);
        if (truth) {
            c.reason = refusal::none;
            c.steps = n;
            c.step = length / static_cast<double>(n);
            c.level = evidence_level::reference_verified;
            c.basis = "measured against the reference at " + std::to_string(n) + " steps" +
                      (richardson_problem.empty() ? "; " + c.basis : "; Richardson not applicable: " + richardson_problem);
            return finish(c);
        }
        if (opt.verify_with_reference && opt.require_reference)
            return finish(detail::refuse(c, refusal::reference_unavailable,
                                         "the reference-verified level was required, but no reference could be had: " + truths.why()));
        if (c.reason == refusal::outside_asymptotic_range)
            richardson_problem = detail::judge_by_finer_run(runs, n, p_declared, opt, c, richardson_problem);
        if (!richardson_problem.empty()) return finish(detail::refuse(c, c.reason, richardson_problem));
        if (!(c.error_band <= 1.0)) {
            c.evidence = order_evidence::none;
            return finish(detail::refuse(c, refusal::tolerance_not_met,
                                         "the estimated error band " + detail::certificate_number(c.error_band) +
                                             " exceeds the tolerance: this step does not meet it; take more steps."));
        }
        c.steps = n;
        c.step = length / static_cast<double>(n);
        c.level = evidence_level::estimated;
        if (opt.verify_with_reference) c.basis += "; no reference check: " + truths.why();
        return finish(c);
    } catch (const budget_exhausted& e) {
        return finish(detail::refuse(c, refusal::budget_exhausted, e.what()));
    }
}

} // namespace stepcert
