#pragma once
// order_study(problem, method, ladder, options): runs the method on every level of a ladder,
// measures the global error on an output grid common to all levels, finds the asymptotic
// range (study/asymptotic_range.hpp) and fits the observed order with a confidence interval.
//
// Error basis (options.basis, `automatic` takes the first that applies):
//  1. the problem's exact solution, evaluated in exact_evaluation_real (50 digits) when it is
//     generic in the scalar type, else in the problem's own scalar type;
//  2. a multiprecision reference_solution at the grid times, only for problems without an exact
//     solution (so studies of problems with one never instantiate multiprecision integrators),
//     or one computed once and passed in for several studies (the overload taking it);
//     chosen automatically and unable to vouch for its digits, it falls back to 3, saying why;
//  3. no reference: differences of successive levels, Richardson's observed order.
// Round-off floor of a level with N steps: round_off_factor * sqrt(N) * eps * |y| in the norm's
// units (statistical accumulation of rounding errors; common practice, no source), plus the
// reference's own uncertainty |y| * 10^-digits. Measured with classic RK4 on Kepler e = 0.5, the
// plateau sits 5-60x above sqrt(N) eps |y|, while N eps |y| would already discard levels on the
// clean slope, so the floor is a backstop and the plateau is mostly detected by its local orders.
// Not in the floor: the rounding of output times (about |y'| ulp(t)), e.g. 4e-14 on that orbit.
// Ceiling (range_settings::max_relative_error): errors above 10% of the solution's size (of y0
// and the reference on the grid) leave no correct digit and count as pre-asymptotic.
#include <algorithm>
#include <cmath>
#include <concepts>
#include <cstddef>
#include <limits>
#include <numeric>
#include <string>
#include <type_traits>
#include <utility>
#include <vector>

#include <boost/multiprecision/cpp_bin_float.hpp>

#include "stepcert/core/error.hpp"
#include "stepcert/core/norm.hpp"
#include "stepcert/core/problem.hpp"
#include "stepcert/core/round_off.hpp"
#include "stepcert/methods/method.hpp"
#include "stepcert/reference/exact_evaluation.hpp"
#include "stepcert/reference/reference_grid.hpp"
#include "stepcert/reference/reference_solution.hpp"
#include "stepcert/run/counted_rhs.hpp"
#include "stepcert/run/run.hpp"
#include "stepcert/study/asymptotic_range.hpp"
#include "stepcert/study/ladder.hpp"
#include "stepcert/study/order_fit.hpp"
#include "stepcert/study/richardson.hpp"
#include "stepcert/study/study_result.hpp"


namespace stepcert {

namespace detail {

/// p with its right-hand side counted into *count, also in runs that fail midway (each run
/// enforces its own share of the budget); p must outlive the result.
template <class P>
auto with_counted_rhs(const P& p, std::size_t* count) {
    using R = counted_rhs<typename P::rhs_type>;
    return problem<typename P::state_type, R, typename P::exact_type, typename P::jacobian_type>(
        p.name(), R{&p.rhs(), count, std::numeric_limits<std::size_t>::max()}, p.y0(), p.t0(), p.t1(), p.exact(), p.jacobian(),
        p.separable());
}

/// Size of a state in the norm's units: what "relative error 1" means there.
template <class R>
double state_scale(const weighted_norm& nrm, const R& ref) {
    double acc = 0.0;
    const std::size_t n = state_size(ref);
    for (std::size_t i = 0; i < n; ++i) {
        const double r = std::abs(static_cast<double>(ref[i]));
        const double c = r / (nrm.atol + nrm.rtol * r);
        acc = nrm.kind == norm_kind::max ? std::max(acc, c) : acc + c * c;
    }
    return nrm.kind == norm_kind::max ? acc : std::sqrt(acc / static_cast<double>(n));
}

/// Errors of one level over the grid points 1..G, against references ref(j).
struct grid_errors {
    double final_error = 0.0, grid_error = 0.0;  // at j = G, max over j
    double final_scale = 0.0, grid_scale = 0.0;  // |reference| at j = G, max over j
};

template <class S, class RefAt>
grid_errors errors_on_grid(const weighted_norm& nrm, const std::vector<S>& states, std::size_t G, RefAt&& ref_at) {
    grid_errors g;
    for (std::size_t j = 1; j <= G; ++j) {
        const auto& ref = ref_at(j);
        const double e = nrm(states[j], ref);
        const double sc = state_scale(nrm, ref);
        // NaN never counts as small: propagate it as +inf.
        g.grid_error = std::isnan(e) ? std::numeric_limits<double>::infinity() : std::max(g.grid_error, e);
        g.grid_scale = std::max(g.grid_scale, sc);
        if (j == G) {
            g.final_error = std::isnan(e) ? std::numeric_limits<double>::infinity() : e;
            g.final_scale = sc;
        }
    }
    return g;
}

inline double local_order_between(double h_prev, double h, double e_prev, double e) {
    if (!std::isfinite(e_prev) || !std::isfinite(e) || !(e_prev > 0.0) || !(e > 0.0) || !(h_prev > 0.0) || !(h > 0.0) ||
        h_prev == h)
        return std::numeric_limits<double>::quiet_NaN();
    return std::log(e_prev / e) / std::log(h_prev / h);
}

/// No shared reference (see the order_study overload that takes one).
struct no_shared_reference {};

template <class T, class P, class M, class Ladder, class Shared>
order_study_result order_study_impl(const P& p, const M& m, const Ladder& ladder, const study_options& opt, const Shared& shared) {
    constexpr bool has_shared = !std::is_same_v<Shared, no_shared_reference>;
    static_assert(problem_like<P>, "stepcert::order_study: the first argument must be a stepcert::problem (make_problem(...)).");
    static_assert(method<M>, "stepcert::order_study: the method must satisfy stepcert::fixed_step_method (integrate_uniform) "
                             "or stepcert::adaptive_method (integrate_adaptive), with name(), order() and control.");
    constexpr bool fixed = fixed_step_method<M>;
    if constexpr (fixed)
        static_assert(std::is_same_v<Ladder, step_ladder>,
                      "stepcert::order_study: a fixed-step method needs a step_ladder{coarsest_steps, ratio, levels}.");
    else
        static_assert(std::is_same_v<Ladder, tolerance_ladder>,
                      "stepcert::order_study: an adaptive method needs a tolerance_ladder{coarsest, ratio, levels}.");

    using Tr = std::conditional_t<std::is_void_v<T>, typename P::scalar_type, T>;
    using S = rebind_state<typename P::state_type, Tr>;
    opt.validate();
    ladder.validate();
    if constexpr (fixed) detail::refuse_breakpoints(p, "stepcert::order_study");

    const std::size_t L = ladder.levels;
    const double length = static_cast<double>(p.t1()) - static_cast<double>(p.t0());

    order_study_result res;
    res.problem = p.name();
    res.method = std::string(m.name());
    res.declared_order = m.order();
    res.variable_order = has_variable_order_v<M>;
    if constexpr (requires { { m.stage_order() } -> std::convertible_to<int>; }) res.stage_order = m.stage_order();
    res.control = M::control;
    res.ladder = ladder.describe();
    res.ratio = ladder.ratio;
    res.working_digits = std::numeric_limits<Tr>::digits10;
    res.fit_measure = opt.fit_measure;
    res.norm = opt.norm;
    res.levels.resize(L);

    // The basis, settled before any run so a wrong choice costs nothing.
    error_basis basis = opt.basis;
    if constexpr (has_shared) {
        if (basis == error_basis::exact_solution || basis == error_basis::successive_differences)
            throw invalid_input("stepcert::order_study: a shared reference was given, but study_options::basis asks for " +
                                std::string(to_string(basis)) + "; leave the basis automatic or ask for reference_solution.");
        basis = error_basis::reference_solution;
    }
    if (basis == error_basis::automatic) {
        if constexpr (P::has_exact)
            basis = error_basis::exact_solution;
        else
            basis = error_basis::reference_solution;
    }
    if (basis == error_basis::exact_solution && !P::has_exact)
        throw unsupported_operation("stepcert::order_study: error_basis::exact_solution was asked for, but problem '" + p.name() +
                                    "' has no exact solution; attach one with .with_exact(...) or use another basis.");
    if (basis == error_basis::reference_solution && P::has_exact)
        throw unsupported_operation("stepcert::order_study: problem '" + p.name() + "' has an exact solution, so no reference "
                                    "solution is computed for it (that keeps multiprecision integrators out of such studies); "
                                    "use error_basis::exact_solution, or build the problem without .with_exact(...).");

    // Output grid common to all levels: t0 + j (t1 - t0) / G, j = 1..G. Every basis computes
    // these times in its own type (never rounded to double first), so a run's output time
    // differs from them by the rounding of its own type only.
    std::vector<std::size_t> steps_of;
    std::size_t G = 0;
    if constexpr (fixed) {
        steps_of = ladder.steps();
        G = ladder.common_divisor();
    } else {
        G = opt.adaptive_grid_points;
    }
    const uniform_times grid{G};
    // A shared reference is checked before any run: its times must cover the grid.
    std::vector<std::size_t> shared_index;
    if constexpr (has_shared) {
        shared_index = reference_grid_indices<Tr>(p, shared, G, "stepcert::order_study");
        const int digits_asked = opt.reference_digits > 0 ? opt.reference_digits : res.working_digits + 5;
        if (opt.require_reference_digits && shared.vouched_digits < digits_asked)
            throw accuracy_unreachable("stepcert::order_study: the shared reference of problem '" + p.name() + "' vouches for " +
                                       detail::short_number(shared.vouched_digits, "%.1f") + " digits, fewer than the " +
                                       std::to_string(digits_asked) + " this study requires; compute it with more digits.");
    }
    std::vector<Tr> adaptive_times;
    if constexpr (!fixed) adaptive_times = grid.in<Tr>(static_cast<Tr>(p.t0()), static_cast<Tr>(p.t1()));
    res.grid_points = G;

    // Runs, within one evaluation budget for the whole study.
    std::size_t spent = 0;
    const auto counted = detail::with_counted_rhs(p, &spent);
    std::vector<trajectory<S>> runs(L);
    std::vector<char> ran(L, 0);
    for (std::size_t k = 0; k < L; ++k) {
        study_level& lv = res.levels[k];
        lv.index = k;
        if (spent >= opt.budget.max_evaluations)
            throw budget_exhausted("stepcert::order_study: the evaluation budget of " + std::to_string(opt.budget.max_evaluations) +
                                   " was used up before level " + std::to_string(k) +
                                   "; raise study_options::budget.max_evaluations or use fewer levels.");
        const run_options ro{opt.budget.max_evaluations - spent};
        const std::size_t before = spent;
        try {
            if constexpr (fixed) {
                lv.steps = steps_of[k];
                lv.h = length / static_cast<double>(steps_of[k]);
                runs[k] = run_uniform<Tr>(counted, m, steps_of[k], steps_of[k] / G, ro);
            } else {
                lv.tolerance = ladder.tolerance(k);
                runs[k] = run_adaptive<Tr>(counted, m, ladder.at(k), adaptive_times, ro);
                lv.steps = runs[k].stats.steps;
                lv.rejected = runs[k].stats.rejected;
                lv.h = lv.steps > 0 ? length / static_cast<double>(lv.steps) : std::numeric_limits<double>::quiet_NaN();
            }
            ran[k] = 1;
        } catch (const non_finite_value&) {
            lv.note = "the solution became NaN or infinite during the run";
        } catch (const budget_exhausted&) {
            throw budget_exhausted("stepcert::order_study: level " + std::to_string(k) + " exceeded the study's evaluation budget of " +
                                   std::to_string(opt.budget.max_evaluations) + " (" + std::to_string(before) +
                                   " already spent on coarser levels); raise study_options::budget.max_evaluations or use fewer levels.");
        }
        lv.evaluations = spent - before;
    }
    res.total_evaluations = spent;

    // Errors per level against the chosen basis.
    const Tr eps = std::numeric_limits<Tr>::epsilon();
    std::vector<detail::grid_errors> errs(L);
    double ref_rel = 0.0;  // the reference's own relative uncertainty
    std::string fallback_note;

    if (basis == error_basis::exact_solution) {
        if constexpr (P::has_exact) {
            using X = detail::exact_real_for<P, Tr>;
            using SX = rebind_state<typename P::state_type, X>;
            res.reference_digits = std::numeric_limits<X>::digits10;
            ref_rel = std::pow(10.0, -res.reference_digits);
            res.basis_detail = "exact solution, evaluated with " + std::to_string(std::numeric_limits<X>::digits10) +
                               " digits at the grid times";
            if constexpr (std::is_same_v<X, typename P::scalar_type> && !std::is_same_v<X, exact_evaluation_real>)
                res.basis_detail += " (the exact solution is not generic in the scalar type, so it ran in the problem's own type)";
            std::vector<SX> exact_states(G, state_traits<SX>::make(p.dimension()));
            const std::vector<X> exact_times = grid.in<X>(static_cast<X>(p.t0()), static_cast<X>(p.t1()));
            for (std::size_t j = 1; j <= G; ++j) p.exact()(exact_times[j - 1], exact_states[j - 1]);
            for (std::size_t k = 0; k < L; ++k)
                if (ran[k])
                    errs[k] = detail::errors_on_grid(opt.norm, runs[k].states, G,
                                                     [&](std::size_t j) -> const SX& { return exact_states[j - 1]; });
        }
    } else if (basis == error_basis::reference_solution) {
        if constexpr (!P::has_exact) {
            // Errors against ref.states[index(j)] at grid time j.
            auto measure_against = [&](const auto& ref, auto&& index, const std::string& what) {
                res.reference_digits = ref.vouched_digits;
                ref_rel = std::pow(10.0, -ref.vouched_digits);
                res.basis_detail = what + " (" + std::to_string(ref.requested_digits) + " digits asked, " +
                                   detail::short_number(ref.vouched_digits, "%.1f") + " vouched): " + ref.how;
                for (std::size_t k = 0; k < L; ++k)
                    if (ran[k])
                        errs[k] = detail::errors_on_grid(opt.norm, runs[k].states, G,
                                                         [&](std::size_t j) -> const auto& { return ref.states[index(j)]; });
            };
            if constexpr (has_shared) {
                // Its cost was paid once, outside this study: reported, not added to total_evaluations.
                res.reference_evaluations = shared.cost.evaluations;
                res.reference_shared = true;
                measure_against(shared, [&](std::size_t j) { return shared_index[j - 1]; },
                                "shared reference solution, computed once for several studies");
            } else {
                const int digits_asked = opt.reference_digits > 0 ? opt.reference_digits : res.working_digits + 5;
                reference_options ro;
                ro.max_evaluations = opt.budget.max_evaluations - std::min(opt.budget.max_evaluations, spent);
                ro.allow_fewer_digits_if_double_only = !opt.require_reference_digits;
                try {
                    const auto ref = reference_solution(p, digits_asked, grid, ro);
                    if (ref.states.size() != G)
                        throw error("stepcert::order_study: the reference solution returned " + std::to_string(ref.states.size()) +
                                    " states for " + std::to_string(G) + " grid times.");
                    res.reference_evaluations = ref.cost.evaluations;
                    res.total_evaluations += ref.cost.evaluations;
                    measure_against(ref, [](std::size_t j) { return j - 1; }, "reference solution");
                } catch (const accuracy_unreachable& e) {
                    // Asked for explicitly: the user wants to know. Chosen automatically: say why, then fall back.
                    if (opt.basis == error_basis::reference_solution) throw;
                    basis = error_basis::successive_differences;
                    fallback_note = std::string(" (no reference solution: ") + e.what() + ")";
                }
            }
        }
    }
    if (basis == error_basis::successive_differences) {
        res.basis_detail = "no reference: the error columns hold differences |y_k - y_(k-1)| of successive levels "
                           "(Richardson's observed order)" + fallback_note;
        for (std::size_t k = 1; k < L; ++k) {
            if (!ran[k] || !ran[k - 1]) {
                errs[k].final_error = errs[k].grid_error = std::numeric_limits<double>::infinity();
                continue;
            }
            errs[k] = detail::errors_on_grid(opt.norm, runs[k - 1].states, G, [&](std::size_t j) -> const S& { return runs[k].states[j]; });
        }
    }
    res.basis = basis;
    const bool differences = basis == error_basis::successive_differences;

    // Fill the table: errors, floors, local orders. The ceiling scale includes y0, so a solution
    // that passes through zero at the grid times still has a size.
    const double inf = std::numeric_limits<double>::infinity();
    const double y0_scale = detail::state_scale(opt.norm, p.y0());
    std::vector<double> ceilings(L, inf);
    // With differences the best size estimate is the finest solution that ran (coarse ones may have blown up).
    double solution_scale = 0.0;
    for (std::size_t k = L; k-- > 0;)
        if (ran[k]) {
            solution_scale = differences ? std::max(solution_scale, detail::errors_on_grid(opt.norm, runs[k].states, G, [&](std::size_t j) -> const S& {
                                                                         return runs[k].states[j];
                                                                     }).grid_scale)
                                         : 0.0;
            break;
        }
    for (std::size_t k = 0; k < L; ++k) {
        study_level& lv = res.levels[k];
        if (differences && k == 0) continue;
        const bool ok = differences ? (ran[k] && ran[k - 1]) : ran[k];
        lv.error_final = ok ? errs[k].final_error : inf;
        lv.error_grid = ok ? errs[k].grid_error : inf;
        const double scale = opt.fit_measure == error_measure::final_time ? errs[k].final_scale : errs[k].grid_scale;
        const double size = std::max(y0_scale, differences ? solution_scale : errs[k].grid_scale) * opt.range.max_relative_error;
        if (ok && size > 0.0) ceilings[k] = size;
        lv.round_off_floor = ok ? round_off_floor(opt.range.round_off_factor, lv.steps, static_cast<double>(eps), scale) +
                                      scale * ref_rel
                                : std::numeric_limits<double>::quiet_NaN();
    }
    for (std::size_t k = differences ? 2 : 1; k < L; ++k) {
        const double e_prev = res.levels[k - 1].error(opt.fit_measure), e = res.levels[k].error(opt.fit_measure);
        res.levels[k].local_order = differences
            ? three_level_order(res.levels[k - 2].h, res.levels[k - 1].h, res.levels[k].h, e_prev, e)
            : detail::local_order_between(res.levels[k - 1].h, res.levels[k].h, e_prev, e);
    }

    // Asymptotic range over the error (or difference) sequence.
    const std::size_t first_point_level = differences ? 1 : 0;
    std::vector<convergence_point> pts;
    for (std::size_t k = first_point_level; k < L; ++k) {
        const study_level& lv = res.levels[k];
        pts.push_back({lv.h, lv.error(opt.fit_measure), lv.local_order, lv.round_off_floor, ceilings[k]});
    }
    const asymptotic_range range = find_asymptotic_range(pts, opt.range);
    if (differences) {
        res.levels[0].status = ran[0] ? level_status::baseline : level_status::non_finite;
        if (ran[0]) res.levels[0].note = "coarsest level: the baseline of the first difference";
    }
    for (std::size_t i = 0; i < pts.size(); ++i) {
        study_level& lv = res.levels[i + first_point_level];
        lv.status = range.status[i];
        if (lv.note.empty() || lv.status != level_status::non_finite) lv.note = range.notes[i];
        if (lv.status == level_status::non_finite && (!ran[lv.index] || (differences && !ran[lv.index - 1])))
            lv.note = ran[lv.index] ? "the previous level's run became NaN or infinite" : "the solution became NaN or infinite during the run";
    }

    // Name the reference when its uncertainty, not round-off, is what the floor is made of.
    for (study_level& lv : res.levels) {
        if (lv.status != level_status::round_off_plateau || ref_rel == 0.0 || !std::isfinite(lv.round_off_floor)) continue;
        const double scale = opt.fit_measure == error_measure::final_time ? errs[lv.index].final_scale : errs[lv.index].grid_scale;
        const double ref_part = scale * ref_rel;
        if (lv.error(opt.fit_measure) <= lv.round_off_floor && ref_part >= 0.5 * lv.round_off_floor)
            lv.note = "error " + detail::short_number(lv.error(opt.fit_measure)) + " is within the reference's own uncertainty " +
                      detail::short_number(ref_part) + " (" + detail::short_number(res.reference_digits, "%.1f") +
                      " digits vouched) plus round-off";
    }

    if (range.found) {
        res.verdict = study_verdict::order_fitted;
        const std::size_t a = range.first + first_point_level, b = range.last + first_point_level;
        std::vector<double> h, hc, e;
        for (std::size_t k = a; k <= b; ++k) {
            h.push_back(res.levels[k].h);
            e.push_back(res.levels[k].error(opt.fit_measure));
            if (differences) hc.push_back(res.levels[k - 1].h);
        }
        res.fit = differences ? fit_order_from_differences(hc, h, e, opt.confidence) : fit_order(h, e, opt.confidence);
        // With differences the coarse partner of the first difference belongs to the range too.
        res.range_first = differences ? a - 1 : a;
        if (differences) {
            res.levels[a - 1].status = level_status::in_range;
            res.levels[a - 1].note = "coarse end of the first difference in the range (its own difference is not fitted)";
        }
        res.range_last = b;
        res.verdict_text = range.verdict + (differences ? " (differences of levels " + std::to_string(res.range_first) + ".." +
                                                              std::to_string(b) + ")"
                                                        : " (levels " + std::to_string(a) + ".." + std::to_string(b) + ")");
        // Below the declared order, but not below the stage order: order reduction on a stiff
        // problem (the stage order bounds the order where h|lambda| is large), not a faulty method.
        const int q = res.stage_order;
        if (q > 0 && q < res.declared_order && res.fit.upper < res.declared_order - 0.2 && res.fit.order >= q - 0.25) {
            res.order_reduction = true;
            res.verdict_text += "; the observed order " + detail::short_number(res.fit.order, "%.2f") + " is below the declared " +
                                std::to_string(res.declared_order) + " but not below the method's stage order " + std::to_string(q) +
                                ": consistent with order reduction on a stiff problem (where h|lambda| is large the stage order "
                                "limits the order; Prothero and Robinson 1974), not a faulty method. The declared order shows "
                                "where h|lambda| is small: take smaller steps, or a less stiff problem, to see it.";
        }
    } else {
        res.verdict = study_verdict::no_asymptotic_range;
        res.verdict_text = range.verdict;
        if (differences && L == 3 && std::isfinite(res.levels[2].local_order))
            res.verdict_text += "; the three levels give an observed order of " + detail::short_number(res.levels[2].local_order, "%.3f") +
                                ", but one value cannot show that they are in the asymptotic range: add a level";
    }
    return res;
}

} // namespace detail

/// Runs an order study; see the header comment. T is the scalar type the method runs in
/// (default: the problem's). Fixed-step methods take a step_ladder, adaptive ones a tolerance_ladder;
/// a braced list such as {50, 2.0, 8} is read as the one the method takes.
template <class T = void, class P, class M,
          class Ladder = std::conditional_t<fixed_step_method<M>, step_ladder, tolerance_ladder>>
order_study_result order_study(const P& p, const M& m, const Ladder& ladder, const study_options& opt = {}) {
    return detail::order_study_impl<T>(p, m, ladder, opt, detail::no_shared_reference{});
}

/// As above, with errors measured against a reference computed once for several studies of a
/// problem without an exact solution: reference_solution(p, digits, uniform_times{G0}), where G0
/// is a multiple of every study's grid size (fixed steps: the ladder's common divisor; adaptive:
/// adaptive_grid_points). Its cost is reported in reference_evaluations, not in total_evaluations.
template <class T = void, class P, class M,
          class Ladder = std::conditional_t<fixed_step_method<M>, step_ladder, tolerance_ladder>, class RS>
order_study_result order_study(const P& p, const M& m, const Ladder& ladder, const study_options& opt,
                               const reference_result<RS>& shared_reference) {
    return detail::order_study_impl<T>(p, m, ladder, opt, shared_reference);
}

} // namespace stepcert
