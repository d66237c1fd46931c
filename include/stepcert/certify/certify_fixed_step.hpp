#pragma once
// Certification of a fixed-step method's step for a tolerance (needs Eigen, for the stability
// check). certify(p, m, tol) finds the largest uniform step h = (t1 - t0) / N whose error meets
// tol (a weighted norm; <= 1 is met) at every output time or at t1; certify_step_count(p, m, N,
// tol) judges a step the user already runs with. Both return a step_certificate; bad arguments
// throw, while a step that cannot be certified gives a certificate at level not_certified with
// the reason, measured, and what to do.
//
// The search doubles N from a coarse start (the stability limit at y0, or a few steps) and reads
// the observed order from each three successive runs. It stops when
//  * three runs show the declared order (within order_tolerance): Richardson with the observed
//    order (at most the declared), times the Grid Convergence Index safety factor (P. J. Roache
//    1998; I. B. Celik et al., J. Fluids Eng. 130(7) 078001, 2008);
//  * two readings in a row agree with each other above the declared order (pairs with small
//    leading error coefficients): Richardson with the declared order, conservative when the
//    error falls faster, and the safety factor for an unconfirmed order (3);
//  * successive runs differ by rounding only (the round-off plateau): a run is then judged by
//    its difference from the plateau's first run plus that run's rounding, safety factor 3; it is
//    refused as below the round-off floor only when that exceeds the tolerance. (Stiff problems
//    with an explicit method land here: every stable step is already accurate to rounding.)
//  * three readings settle below the declared order: the error is located from the local error
//    profile (certify/detail/locate_non_smooth.hpp) and the refusal names the interval;
//  * runs blow up the same way at the same time three times in a row: a model that returns NaN
//    there, or a solution that grows without bound; or finite runs grow by a steady factor
//    per refinement (a blow-up at the end of the interval). Runs that blow up from an unstable
//    step (measured at the failing state) are only the search's coarse start: it goes on, aiming
//    at the stable step.
// Once a prediction says N* lies past the last run, the next run is aimed at it rather than
// doubled. A coarser run already made is then taken if its difference from the certified run
// plus that run's band meets the target (triangle inequality: nothing is assumed about the
// coarser run), and when stability stopped it, the run at the stable step limit is tried. Its
// stability is checked (h lambda inside the method's region for every decaying eigenvalue
// sampled along the run), and, when asked and possible, its error is measured against the exact
// solution or a multiprecision reference, which may then show a still coarser step meets the
// tolerance. The certificate says which case the estimate rests on (evidence) and whether
// accuracy or stability set the step (limited_by).
#include <algorithm>
#include <array>
#include <cmath>
#include <cstddef>
#include <limits>
#include <optional>
#include <string>
#include <utility>
#include <vector>

#include "stepcert/certify/certificate.hpp"
#include "stepcert/certify/certify_options.hpp"
#include "stepcert/certify/detail/certify_evidence.hpp"
#include "stepcert/certify/detail/certify_runs.hpp"
#include "stepcert/certify/detail/failure_reading.hpp"
#include "stepcert/certify/detail/grid_truth.hpp"
#include "stepcert/certify/detail/locate_non_smooth.hpp"
#include "stepcert/certify/detail/search_ladder.hpp"
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

/// The reference met a NaN or infinity: the model fails in the reference's scalar type.
inline step_certificate refuse_non_finite_reference(step_certificate c, const std::string& why) {
    return refuse(std::move(c), refusal::non_finite,
                  "the multiprecision reference met a non-finite value, while the double-precision runs stayed finite: " + why +
                      " The model behaves differently in the reference's scalar type there: check its generic code path "
                      "(every function and constant it uses in that type).");
}

/// The refusal for a purely relative tolerance (atol = 0) at a component whose value is no larger
/// than its error: zero (exactly, or up to the runs' own error). `against` names the scale.
inline step_certificate refuse_unscaled(const step_certificate& c, const std::array<double, 4>& z, const std::string& against,
                                        const std::string& seen) {
    return refuse(c, refusal::relative_tolerance_at_zero,
                  "the tolerance is purely relative (atol = 0), but component " + std::to_string(static_cast<std::size_t>(z[0])) +
                      " at t = " + formatted_number(z[1], "%.6g") + " is " + formatted_number(z[2], "%.4g") + " in " + against +
                      " and differs from it by " + formatted_number(z[3], "%.4g") + seen +
                      ": its value is no larger than its own error (it is zero, or zero in truth), so a relative error has "
                      "no scale there. Give the tolerance an absolute part (atol > 0) of the size that component may be off by.");
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

    if (const double u = detail::round_off_units_at_start(p, tol, opt.round_off_factor); u >= opt.target)
        return detail::refuse(c, refusal::below_round_off_floor,
                              "the tolerance is below the rounding of the initial state in double: " +
                                  detail::certificate_number(opt.round_off_factor) + " eps |y0| is already " +
                                  detail::certificate_number(u) +
                                  " of the tolerance; no step can meet it in this scalar type: loosen it, or run a "
                                  "multiprecision state (e.g. float128).");

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
            n0 = detail::round_up_to(static_cast<std::size_t>(std::min(std::ceil(length / (0.95 * s0.step_limit)), 1e18)), G);
    }

    // The ladder: each level is twice the last, or, once the order predicts N* within that, N*
    // itself (see the top of this file for when it stops).
    detail::ladder_record L;
    std::optional<std::size_t> consistent_at;
    order_evidence evidence = order_evidence::none;
    double p_used = p_declared, p_seen = std::numeric_limits<double>::quiet_NaN();
    double safety = opt.safety_factor;
    std::size_t n_star = 0;
    bool plateau = false, low_order = false, stalled = false;
    std::optional<std::array<double, 4>> unscaled_before;
    // N* for a share of the target (below 1 leaves room for the estimate's scatter between runs).
    auto predicted = [&](std::size_t coarse, std::size_t fine, double d, double order, double share) {
        const double band = detail::richardson_band(d, fine, coarse, order, safety);
        const double want = static_cast<double>(fine) * std::pow(band / (share * opt.target), 1.0 / p_declared);
        return detail::round_up_to(static_cast<std::size_t>(std::min(std::ceil(want), 1e18)), G);
    };
    auto budget_refusal = [&](const budget_exhausted& e) {
        return finish(detail::refuse(c, refusal::budget_exhausted,
                                     std::string(e.what()) + " The search had made runs of " + std::to_string(L.level.front()) +
                                         " .. " + std::to_string(L.level.back()) + " steps (" + std::to_string(spent()) +
                                         " evaluations); observed orders: " + L.readings_text() + "."));
    };
    // Readings settled below the declared order: where is the error made?
    std::optional<detail::non_smooth_finding> located;
    std::size_t located_at = 0;
    auto locate = [&] {
        located = detail::locate_non_smooth(p, m, L.level.back(), G, tol,
                                            opt.max_evaluations - std::min(opt.max_evaluations, spent()));
        located_at = L.level.size();
        stability_evaluations += located->evaluations;
    };
    auto refuse_low_order = [&](const detail::non_smooth_finding& where) {
        const std::string seen =
            "the observed order settled at " + L.readings_text(3) + ", below the declared " + std::to_string(p_declared);
        if (!where.windows.empty())
            return detail::refuse(
                c, refusal::non_smooth,
                seen + ". The error is made in " + detail::windows_text(where) + ": the right-hand side is likely not smooth there (" +
                    (std::isfinite(where.smooth_ratio)
                         ? "elsewhere a step makes " + detail::formatted_number(where.smooth_ratio, "%.3g") +
                               " times the local error of the two half steps covering it, about 2^" + std::to_string(p_declared) +
                               " as on a smooth model; there much less, as across a jump or a kink"
                         : "a step there makes only that ratio times the local error of the two half steps covering it, "
                           "where a smooth model gives 2^" + std::to_string(p_declared) +
                               "; elsewhere the local error is below a thousandth of it") +
                    "). If the model switches at a known time there, declare it (problem.with_breakpoints({t})): runs then "
                    "land on it and step each side on its own; otherwise smooth the model there.");
        return detail::refuse(c, refusal::order_below_declared,
                              seen + ", and no window of the run stands out where the local error fails to shrink as h^(p+1) (" +
                                  (where.note.empty() ? "median local error ratio " +
                                                            detail::formatted_number(where.smooth_ratio, "%.3g") + " of 2^" +
                                                            std::to_string(p_declared)
                                                      : where.note) +
                                  "): the order is low everywhere. Check the method's declared order, and whether the "
                                  "right-hand side is smooth in the state (an absolute value, a min or max, a table lookup).");
    };
    try {
        std::size_t n = n0;
        for (std::size_t k = 0; k < opt.max_levels; ++k) {
            L.level.push_back(n);
            L.reading.push_back(std::numeric_limits<double>::quiet_NaN());
            double d = std::numeric_limits<double>::infinity();
            std::size_t next = 2 * n;
            bool finite = true;
            try {
                runs.at(n);
            } catch (const non_finite_value& e) {
                finite = false;
                const auto fr = detail::read_failure(p, m, n, e, opt, stability_evaluations);
                L.streak.push_back(fr);
                L.failed.push_back(fr);
                using kind = detail::failure_reading::kind;
                if (detail::same_failure_persists(L.streak, kind::model, length))
                    return finish(detail::refuse(c, refusal::non_finite,
                                                 "the right-hand side returned a non-finite value at the same time on three "
                                                 "successive refinements, " + detail::failure_times_text(L.streak) +
                                                     ", at states where the step is not unstable: the model fails there, "
                                                     "whatever the step. The finest run: " + fr.message));
                if (detail::same_failure_persists(L.streak, kind::growth, length))
                    return finish(detail::refuse(c, refusal::unbounded_growth,
                                                 "three successive refinements grew past double's range at the same time, " +
                                                     detail::failure_times_text(L.streak) + ", along modes that grow by "
                                                     "themselves (" + fr.stability + "; no decaying mode out of the stability "
                                                     "region): the solution appears to grow without bound near t = " +
                                                     detail::formatted_number(fr.time, "%.6g") +
                                                     ". End the interval before it, or check the model. The finest run: " + fr.message));
                // From an unstable step: the search doubles on. (The stable step measured at the
                // failing state is no aim: a coarse step's states overshoot, and so does their limit.)
            }
            if (finite) {
                L.streak.clear();
                if (k > 0 && runs.failure(L.level[k - 1]) == nullptr) {
                    d = runs.difference(L.level[k - 1], n);
                    // A purely relative tolerance at a component that is zero: at once when it is
                    // exactly zero, else when two refinements in a row leave it within its error.
                    const auto& fine_run = runs.at(n);
                    const auto z = runs.value_within_its_error(L.level[k - 1], [&](std::size_t j) -> const auto& { return fine_run.states[j]; });
                    // (Not falling with the step: a small value the coarse runs still miss would.)
                    auto ratio = [](const std::array<double, 4>& a) { return a[3] / std::abs(a[2]); };
                    if (z && (std::isinf(d) || (unscaled_before && (*unscaled_before)[0] == (*z)[0] &&
                                                (*unscaled_before)[1] == (*z)[1] && ratio(*z) >= 0.5 * ratio(*unscaled_before))))
                        return finish(detail::refuse_unscaled(c, *z, "the run with " + std::to_string(n) + " steps",
                                                              " in the run with " + std::to_string(L.level[k - 1]) + " steps" +
                                                                  (std::isinf(d) ? std::string() : ", as on the refinement before")));
                    unscaled_before = z;
                } else {
                    unscaled_before.reset();
                }
            }
            L.diff.push_back(d);
            if (finite) {
                if (auto growth = detail::growth_without_bound(runs, L))
                    return finish(detail::refuse(c, refusal::unbounded_growth, *growth));
            }
            if (finite && k >= 1 && std::isfinite(d)) {
                // Down at rounding: by the floor estimate, or by differences that stop falling as h
                // shrinks once an order has been seen or while they are already below 1e-3 of the
                // target (rounding in long runs, and in stiff ones at the stability edge, where
                // high modes are barely damped, grows faster than the floor's sqrt(N)).
                const bool not_falling = !(d < L.diff[k - 1]);
                if (d <= runs.round_off_floor_units(n) || (not_falling && (std::isfinite(p_seen) || d <= 1e-3 * opt.target))) {
                    plateau = true;
                    break;
                }
                // Stalled above rounding: four halvings of the step cut the difference by less
                // than half (an order below 0.25) though the runs already agree to 1e-3 of the
                // solution's size (a coarse start that has not converged yet differs by about all
                // of it): more steps buy nothing.
                if (k >= 5 && std::isfinite(L.diff[k - 4]) && d >= L.diff[k - 4] / 2 &&
                    runs.relative_difference(L.level[k - 1], n) <= 1e-3) {
                    stalled = true;
                    break;
                }
                double p_aim = p_declared;
                if (k >= 2 && std::isfinite(L.diff[k - 1])) {
                    const double q = three_level_order(length / static_cast<double>(L.level[k - 2]),
                                                       length / static_cast<double>(L.level[k - 1]),
                                                       length / static_cast<double>(n), L.diff[k - 1], d);
                    L.reading[k] = q;
                    c.observed_order = q;  // the latest reading, until the search settles on one
                    const bool confirmed = std::abs(q - p_declared) <= opt.order_tolerance;
                    const bool above = detail::steady_above(L.reading[k - 1], q, p_declared, opt.order_tolerance);
                    if (confirmed || above) {
                        p_seen = q;
                        evidence = confirmed ? order_evidence::declared_confirmed : order_evidence::above_declared;
                        safety = confirmed ? opt.safety_factor : opt.unconfirmed_safety_factor;
                        p_used = p_aim = confirmed ? std::min(q, static_cast<double>(p_declared)) : p_declared;
                        // A run past n is aimed at 0.97 of the target: a second try would cost a run.
                        const std::size_t candidate = predicted(L.level[k - 1], n, d, p_used, 0.97);
                        if (candidate <= 2 * n) {
                            consistent_at = k;
                            // The finest run of the range, or the one run past it the prediction asks
                            // for; coarser runs are judged afterwards by their difference from it.
                            n_star = std::max(candidate, n);
                            break;
                        }
                    } else if (const auto last = L.last_three_readings()) {
                        // Three readings under the declared order: look where the error is made.
                        // A window that stands out ends the search (not smooth there). Without
                        // one, steady readings (within 0.25, no upward trend) mean the order is
                        // low everywhere; readings still rising may be a slow approach, and the
                        // search goes on (looking again two levels later).
                        const auto [lo, hi] = std::minmax({(*last)[0], (*last)[1], (*last)[2]});
                        low_order = hi < p_declared - opt.order_tolerance;
                        if (low_order && (!located || L.level.size() >= located_at + 2)) {
                            locate();
                            const bool steady = hi - lo <= 0.25 && (*last)[2] - (*last)[0] <= 0.15;
                            if (!located->windows.empty() || steady) return finish(refuse_low_order(*located));
                        }
                    }
                }
                // Aim a little finer than needed (0.8 of the target), with the order seen if it is
                // in range (a lower one asks for more steps), so the level is likely to pass.
                const std::size_t aim = predicted(L.level[k - 1], n, d, p_aim, 0.8);
                // Not closer than 1.25 n: the last two levels must differ by more than rounding.
                // A prediction at or below n, before the order has shown, is no aim: the search
                // doubles on to find the asymptotic range (steps of 1.25 would cost ~5 runs).
                if (aim > n && aim < next) next = std::max(aim, detail::round_up_to(n + n / 4, G));
            }
            n = next;
        }
    } catch (const budget_exhausted& e) {
        return budget_refusal(e);
    }
    // The round-off plateau after readings that stayed above the declared order, steady, up to
    // it: Richardson on the last two levels before it, with the declared order.
    if (!consistent_at && plateau && L.level.size() >= 4) {
        const std::size_t k = L.level.size() - 2;  // the last level before the plateau's
        if (detail::steady_above(L.reading[k - 1], L.reading[k], p_declared, opt.order_tolerance)) {
            const double q = L.reading[k];
            consistent_at = k;
            p_seen = q;
            evidence = order_evidence::above_declared;
            safety = opt.unconfirmed_safety_factor;
            p_used = p_declared;
            n_star = L.level[k];  // the finest run before rounding; finer ones would only meet rounding
        }
    }
    if (std::isfinite(p_seen)) c.observed_order = p_seen;

    detail::truth_once<P> truths(p, G, tol);
    // The certificate's run met the tolerance against the truth: verified, and maybe coarser.
    auto verified = [&](const auto& truth) {
        c.level = evidence_level::reference_verified;
        if (opt.coarsen_with_reference) detail::coarsen_against_truth(p, m, runs, truth, c, opt, stability_evaluations);
    };
    // No truth: a NaN in the reference refuses; otherwise the estimated level stands (or is refused
    // when the reference was required).
    auto without_reference = [&]() -> std::optional<step_certificate> {
        if (truths.non_finite()) return detail::refuse_non_finite_reference(c, truths.why());
        return detail::without_truth(c, opt, truths.why());
    };
    if (!consistent_at) {
        if (plateau) {
            // The plateau's first run: its difference from the next is rounding, so its error is
            // about that plus its own rounding; estimated with the unconfirmed safety factor.
            const std::size_t k = L.level.size() - 1;
            const std::size_t fine = L.level[k - 1];
            const double d = L.diff[k];
            double floor_units = 0.0;
            try {
                floor_units = std::max(runs.round_off_floor_units(fine), runs.round_off_floor_units(L.level[k]));
            } catch (const error&) {
                floor_units = d;
            }
            const double band = opt.unconfirmed_safety_factor * (d + floor_units);
            if (!(band <= opt.target))
                return finish(detail::refuse(
                    c, refusal::below_round_off_floor,
                    "the runs with " + std::to_string(fine) + " and " + std::to_string(L.level[k]) + " steps differ by " +
                        detail::certificate_number(d) + " of the tolerance, at the round-off level of double for runs this long (" +
                        detail::certificate_number(floor_units) + " of the tolerance: " +
                        detail::certificate_number(opt.round_off_factor) + " sqrt(N) eps |y|), so no run resolves the error below "
                        "about " + detail::certificate_number(band) + " of the tolerance (safety factor " +
                        detail::certificate_number(opt.unconfirmed_safety_factor) + "). Observed orders before it: " +
                        L.readings_text() + ". Loosen the tolerance, or run a multiprecision state."));
            c.steps = fine;
            c.step = length / static_cast<double>(fine);
            c.estimated_error = d + floor_units;
            c.safety_factor = opt.unconfirmed_safety_factor;
            c.error_band = band;
            c.evidence = order_evidence::round_off_plateau;
            c.basis = "round-off plateau: the runs with " + std::to_string(fine) + " and " + std::to_string(L.level[k]) +
                      " steps differ by " + detail::certificate_number(d) + ", within the round-off level " +
                      detail::certificate_number(floor_units) + " (both in tolerance units), so the run with " +
                      std::to_string(fine) + " steps is estimated at that difference plus that level, safety factor " +
                      detail::certificate_number(opt.unconfirmed_safety_factor) + " (the order is not confirmed there; observed " +
                      L.readings_text(3) + ")";
            c.level = evidence_level::estimated;
            c.stability = detail::stability_of_run(p, m, runs, fine, opt, stability_evaluations);
            if (c.stability.checked && !c.stability.stable)
                return finish(detail::refuse(c, refusal::unstable,
                                             "the runs agree to rounding at " + std::to_string(fine) + " steps, but that step is "
                                             "outside the stability region along the run (" + c.stability.worst_mode +
                                             "): " + detail::steps_for_limit(length, c.stability.step_limit) + "."));
            const double fine_estimate = c.estimated_error, fine_band = c.error_band;
            const std::string fine_basis = c.basis;
            detail::coarsen_by_difference(p, m, runs, c, opt, stability_evaluations, L.coarser_blew_up_unstable(fine));
            try {
                detail::toward_stability_limit(p, m, runs, c, fine, fine_estimate, fine_band, fine_basis, opt, stability_evaluations);
            } catch (const budget_exhausted&) {
                // Keep the step already shown.
            }
            if (opt.verify_with_reference) {
                if (const auto* truth = truths.get(c)) {
                    c.reference_error = runs.error_against(c.steps, *truth);
                    if (!(c.reference_error <= 1.0)) {
                        if (const auto z = runs.value_within_its_error(c.steps, [&](std::size_t j) -> const auto& { return (*truth)[j - 1]; }))
                            return finish(detail::refuse_unscaled(c, *z, "the reference", " in the run with " + std::to_string(c.steps) + " steps"));
                        const double at_fine = runs.error_against(fine, *truth);
                        return finish(detail::refuse(
                            c, refusal::tolerance_not_met,
                            "the estimate from the round-off plateau is contradicted by the reference: the run with " +
                                std::to_string(c.steps) + " steps is " + detail::certificate_number(c.reference_error) +
                                " of the tolerance off, the one with " + std::to_string(fine) + " steps " +
                                detail::certificate_number(at_fine) +
                                " off; the runs agree with each other more closely than with the solution (an error the "
                                "method makes the same way at every step). Check the method and the model."));
                    }
                    verified(*truth);
                } else if (auto refused = without_reference()) {
                    return finish(*refused);
                }
            }
            return finish(c);
        }
        if (low_order && located) return finish(refuse_low_order(*located));
        bool any_finite = false;
        for (double d : L.diff) any_finite = any_finite || std::isfinite(d);
        if (!any_finite && !L.failed.empty()) {
            const auto& last = L.failed.back();
            return finish(detail::refuse(c, refusal::non_finite,
                                         "every run from " + std::to_string(L.level.front()) + " to " + std::to_string(L.level.back()) +
                                             " steps became NaN or infinite (" + detail::failure_times_text(L.failed) +
                                             "). The finest: " + last.message +
                                             (last.stability.empty() ? std::string() : " (" + last.stability + ")")));
        }
        if (stalled) {
            const std::size_t k = L.level.size() - 1;
            return finish(detail::refuse(c, refusal::order_not_settled,
                                         "the runs stopped converging above the round-off level: successive runs differ by " +
                                             detail::certificate_number(L.diff[k - 4]) + " of the tolerance at " +
                                             std::to_string(L.level[k - 4]) + " steps and still by " +
                                             detail::certificate_number(L.diff[k]) + " at " + std::to_string(L.level[k]) +
                                             " steps (round-off level " + detail::certificate_number(runs.round_off_floor_units(L.level[k])) +
                                             "); the observed order wanders: " + L.readings_text() +
                                             ". Something other than the step sets the error: check that the method lands "
                                             "exactly on t1 and that its step is the one it is given, and the smoothness of the "
                                             "right-hand side."));
        }
        return finish(detail::refuse(c, refusal::order_not_settled,
                                     "the observed order never settled near the declared " + std::to_string(p_declared) +
                                         " (within " + detail::certificate_number(opt.order_tolerance) + "), above it, or below it: " +
                                         L.readings_text() + "; the search ended after " + std::to_string(L.level.size()) +
                                         " levels (" + std::to_string(L.level.front()) + " .. " + std::to_string(L.level.back()) +
                                         " steps, " + std::to_string(spent()) + " evaluations). Check the declared order and the "
                                         "smoothness of the right-hand side, or raise max_levels."));
    }

    // Confirm N*: its own Richardson band, its stability, and the truth when asked.
    c.evidence = evidence;
    const std::size_t k = *consistent_at;
    const std::vector<std::size_t> partners(L.level.begin() + static_cast<std::ptrdiff_t>(k - 2),
                                            L.level.begin() + static_cast<std::ptrdiff_t>(k + 1));
    const std::string order_words =
        evidence == order_evidence::above_declared
            ? "order " + std::to_string(p_declared) + " (the declared: the observed " + detail::certificate_number(p_seen) + " on " +
                  std::to_string(L.level[k - 2]) + "/" + std::to_string(L.level[k - 1]) + "/" + std::to_string(L.level[k]) +
                  " steps stays above it, so the error falls faster than the estimate assumes)"
            : "order " + detail::certificate_number(p_used) + " (observed " + detail::certificate_number(p_seen) + " on " +
                  std::to_string(L.level[k - 2]) + "/" + std::to_string(L.level[k - 1]) + "/" + std::to_string(L.level[k]) + " steps)";
    std::string notes;
    std::vector<std::pair<std::size_t, double>> misses;  // runs that failed against the reference, and by how much
    try {
        for (int attempt = 0; attempt < 12; ++attempt) {
            const std::size_t partner = detail::richardson_partner(n_star, partners);
            double band = std::numeric_limits<double>::infinity();
            try {
                band = detail::richardson_band(runs.difference(n_star, partner), n_star, partner, p_used, safety);
            } catch (const non_finite_value&) {
            }
            if (!(band <= opt.target)) {
                const double grow = std::isfinite(band) ? std::pow(band / opt.target, 1.0 / p_declared) * 1.02 : 2.0;
                n_star = detail::round_up_to(static_cast<std::size_t>(std::min(std::ceil(static_cast<double>(n_star) * grow), 1e18)), G);
                continue;
            }
            c.stability = detail::stability_of_run(p, m, runs, n_star, opt, stability_evaluations);
            if (c.stability.checked && !c.stability.stable) {
                notes += "N = " + std::to_string(n_star) + " met the estimate but was unstable; ";
                const double limit = c.stability.step_limit;
                const std::size_t stable_n =
                    (std::isfinite(limit) && limit > 0.0) ? static_cast<std::size_t>(std::min(std::ceil(length / (0.98 * limit)), 1e18)) : 2 * n_star;
                n_star = detail::round_up_to(std::max(stable_n, n_star + 1), G);
                continue;
            }
            c.steps = n_star;
            c.step = length / static_cast<double>(n_star);
            c.estimated_error = band / safety;
            c.safety_factor = safety;
            c.error_band = band;
            c.basis = "Richardson: runs with " + std::to_string(n_star) + " and " + std::to_string(partner) + " steps, " + order_words +
                      ", safety factor " + detail::certificate_number(safety) + (notes.empty() ? std::string() : "; " + notes);
            c.level = evidence_level::estimated;
            const double fine_estimate = c.estimated_error, fine_band = c.error_band;
            const std::string fine_basis = c.basis;
            detail::coarsen_by_difference(p, m, runs, c, opt, stability_evaluations, L.coarser_blew_up_unstable(n_star));
            detail::toward_stability_limit(p, m, runs, c, n_star, fine_estimate, fine_band, fine_basis, opt, stability_evaluations);
            if (opt.verify_with_reference) {
                if (const auto* truth = truths.get(c)) {
                    c.reference_error = runs.error_against(n_star, *truth);
                    if (!(c.reference_error <= 1.0)) {
                        if (const auto z = runs.value_within_its_error(n_star, [&](std::size_t j) -> const auto& { return (*truth)[j - 1]; }))
                            return finish(detail::refuse_unscaled(c, *z, "the reference", " in the run with " + std::to_string(n_star) + " steps"));
                        // What the reference says about the runs that miss it: down at rounding, or
                        // an error that does not fall with the step (the estimate then means nothing).
                        const double floor_units = runs.round_off_floor_units(n_star);
                        if (2.0 * floor_units >= c.reference_error)
                            return finish(detail::refuse(
                                c, refusal::below_round_off_floor,
                                "the run with " + std::to_string(n_star) + " steps is " + detail::certificate_number(c.reference_error) +
                                    " of the tolerance off the reference, and its round-off level is " +
                                    detail::certificate_number(floor_units) + " of the tolerance (" +
                                    detail::certificate_number(opt.round_off_factor) +
                                    " sqrt(N) eps |y|): the error left is rounding, which more steps only add to. Loosen the "
                                    "tolerance, or run a multiprecision state."));
                        if (!misses.empty() && c.reference_error >= 0.5 * misses.back().second)
                            return finish(detail::refuse(
                                c, refusal::order_not_settled,
                                "the runs stop converging to the reference: the run with " + std::to_string(misses.back().first) +
                                    " steps is " + detail::certificate_number(misses.back().second) + " of the tolerance off it, the one with " +
                                    std::to_string(n_star) + " steps still " + detail::certificate_number(c.reference_error) +
                                    ", though the coarser runs showed the order (" + L.readings_text(3) +
                                    "). Something other than the step sets the error: check that the method lands exactly on "
                                    "t1 and steps with the step it is given, and the model's smoothness."));
                        misses.emplace_back(n_star, c.reference_error);
                        notes += "N = " + std::to_string(n_star) + " failed against the reference (" +
                                 detail::certificate_number(c.reference_error) + "); ";
                        const double grow = std::isfinite(c.reference_error)
                                                ? std::pow(c.reference_error / opt.target, 1.0 / p_declared) * 1.02
                                                : 2.0;
                        n_star = detail::round_up_to(static_cast<std::size_t>(std::min(std::ceil(static_cast<double>(n_star) * grow), 1e18)), G);
                        c.level = evidence_level::not_certified;
                        continue;
                    }
                    if (c.steps != n_star) c.reference_error = runs.error_against(c.steps, *truth);
                    if (!(c.reference_error <= 1.0)) {
                        // The coarser run the estimate allowed fails against the reference: keep N*.
                        c.steps = n_star;
                        c.step = length / static_cast<double>(n_star);
                        c.estimated_error = fine_estimate;
                        c.error_band = fine_band;
                        c.basis = fine_basis;
                        c.stability = detail::stability_of_run(p, m, runs, n_star, opt, stability_evaluations);
                        c.reference_error = runs.error_against(n_star, *truth);
                    }
                    verified(*truth);
                } else if (auto refused = without_reference()) {
                    return finish(*refused);
                }
            }
            return finish(c);
        }
    } catch (const budget_exhausted& e) {
        return budget_refusal(e);
    }
    return finish(detail::refuse(c, refusal::order_not_settled,
                                 "no step passed the confirmation in 12 attempts (" + notes +
                                     "); the Richardson predictions keep missing: the error does not follow the order seen on "
                                     "the coarser runs (" + L.readings_text(3) + "). Check the declared order and the smoothness "
                                     "of the right-hand side."));
}

} // namespace stepcert
