#pragma once
// Certification of an adaptive method: the loosest controller tolerance whose run meets the
// target tolerance. The controller is asked for s * (atol, rtol) of the target, s on a ladder
// 1, 1/10, 1/100, ...; the runs' differences show whether the global error is proportional to
// a power of the controller tolerance, E(s) = C s^q (tolerance proportionality), which is checked
// by the runs, not assumed: q observed from three successive levels must be positive and agree
// with the q of the next three within proportionality_tolerance. Then, as for fixed steps,
// Richardson on the ladder (ratio 10 in s, exponent q) times the safety factor predicts s*, a run
// at s* confirms it, and the exact solution or a multiprecision reference verifies it when
// asked. The steps are the controller's, so no stability check is made: the certificate says so.
#include <algorithm>
#include <cmath>
#include <cstddef>
#include <limits>
#include <map>
#include <optional>
#include <string>
#include <vector>

#include "stepcert/certify/certificate.hpp"
#include "stepcert/certify/certify_fixed_step.hpp"
#include "stepcert/certify/certify_options.hpp"
#include "stepcert/certify/detail/grid_truth.hpp"
#include "stepcert/certify/grid_convergence_index.hpp"
#include "stepcert/core/error.hpp"
#include "stepcert/reference/reference_result.hpp"
#include "stepcert/run/run.hpp"

namespace stepcert {

namespace detail {

/// The adaptive runs of one certification, by controller scale s, within one budget.
template <class P, class M>
class adaptive_certify_runs {
public:
    using state = rebind_state<typename P::state_type, double>;

    /// Runs at s * base; base defaults to the target's own atol and rtol.
    adaptive_certify_runs(const P& p, const M& m, const weighted_norm& tol, const certify_options& opt,
                          std::optional<controller_tolerance> base = std::nullopt)
        : p_(p), m_(m), tol_(tol), opt_(opt), base_(base ? *base : controller_tolerance{tol.atol, tol.rtol}),
          times_(uniform_times{opt.output_times}.in<double>(static_cast<double>(p.t0()), static_cast<double>(p.t1()))) {}

    const trajectory<state>& at(double s) {
        auto it = runs_.find(s);
        if (it != runs_.end()) return it->second;
        run_options ro;
        ro.max_evaluations = opt_.max_evaluations - std::min(opt_.max_evaluations, evaluations_);
        if (ro.max_evaluations == 0)
            throw budget_exhausted("stepcert::certify: the evaluation budget is spent; raise max_evaluations.");
        auto run = run_adaptive<double>(p_, m_, controller_of(s), times_, ro);
        evaluations_ += run.stats.evaluations;
        return runs_.emplace(s, std::move(run)).first->second;
    }

    controller_tolerance controller_of(double s) const { return {s * base_.atol, s * base_.rtol}; }

    double difference(double a, double b) { return measure(at(a), [&](std::size_t j) { return at(b).states[j]; }); }

    template <class Truth>
    double error_against(double s, const Truth& truth) {
        return measure(at(s), [&](std::size_t j) { return truth[j - 1]; });
    }

    std::size_t evaluations() const { return evaluations_; }

private:
    template <class Other>
    double measure(const trajectory<state>& r, Other&& other) {
        return worst_on_grid(opt_.measured_at, r.states.size(), [&](std::size_t j) { return tol_(r.states[j], other(j)); });
    }

    const P& p_;
    const M& m_;
    weighted_norm tol_;
    certify_options opt_;
    controller_tolerance base_;
    std::vector<double> times_;
    std::map<double, trajectory<state>> runs_;
    std::size_t evaluations_ = 0;
};

} // namespace detail

/// The loosest controller tolerance (a multiple of tol's atol and rtol) under which adaptive
/// method m meets tol on problem p; see the top of this file.
template <problem_like P, adaptive_method M>
step_certificate certify(const P& p, const M& m, const weighted_norm& tol, const certify_options& opt = {}) {
    const std::string who = "stepcert::certify: ";
    detail::check_tolerance(tol, who);
    opt.validate(who);
    if constexpr (!has_variable_order_v<M>) {
        if (m.order() <= 0)
            throw invalid_input(who + "method '" + std::string(m.name()) + "' declares no order (order() = " +
                                std::to_string(m.order()) + "); declare its design order p >= 1.");
    }
    step_certificate c = detail::blank_certificate(p, m.name(), m.order(), tol, opt);
    c.stability.worst_mode = "not checked: the error controller chooses the steps";
    if (detail::round_off_units_at_start(p, tol, opt.round_off_factor) >= opt.target)
        return detail::refuse(c, refusal::below_round_off_floor,
                              "the tolerance is below the rounding of the initial state in double; no controller "
                              "tolerance can meet it in this scalar type: loosen it, or run a multiprecision state.");
    detail::adaptive_certify_runs<P, M> runs(p, m, tol, opt);
    auto finish = [&](step_certificate out) {
        out.evaluations = runs.evaluations();
        return out;
    };
    constexpr double K = 10.0;  // ladder ratio in s
    std::vector<double> scale, diff, exponent;
    std::optional<double> s_star;
    double q_used = std::numeric_limits<double>::quiet_NaN();
    bool plateau = false;
    try {
        for (std::size_t k = 0; k < opt.max_levels && !s_star; ++k) {
            const double s = std::pow(K, -static_cast<double>(k));
            scale.push_back(s);
            double d = std::numeric_limits<double>::infinity();
            try {
                runs.at(s);
                if (k > 0) d = runs.difference(scale[k - 1], s);
            } catch (const non_finite_value&) {
            }
            diff.push_back(d);
            exponent.push_back(k >= 2 && std::isfinite(d) && d > 0.0 && std::isfinite(diff[k - 1]) ? std::log10(diff[k - 1] / d)
                                                                                                 : std::numeric_limits<double>::quiet_NaN());
            if (k >= 2 && std::isfinite(d) && !(d < diff[k - 1]) && std::isfinite(q_used)) {
                plateau = true;
                break;
            }
            if (k < 3) continue;
            const double q1 = exponent[k - 1], q2 = exponent[k];
            if (!(q1 > 0.3) || !(q2 > 0.3) || !(std::abs(q1 - q2) <= opt.order_tolerance)) continue;
            q_used = std::min(q1, q2);
            // Band of the finest run, then the scale that meets the target (the loosest within range).
            const double band = fine_solution_error_band(d, K, q_used, opt.safety_factor);
            const double want = s * std::pow(opt.target / band, 1.0 / q_used);
            s_star = std::clamp(want, s, scale[k - 3]);  // stay inside the range where q was observed
        }
    } catch (const budget_exhausted& e) {
        return finish(detail::refuse(c, refusal::budget_exhausted, e.what()));
    }
    if (!s_star) {
        if (plateau)
            return finish(detail::refuse(c, refusal::below_round_off_floor,
                                         "the differences between successive controller tolerances stopped falling before "
                                         "the error met the tolerance (round-off plateau); loosen it, or run a multiprecision state."));
        return finish(detail::refuse(c, refusal::outside_asymptotic_range,
                                     "the global error was not seen to follow a power of the controller tolerance (tolerance "
                                     "proportionality) over " + std::to_string(scale.size()) + " decades; this controller "
                                     "cannot be certified by its tolerance on this problem."));
    }
    c.observed_order = q_used;  // for an adaptive method: the exponent of tolerance proportionality
    detail::truth_once<P> truths(p, opt.output_times, tol);
    try {
        for (int attempt = 0; attempt < 12; ++attempt) {
            const double s = *s_star;
            // Partner: the ladder level about a decade tighter (at least 3x).
            double partner = s / K;  // a new run when no ladder level is tight enough
            for (double l : scale)
                if (l <= s / 3.0) {
                    partner = l;
                    break;
                }
            double band = std::numeric_limits<double>::infinity();
            try {
                band = coarse_solution_error_band(runs.difference(s, partner), s / partner, q_used, opt.safety_factor);
            } catch (const non_finite_value&) {
            }
            if (!(band <= opt.target)) {
                s_star = s * (std::isfinite(band) ? std::pow(opt.target / band, 1.0 / q_used) / 1.05 : 0.1);
                continue;
            }
            const auto ct = runs.controller_of(s);
            c.controller_atol = ct.atol;
            c.controller_rtol = ct.rtol;
            c.steps = runs.at(s).stats.steps;
            c.estimated_error = band / opt.safety_factor;
            c.safety_factor = opt.safety_factor;
            c.error_band = band;
            c.basis = "Richardson in the controller tolerance: runs at " + detail::certificate_number(s) + " and " +
                      detail::certificate_number(partner) + " x the target tolerance, proportionality exponent " +
                      detail::certificate_number(q_used) + " (observed over " + std::to_string(scale.size()) +
                      " decades), safety factor " + detail::certificate_number(opt.safety_factor);
            c.level = evidence_level::estimated;
            if (opt.verify_with_reference) {
                if (const auto* truth = truths.get(c)) {
                    c.reference_error = runs.error_against(s, *truth);
                    if (!(c.reference_error <= 1.0)) {
                        s_star = s * std::pow(opt.target / c.reference_error, 1.0 / q_used) / 1.05;
                        c.level = evidence_level::not_certified;
                        continue;
                    }
                    c.level = evidence_level::reference_verified;
                } else if (auto refused = detail::without_truth(c, opt, truths.why())) {
                    return finish(*refused);
                }
            }
            return finish(c);
        }
    } catch (const budget_exhausted& e) {
        return finish(detail::refuse(c, refusal::budget_exhausted, e.what()));
    }
    return finish(detail::refuse(c, refusal::budget_exhausted,
                                 "no controller tolerance passed the confirmation in 12 attempts; the runs do not follow "
                                 "tolerance proportionality closely enough to be certified."));
}

/// Judges a controller tolerance the user already runs with. The truth (exact solution or
/// reference, asked for and available) decides when at hand: reference-verified. Otherwise the
/// runs at ct, ct/10 and ct/100 give the proportionality exponent q (> 0.3 required) and the
/// Richardson band of the run at ct, safety * d * 10^q / (10^q - 1), which must meet tol: estimated.
template <problem_like P, adaptive_method M>
step_certificate certify_controller_tolerance(const P& p, const M& m, controller_tolerance ct, const weighted_norm& tol,
                                              const certify_options& opt = {}) {
    const std::string who = "stepcert::certify_controller_tolerance: ";
    detail::check_tolerance(tol, who);
    opt.validate(who);
    if (!std::isfinite(ct.atol) || !std::isfinite(ct.rtol) || ct.atol < 0.0 || ct.rtol < 0.0 || (ct.atol == 0.0 && ct.rtol == 0.0))
        throw invalid_input(who + "the controller tolerances must be finite, >= 0 and not both zero.");
    step_certificate c = detail::blank_certificate(p, m.name(), m.order(), tol, opt);
    c.stability.worst_mode = "not checked: the error controller chooses the steps";
    if (detail::round_off_units_at_start(p, tol, opt.round_off_factor) >= opt.target)
        return detail::refuse(c, refusal::below_round_off_floor,
                              "the tolerance is below the rounding of the initial state in double; loosen it, or run a "
                              "multiprecision state.");
    detail::adaptive_certify_runs<P, M> runs(p, m, tol, opt, ct);
    auto finish = [&](step_certificate out) {
        out.evaluations = runs.evaluations();
        return out;
    };
    auto certified = [&](evidence_level level) {
        c.level = level;
        c.reason = refusal::none;
        c.controller_atol = ct.atol;
        c.controller_rtol = ct.rtol;
        c.steps = runs.at(1.0).stats.steps;
        return finish(c);
    };
    try {
        try {
            runs.at(1.0);
        } catch (const non_finite_value& e) {
            return finish(detail::refuse(c, refusal::non_finite, e.what()));
        }
        detail::truth_once<P> truths(p, opt.output_times, tol);
        if (opt.verify_with_reference) {
            if (const auto* truth = truths.get(c)) {
                c.reference_error = runs.error_against(1.0, *truth);
                if (!(c.reference_error <= 1.0))
                    return finish(detail::refuse(c, refusal::tolerance_not_met,
                                                 "the run's error against the reference is " +
                                                     detail::certificate_number(c.reference_error) +
                                                     " times the tolerance: tighten the controller tolerance."));
                c.basis = "measured against the reference at controller atol " + detail::certificate_number(ct.atol) +
                          ", rtol " + detail::certificate_number(ct.rtol);
                return certified(evidence_level::reference_verified);
            }
            if (opt.require_reference)
                return finish(detail::refuse(c, refusal::reference_unavailable,
                                             "the reference-verified level was required, but no reference could be had: " +
                                                 truths.why()));
        }
        double d1 = std::numeric_limits<double>::infinity(), d2 = d1;
        try {
            d1 = runs.difference(1.0, 0.1);
            d2 = runs.difference(0.1, 0.01);
        } catch (const non_finite_value& e) {
            return finish(detail::refuse(c, refusal::non_finite, e.what()));
        }
        const double q = std::log10(d1 / d2);
        c.observed_order = q;
        if (!(q > 0.3) || !std::isfinite(q))
            return finish(detail::refuse(c, refusal::outside_asymptotic_range,
                                         "the error does not fall with the controller tolerance (exponent " +
                                             detail::certificate_number(q) + " over ct, ct/10, ct/100): no estimate holds."));
        c.error_band = coarse_solution_error_band(d1, 10.0, q, opt.safety_factor);
        c.estimated_error = c.error_band / opt.safety_factor;
        c.safety_factor = opt.safety_factor;
        c.basis = "Richardson in the controller tolerance: runs at ct, ct/10 and ct/100, exponent " +
                  detail::certificate_number(q) + ", safety factor " + detail::certificate_number(opt.safety_factor) +
                  (opt.verify_with_reference ? "; no reference check: " + truths.why() : std::string());
        if (!(c.error_band <= 1.0))
            return finish(detail::refuse(c, refusal::tolerance_not_met,
                                         "the estimated error band " + detail::certificate_number(c.error_band) +
                                             " exceeds the tolerance: tighten the controller tolerance."));
        return certified(evidence_level::estimated);
    } catch (const budget_exhausted& e) {
        return finish(detail::refuse(c, refusal::budget_exhausted, e.what()));
    }
}

} // namespace stepcert
