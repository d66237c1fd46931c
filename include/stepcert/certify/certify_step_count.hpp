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

namespace stepcert {

namespace detail {

/// Richardson's evidence for the run with n steps from the runs with 2n and 4n: fills the
/// certificate's observed order, estimate, band and basis and returns "" when it holds; else
/// sets c.reason and returns why it does not (non-finite runs, round-off, outside the range).
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
    if (d2 <= runs.round_off_floor_units(4 * n) || d1 <= runs.round_off_floor_units(2 * n)) {
        c.reason = refusal::below_round_off_floor;
        return "the runs with N, 2N and 4N steps differ by no more than their rounding: the error is not measurable in "
               "double at this tolerance; loosen it, or run a multiprecision state.";
    }
    const double observed = std::log2(d1 / d2);
    c.observed_order = observed;
    if (!(std::abs(observed - p_declared) <= opt.order_tolerance)) {
        c.reason = refusal::outside_asymptotic_range;
        return "the order observed on N, 2N, 4N steps is " + certificate_number(observed) + ", not within " +
               certificate_number(opt.order_tolerance) + " of the declared " + std::to_string(p_declared) +
               ": the step is outside the asymptotic range, so Richardson's estimate does not hold; take more steps.";
    }
    const double p_used = std::min(observed, static_cast<double>(p_declared));
    c.error_band = richardson_band(d1, n, 2 * n, p_used, opt.safety_factor);
    c.estimated_error = c.error_band / opt.safety_factor;
    c.safety_factor = opt.safety_factor;
    c.basis = "Richardson: runs with " + std::to_string(n) + ", " + std::to_string(2 * n) + " and " + std::to_string(4 * n) +
              " steps, order " + certificate_number(p_used) + " (observed " + certificate_number(observed) +
              "), safety factor " + certificate_number(opt.safety_factor);
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
        c.safety_factor = opt.safety_factor;
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
            return finish(detail::refuse(c, refusal::non_finite, e.what()));
        }
        c.stability = detail::stability_of_run(p, m, runs, n, opt, stability_evaluations);
        if (c.stability.checked && !c.stability.stable)
            return finish(detail::refuse(
                c, refusal::unstable,
                "h = " + detail::certificate_number(length / static_cast<double>(n)) +
                    " puts h lambda outside the method's stability region (" + c.stability.worst_mode +
                    "); the largest stable step found is " + detail::certificate_number(c.stability.step_limit) + ": take at least " +
                    std::to_string(static_cast<std::size_t>(std::ceil(length / c.stability.step_limit))) + " steps."));
        // With the truth at hand it decides; Richardson is then only reported (when it holds).
        detail::truth_once<P> truths(p, G, tol);
        const auto* truth = opt.verify_with_reference ? truths.get(c) : nullptr;
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
        if (!(c.error_band <= 1.0))
            return finish(detail::refuse(c, refusal::tolerance_not_met,
                                         "the estimated error band " + detail::certificate_number(c.error_band) +
                                             " exceeds the tolerance: this step does not meet it; take more steps."));
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
