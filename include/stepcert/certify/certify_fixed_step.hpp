#pragma once
// Certification of a fixed-step method's step for a tolerance (needs Eigen, for the stability
// check). certify(p, m, tol) finds the largest uniform step h = (t1 - t0) / N whose error meets
// tol (a weighted norm; <= 1 is met) at every output time or at t1; certify_step_count(p, m, N,
// tol) judges a step the user already runs with. Both return a step_certificate; bad arguments
// throw, while a step that cannot be certified gives a certificate at level not_certified with
// the reason.
//
// The search doubles N from a coarse start (the stability limit at y0, or a few steps) until
// three successive runs show the declared order (observed within order_tolerance) above the
// round-off floor: the asymptotic range. Once a prediction says N* lies past the last run, the
// next run is aimed at it rather than doubled. The Richardson estimate of the finest run's error,
// times the Grid Convergence Index safety factor (P. J. Roache 1998; I. B. Celik et al., J. Fluids
// Eng. 130(7) 078001, 2008), certifies that run, or predicts N* past it with C h^p scaling and
// one more run confirms it. A coarser run already made is then taken if its difference from the
// certified run plus that run's band meets the target (triangle inequality: nothing is assumed
// about the coarser run, which may lie before the asymptotic range). Its stability is checked
// (h lambda inside the method's region for every decaying eigenvalue sampled along the run), and,
// when asked and possible, its error is measured against the exact solution or a multiprecision
// reference, which may then show a still coarser step meets the tolerance.
#include <algorithm>
#include <cmath>
#include <cstdio>
#include <cstddef>
#include <limits>
#include <optional>
#include <string>
#include <vector>

#include "stepcert/certify/certificate.hpp"
#include "stepcert/certify/certify_options.hpp"
#include "stepcert/certify/detail/certify_runs.hpp"
#include "stepcert/certify/detail/grid_truth.hpp"
#include "stepcert/certify/grid_convergence_index.hpp"
#include "stepcert/certify/stability_check.hpp"
#include "stepcert/core/concepts.hpp"
#include "stepcert/core/error.hpp"
#include "stepcert/core/number_text.hpp"
#include "stepcert/core/problem.hpp"
#include "stepcert/methods/method.hpp"
#include "stepcert/study/richardson.hpp"

namespace stepcert {

namespace detail {

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
    return c;
}

inline step_certificate refuse(step_certificate c, refusal why, std::string detail) {
    c.level = evidence_level::not_certified;
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

/// The stability of step h at the given sample states, as the certificate records it.
template <class P, class M, class S, class T>
stability_record stability_at(const P& p, const M& m, double h, const std::vector<S>& states, const std::vector<T>& times,
                              std::size_t& evaluations) {
    const auto v = check_linear_stability(p, m, h, states, times);
    evaluations += v.rhs_evaluations;
    stability_record rec;
    rec.checked = true;
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

/// A run coarser than the certified one (c.steps, with its Richardson band) meets the tolerance
/// if its difference from that run plus that band does, by the triangle inequality at each
/// output time; nothing is assumed about the coarser run's own convergence, so it may lie before
/// the asymptotic range. Only runs already made are judged (no new evaluations but the stability
/// check), coarsest first; the taken run must be stable.
template <class P, class M>
void coarsen_by_difference(const P& p, const M& m, certify_runs<P, M>& runs, step_certificate& c, const certify_options& opt,
                           std::size_t& stability_evaluations) {
    const std::size_t fine = c.steps;
    for (const std::size_t n : runs.completed()) {
        if (n >= fine) break;
        const double d = runs.difference(n, fine);
        if (!(d + c.error_band <= opt.target)) continue;
        const stability_record st = stability_of_run(p, m, runs, n, opt, stability_evaluations);
        if (st.checked && !st.stable) continue;
        judge_from_finer_run(c, d, fine, c.estimated_error, c.error_band, c.basis);
        c.steps = n;
        c.step = static_cast<double>(p.t1() - p.t0()) / static_cast<double>(n);
        c.stability = st;
        return;
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
    double good_error = c.reference_error;
    stability_record good_stability = c.stability;
    auto passes = [&](std::size_t n, double& e, stability_record& st) {
        try {
            e = runs.error_against(n, truth);
        } catch (const non_finite_value&) {
            return false;
        }
        if (!(e <= 1.0)) return false;
        st = stability_of_run(p, m, runs, n, opt, stability_evaluations);
        return !st.checked || st.stable;
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
        if (passes(trial, e, st))
            good = trial, good_error = e, good_stability = st;
        else
            bad = trial;
    } catch (const budget_exhausted&) {
        break;  // keep the step already shown to meet the tolerance
    }
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

} // namespace detail

/// The largest uniform step of method m on problem p whose error meets tol (see the top of this
/// file); the certificate says how it knows, or why it cannot say.
template <problem_like P, fixed_step_method M>
step_certificate certify(const P& p, const M& m, const weighted_norm& tol, const certify_options& opt = {}) {
    const std::string who = "stepcert::certify: ";
    detail::check_certify_arguments(p, m, tol, opt, who);
    const std::size_t G = opt.output_times;
    const double length = static_cast<double>(p.t1() - p.t0());
    const int p_declared = m.order();
    step_certificate c = detail::blank_certificate(p, m.name(), p_declared, tol, opt);

    if (detail::round_off_units_at_start(p, tol, opt.round_off_factor) >= opt.target)
        return detail::refuse(c, refusal::below_round_off_floor,
                              "the tolerance is below the rounding of the initial state in double (" +
                                  std::to_string(opt.round_off_factor) +
                                  " eps |y0| already exceeds it); no step can meet it in this scalar type: loosen it, "
                                  "or run a multiprecision state (e.g. float128).");

    detail::certify_runs<P, M> runs(p, m, tol, opt);
    std::size_t stability_evaluations = 0;
    auto spent = [&] { return runs.evaluations() + stability_evaluations; };
    auto finish = [&](step_certificate out) {
        out.evaluations = spent();
        return out;
    };

    // Coarse start: a step inside the stability region at y0, so that no level is wasted on a
    // blow-up the stability check already predicts.
    std::size_t n0 = detail::round_up_to(opt.first_steps > 0 ? opt.first_steps : 4, G);
    if (opt.first_steps == 0 && opt.check_stability) {
        using D = rebind_state<typename P::state_type, double>;
        const auto s0 = detail::stability_at(p, m, length / static_cast<double>(n0), std::vector<D>{convert_state<D>(p.y0())},
                                             std::vector<double>{static_cast<double>(p.t0())}, stability_evaluations);
        if (std::isfinite(s0.step_limit) && s0.step_limit > 0.0 && !s0.stable)
            n0 = detail::round_up_to(static_cast<std::size_t>(std::ceil(length / (0.95 * s0.step_limit))), G);
    }

    // The ladder: each level is twice the last, or, once the declared order predicts N* within
    // that, N* itself; it stops when its last three levels show the declared order (any ratios:
    // three_level_order). Aiming at N* saves the run past it: the search then costs about two runs
    // of its finest level plus N*.
    std::vector<std::size_t> level;
    std::vector<double> diff;  // diff[k]: |run(level[k-1]) - run(level[k])|, diff[0] unused
    std::optional<std::size_t> consistent_at;
    double p_used = p_declared, p_seen = std::numeric_limits<double>::quiet_NaN();
    std::size_t n_star = 0;
    bool reached_round_off = false;
    // N* for a share of the target (below 1 leaves room for the estimate's scatter between runs).
    auto predicted = [&](std::size_t coarse, std::size_t fine, double d, double order, double share) {
        const double band = detail::richardson_band(d, fine, coarse, order, opt.safety_factor);
        const double want = static_cast<double>(fine) * std::pow(band / (share * opt.target), 1.0 / p_declared);
        return detail::round_up_to(static_cast<std::size_t>(std::min(std::ceil(want), 1e18)), G);
    };
    try {
        std::size_t n = n0;
        for (std::size_t k = 0; k < opt.max_levels; ++k) {
            level.push_back(n);
            double d = std::numeric_limits<double>::infinity();
            try {
                runs.at(n);
                if (k > 0) d = runs.difference(level[k - 1], n);
            } catch (const non_finite_value&) {
                // A blow-up at a coarse level is pre-asymptotic; a finer level may still converge.
            }
            diff.push_back(d);
            std::size_t next = 2 * n;
            if (k >= 1 && std::isfinite(d) && d > 0.0) {
                // Down at rounding: by the floor estimate, or, once the declared order has been seen,
                // by differences that stop falling as h shrinks (the plateau; rounding in long runs
                // can grow faster than the floor's sqrt(N)).
                if (d <= runs.round_off_floor_units(n) || (std::isfinite(p_seen) && !(d < diff[k - 1]))) {
                    reached_round_off = true;
                    break;
                }
                double p_aim = p_declared;
                if (k >= 2 && std::isfinite(diff[k - 1])) {
                    const double observed = three_level_order(length / static_cast<double>(level[k - 2]),
                                                              length / static_cast<double>(level[k - 1]),
                                                              length / static_cast<double>(n), diff[k - 1], d);
                    if (std::abs(observed - p_declared) <= opt.order_tolerance) {
                        p_seen = observed;
                        p_used = p_aim = std::min(observed, static_cast<double>(p_declared));
                        // A run past n is aimed at 0.97 of the target: a second try would cost a run.
                        const std::size_t candidate = predicted(level[k - 1], n, d, p_used, 0.97);
                        if (candidate <= 2 * n) {
                            consistent_at = k;
                            // The finest run of the range, or the one run past it the prediction asks
                            // for; coarser runs are judged afterwards by their difference from it.
                            n_star = std::max(candidate, n);
                            break;
                        }
                    }
                }
                // Aim a little finer than needed (0.9 of the target), with the order seen if it is
                // in range (a lower one asks for more steps), so the level is likely to pass.
                const std::size_t aim = predicted(level[k - 1], n, d, p_aim, 0.8);
                // Not closer than 1.25 n: the last two levels must differ by more than rounding.
                // A prediction at or below n, before the order has shown, is no aim: the search
                // doubles on to find the asymptotic range (steps of 1.25 would cost ~5 runs).
                if (aim > n && aim < next) next = std::max(aim, detail::round_up_to(n + n / 4, G));
            }
            n = next;
        }
    } catch (const budget_exhausted& e) {
        return finish(detail::refuse(c, refusal::budget_exhausted, e.what()));
    }
    c.observed_order = p_seen;
    if (!consistent_at) {
        if (reached_round_off)
            return finish(detail::refuse(c, refusal::below_round_off_floor,
                                         "the differences between successive runs reached the round-off floor before the "
                                         "error met the tolerance: the tolerance is below what double resolves for this "
                                         "problem; loosen it, or run a multiprecision state."));
        bool any_finite = false;
        for (double d : diff) any_finite = any_finite || std::isfinite(d);
        if (!any_finite)
            return finish(detail::refuse(c, refusal::non_finite,
                                         "every run from " + std::to_string(level.front()) + " to " + std::to_string(level.back()) +
                                             " steps produced NaN or infinity; check the right-hand side and the initial state."));
        return finish(detail::refuse(c, refusal::outside_asymptotic_range,
                                     "the observed order never came within " + detail::certificate_number(opt.order_tolerance) +
                                         " of the declared " + std::to_string(p_declared) + " on " + std::to_string(level.front()) +
                                         " .. " + std::to_string(level.back()) + " steps; check the declared order, or the "
                                         "smoothness of the right-hand side."));
    }

    // Confirm N*: its own Richardson band, its stability, and the truth when asked.
    const std::size_t k = *consistent_at;
    const std::vector<std::size_t> partners(level.begin() + static_cast<std::ptrdiff_t>(k - 2),
                                            level.begin() + static_cast<std::ptrdiff_t>(k + 1));
    detail::truth_once<P> truths(p, G, tol);
    std::string notes;
    try {
        for (int attempt = 0; attempt < 12; ++attempt) {
            const std::size_t partner = detail::richardson_partner(n_star, partners);
            double band = std::numeric_limits<double>::infinity();
            try {
                band = detail::richardson_band(runs.difference(n_star, partner), n_star, partner, p_used, opt.safety_factor);
            } catch (const non_finite_value&) {
            }
            if (!(band <= opt.target)) {
                const double grow = std::isfinite(band) ? std::pow(band / opt.target, 1.0 / p_declared) * 1.02 : 2.0;
                n_star = detail::round_up_to(static_cast<std::size_t>(std::ceil(static_cast<double>(n_star) * grow)), G);
                continue;
            }
            c.stability = detail::stability_of_run(p, m, runs, n_star, opt, stability_evaluations);
            if (c.stability.checked && !c.stability.stable) {
                notes += "N = " + std::to_string(n_star) + " met the estimate but was unstable; ";
                const double limit = c.stability.step_limit;
                const std::size_t stable_n =
                    (std::isfinite(limit) && limit > 0.0) ? static_cast<std::size_t>(std::ceil(length / (0.98 * limit))) : 2 * n_star;
                n_star = detail::round_up_to(std::max(stable_n, n_star + 1), G);
                continue;
            }
            c.steps = n_star;
            c.step = length / static_cast<double>(n_star);
            c.estimated_error = band / opt.safety_factor;
            c.safety_factor = opt.safety_factor;
            c.error_band = band;
            c.basis = "Richardson: runs with " + std::to_string(n_star) + " and " + std::to_string(partner) +
                      " steps, order " + detail::certificate_number(p_used) + " (observed " + detail::certificate_number(p_seen) +
                      " on " + std::to_string(level[k - 2]) + "/" + std::to_string(level[k - 1]) + "/" +
                      std::to_string(level[k]) + " steps), safety factor " + detail::certificate_number(opt.safety_factor) +
                      (notes.empty() ? std::string() : "; " + notes);
            c.level = evidence_level::estimated;
            detail::coarsen_by_difference(p, m, runs, c, opt, stability_evaluations);
            if (opt.verify_with_reference) {
                if (const auto* truth = truths.get(c)) {
                    c.reference_error = runs.error_against(n_star, *truth);
                    if (!(c.reference_error <= 1.0)) {
                        notes += "N = " + std::to_string(n_star) + " failed against the reference (" +
                                 detail::certificate_number(c.reference_error) + "); ";
                        const double grow = std::isfinite(c.reference_error)
                                                ? std::pow(c.reference_error / opt.target, 1.0 / p_declared) * 1.02
                                                : 2.0;
                        n_star = detail::round_up_to(static_cast<std::size_t>(std::ceil(static_cast<double>(n_star) * grow)), G);
                        c.level = evidence_level::not_certified;
                        continue;
                    }
                    c.level = evidence_level::reference_verified;
                    if (opt.coarsen_with_reference) detail::coarsen_against_truth(p, m, runs, *truth, c, opt, stability_evaluations);
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
                                 "no step passed the confirmation in 12 attempts (" + notes +
                                     "); the estimates disagree with the runs: check the declared order."));
}

} // namespace stepcert
