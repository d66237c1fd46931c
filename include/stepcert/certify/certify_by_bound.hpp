#pragma once
// The "bounded" level of step certification (needs Eigen): a rigorous bound on the global error
// of a fixed-step one-step method of order p from constants the user vouches for, in the
// tolerance's norm (max: the inf-norm; rms: the 2-norm, whose induced and logarithmic norms its
// 1/sqrt(n) scale leaves unchanged):
//   * a growth rate r: a Lipschitz constant L > 0 of f, or an upper bound mu (any sign) of the
//     logarithmic norm of the Jacobian on a convex region holding the solution and the run, so
//     that exact solutions through two of its points separate no faster than e^{r t};
//   * C with |tau| <= C h^(p+1) for the local error tau (exact flow minus the method's step) of
//     every step of size h <= h_max taken from a point of the run.
// The local errors carried to t1 by the exact flow add up to (Lady Windermere's fan, the
// recursion of bound/transported_bound.hpp with tau_k = tau: E. Hairer, S. P. Nørsett, G. Wanner,
// Solving ODEs I, §II.3, Thm 3.4; with mu: G. Dahlquist 1959, ibid. §I.10, Thm 10.6 — from memory)
//   E_N <= tau (e^{rT} - 1) / (e^{rh} - 1),  tau = C h^(p+1), h = T / N   (N tau = C h^p T for r = 0),
// at most the classic C h^p (e^{rT} - 1) / r for r > 0. For r < 0 that classic form is no bound
// (the fan's sum is a left Riemann sum of a decreasing function, above the integral): the sum is
// kept; it saturates at tau / (1 - e^{rh}) ~ C h^p / |r| as T grows. E_N grows with T, so t1
// decides for every output time. A tolerance with rtol > 0 is no fixed norm (its weights follow
// the solution): only rtol = 0 is bounded. Rounding is outside the bound: the bound is aimed
// below 1 by the round-off model's allowance (core/round_off.hpp at |y0|), named in the basis.
#include <algorithm>
#include <cmath>
#include <cstddef>
#include <limits>
#include <string>

#include "stepcert/bound/logarithmic_norm.hpp"
#include "stepcert/bound/transported_bound.hpp"
#include "stepcert/certify/certify_fixed_step.hpp"

namespace stepcert {

/// What the user vouches for (see the top of this file).
struct bound_constants {
    growth_kind growth = growth_kind::lipschitz;  ///< which rate `rate` is
    double rate = 0.0;         ///< L > 0 (lipschitz) or mu, any sign (logarithmic_norm)
    double local_error = 0.0;  ///< C >= 0: |tau| <= C h^(p+1)
    double max_step = 0.0;     ///< h_max > 0 (may be +inf): C holds for every step h <= h_max

    static bound_constants lipschitz(double L, double C, double h_max) { return {growth_kind::lipschitz, L, C, h_max}; }
    static bound_constants log_norm(double mu, double C, double h_max) { return {growth_kind::logarithmic_norm, mu, C, h_max}; }
};

/// The matrix norm the constants are meant in, for a tolerance of this kind.
inline matrix_norm constants_norm(const weighted_norm& tol) {
    return tol.kind == norm_kind::max ? matrix_norm::infinity : matrix_norm::two;
}

/// The fan bound on the global error at t0 + span after n uniform steps, in the constants' norm
/// (not divided by atol); raised by 64 eps to cover its own rounding (pow, expm1, the ratio).
inline double uniform_step_bound(const bound_constants& k, int order, double span, std::size_t n) {
    if (k.local_error == 0.0) return 0.0;
    const double h = span / static_cast<double>(n), r = k.rate;
    const double growth = r == 0.0 ? static_cast<double>(n) : std::expm1(r * span) / std::expm1(r * h);
    return k.local_error * std::pow(h, order + 1) * growth * (1.0 + 64 * std::numeric_limits<double>::epsilon());
}

namespace detail {

inline void check_bound_constants(const bound_constants& k, const std::string& who) {
    const std::string got = " (got " + std::to_string(k.rate) + ")";
    if (k.growth == growth_kind::lipschitz && (!(k.rate > 0.0) || !std::isfinite(k.rate)))
        throw invalid_input(who + "the Lipschitz constant L must be finite and > 0" + got +
                            "; for a contracting problem give an upper bound mu of the logarithmic norm instead, which may be <= 0.");
    if (!std::isfinite(k.rate))
        throw invalid_input(who + "the logarithmic norm bound mu must be finite" + got + "; give an upper bound of mu[df/dy] "
                            "along the solution (bound/logarithmic_norm.hpp for a constant matrix).");
    if (!(k.local_error >= 0.0) || !std::isfinite(k.local_error))
        throw invalid_input(who + "the local error constant C must be finite and >= 0 (got " + std::to_string(k.local_error) +
                            "): |tau| <= C h^(p+1) for every step h <= h_max.");
    if (!(k.max_step > 0.0))
        throw invalid_input(who + "h_max must be > 0 (got " + std::to_string(k.max_step) +
                            "): it is the largest step for which the local error constant C holds.");
}

/// The largest h with the bound at t0 + span <= aim (N = span / h taken as real), capped at span.
inline double largest_bounded_step(const bound_constants& k, int order, double span, double aim) {
    const double C = k.local_error, r = k.rate, q = 1.0 / order;
    if (C == 0.0) return span;
    if (r > 0.0) return std::min(span, std::pow(aim * r / (C * std::expm1(r * span)), q));  // the classic form
    if (r == 0.0) return std::min(span, std::pow(aim / (C * span), q));
    // r < 0: at fixed T the sum grows with h (h / (1 - e^{rh}) does); bisect it below the step of
    // the saturated classic form, where the sum is already above aim.
    auto sum = [&](double h) { return C * std::pow(h, order + 1) * std::expm1(r * span) / std::expm1(r * h); };
    double lo = 0.0, hi = std::min(span, std::pow(aim * -r / (C * -std::expm1(r * span)), q));
    if (!(hi > 0.0) || sum(hi) <= aim) return hi > 0.0 ? hi : 0.0;
    for (int i = 0; i < 200 && hi - lo > 1e-13 * hi; ++i) (sum(0.5 * (lo + hi)) <= aim ? lo : hi) = 0.5 * (lo + hi);
    return lo;
}

/// Right-hand-side evaluations of one step of m at h from y0 (the budget check comes before the run).
template <class P, class M>
std::size_t evaluations_of_one_step(const P& p, const M& m, double h) {
    using D = rebind_state<typename P::state_type, double>;
    D y = convert_state<D>(p.y0());
    std::size_t count = 0;
    const typename P::rhs_type f = p.rhs();
    const counted_rhs<typename P::rhs_type> rhs{&f, &count, 1'000'000};
    m.integrate_uniform(rhs, y, static_cast<double>(p.t0()), h, std::size_t{1}, std::size_t{1}, [](const auto&, const auto&) {});
    return std::max<std::size_t>(count, 1);
}

} // namespace detail

/// The step of method m on problem p that the bound from the constants k certifies for tol
/// (atol only); refuses (not_certified, with the reason) when the budget, rounding or the
/// stability check stands in the way.
template <problem_like P, fixed_step_method M>
step_certificate certify_by_bound(const P& p, const M& m, const weighted_norm& tol, const bound_constants& k,
                                  const certify_options& opt = {}) {
    const std::string who = "stepcert::certify_by_bound: ";
    detail::check_certify_arguments(p, m, tol, opt, who);
    if (tol.rtol != 0.0)
        throw invalid_input(who + "the tolerance has a relative part (rtol = " + std::to_string(tol.rtol) +
                            "): its weights atol + rtol |y_i| follow the solution, so it is not a fixed norm and no L, mu "
                            "or C holds in it; give an absolute tolerance (rtol = 0) in the unit you need.");
    detail::check_bound_constants(k, who);
    const std::size_t G = opt.output_times;
    const int order = m.order();
    const double span = static_cast<double>(p.t1() - p.t0()), atol = tol.atol;
    step_certificate c = detail::blank_certificate(p, m.name(), order, tol, opt);

    // The fewest steps, a multiple of G, with h <= h_max and the bound <= aim (0: none below 1e18).
    auto steps_for = [&](double aim) -> std::size_t {
        const double n_real = std::ceil(span / std::min(k.max_step, detail::largest_bounded_step(k, order, span, aim * atol)));
        if (!(n_real <= 1e18)) return 0;
        std::size_t n = detail::round_up_to(static_cast<std::size_t>(n_real), G);
        auto meets = [&] { return span / static_cast<double>(n) <= k.max_step && uniform_step_bound(k, order, span, n) <= aim * atol; };
        for (int i = 0; i < 64 && !meets(); ++i) n = detail::round_up_to(n + std::max(G, n / 1000), G);  // the closed form's rounding
        return meets() ? n : 0;
    };
    // Rounding (a model, not part of the bound): aim below 1 by twice its value at the first N,
    // which covers its growth with the larger N.
    std::size_t n = steps_for(1.0);
    const double rounding_at_start = detail::round_off_units_at_start(p, tol, opt.round_off_factor);
    if (const double rounding = rounding_at_start * std::sqrt(static_cast<double>(n)); n != 0) {
        if (rounding >= 0.5)
            return detail::refuse(c, refusal::below_round_off_floor,
                                  "the rounding of " + std::to_string(n) + " steps (" + detail::certificate_number(rounding) +
                                      " of the tolerance by the round-off model) leaves no room for the bound; loosen the "
                                      "tolerance, or run a multiprecision state.");
        if (uniform_step_bound(k, order, span, n) / atol + rounding > 1.0) n = steps_for(1.0 - 2.0 * rounding);
    }
    if (n == 0)
        return detail::refuse(c, refusal::budget_exhausted,
                              "the bound cannot meet the tolerance with any step count up to 1e18 (e^{rT} or C too large); "
                              "give sharper constants (mu in place of L on a dissipative problem, a smaller C) or loosen it.");

    const double h = span / static_cast<double>(n);
    const std::size_t per_step = detail::evaluations_of_one_step(p, m, h);
    c.evaluations = per_step;
    if (per_step > opt.max_evaluations || n > (opt.max_evaluations - per_step) / per_step)
        return detail::refuse(c, refusal::budget_exhausted,
                              "the bound meets the tolerance only with N = " + std::to_string(n) + " steps (h = " +
                                  detail::certificate_number(h) + "), about " + detail::certificate_number(double(n) * double(per_step)) +
                                  " evaluations at " + std::to_string(per_step) + " per step, over the budget of " +
                                  std::to_string(opt.max_evaluations) + "; raise max_evaluations, give sharper constants (mu "
                                  "in place of L on a dissipative problem, a smaller C) or loosen the tolerance.");
    certify_options run_opt = opt;
    run_opt.max_evaluations -= per_step;
    detail::certify_runs<P, M> runs(p, m, tol, run_opt);
    std::size_t stability_evaluations = 0;
    auto finish = [&](step_certificate out) {
        out.evaluations = per_step + runs.evaluations() + stability_evaluations;
        return out;
    };
    try {
        runs.at(n);
        c.stability = detail::stability_of_run(p, m, runs, n, opt, stability_evaluations);
    } catch (const non_finite_value& e) {
        return finish(detail::refuse(c, refusal::non_finite, e.what()));
    } catch (const budget_exhausted& e) {
        return finish(detail::refuse(c, refusal::budget_exhausted, e.what()));
    }
    if (c.stability.checked && !c.stability.stable)
        return finish(detail::refuse(c, refusal::unstable,
                                     "the bound allows h = " + detail::certificate_number(h) + ", but it puts h lambda outside the "
                                     "method's stability region (" + c.stability.worst_mode + "), where C cannot hold; the "
                                     "largest stable step found is " + detail::certificate_number(c.stability.step_limit) +
                                     ": check C and h_max, and give h_max below that step."));

    c.level = evidence_level::bounded;
    c.steps = n, c.step = h;
    c.bound = uniform_step_bound(k, order, span, n) / atol;
    const bool lipschitz = k.growth == growth_kind::lipschitz;
    std::string b = lipschitz ? "Lipschitz constant L = " : "logarithmic norm bound mu = ";
    b += detail::certificate_number(k.rate) + " (given, " + matrix_norm_name(constants_norm(tol)) + "), local error |tau| <= C h^" +
         std::to_string(order + 1) + " with C = " + detail::certificate_number(k.local_error) + " for h <= " +
         detail::certificate_number(k.max_step) + " (given); fan bound C h^(p+1) (e^{rT} - 1)/(e^{rh} - 1)";
    b += lipschitz ? " <= C h^p (e^{LT} - 1)/L (Hairer, Norsett, Wanner I, Thm II.3.4)"
                   : " (Dahlquist 1959; Hairer, Norsett, Wanner I, Thm I.10.6)";
    b += " = " + detail::certificate_number(c.bound) + " of the tolerance at t1 with " + std::to_string(n) +
         " steps; rounding allowance " + detail::certificate_number(rounding_at_start * std::sqrt(static_cast<double>(n))) +
         " (round-off model, not part of the bound)";
    c.basis = std::move(b);
    return finish(c);
}

} // namespace stepcert
