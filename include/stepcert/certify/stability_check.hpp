#pragma once
// Linear stability of a step h along a run (needs Eigen). At sample states the Jacobian's
// eigenvalues lambda are formed; for each decaying one the method's amplification factor
// R(h lambda) is measured, not looked up: one step of size 1 on y' = A y, A = [[x, -y], [y, x]]
// (the real form of y' = z y, z = x + iy), from (1, 0) ends at (Re R(z), Im R(z)). That holds for
// every linear one-step method, explicit or implicit, with or without a tableau (E. Hairer,
// G. Wanner, Solving ODEs II, §IV.2 — from memory). It is linearized stability with the Jacobian
// frozen at each sample: errors in the decaying modes are damped there, no more (the transient
// growth a non-normal Jacobian allows is not covered).
//
// Which eigenvalues: up to dense_up_to unknowns every eigenvalue of the dense Jacobian (Eigen's
// EigenSolver: O(n^3) time, 8 n^2 bytes). Beyond, only the extreme ones, estimated matrix-free from
// Jacobian-vector products (transport/extreme_eigenvalues.hpp): the largest in magnitude, the
// leftmost and the most oscillatory, a few of each. An explicit method's stability region is
// bounded and contains a stretch of the negative real axis next to 0; scaling h moves every
// h lambda along its ray from 0, and on each ray the outermost eigenvalue crosses the region's
// boundary first. The spectral radius sets the step on stiff, nearly real spectra (diffusion), the
// leftmost the damping-dominated modes, the most oscillatory those near the imaginary axis.
// Not covered: an eigenvalue inside the spectrum's outline that is outermost on its own ray (a
// moderate, weakly damped oscillation when the method's region hugs the imaginary axis, as for
// explicit Euler: its step limit is 2 min(-Re(1/lambda)), set by J^-1's spectrum, not J's), and
// regions whose real stable set has gaps (an interior eigenvalue may fall into one). Each estimate
// is moved outward by its error radius before its |R| is measured, so an estimate's own error
// cannot let an unstable step pass (within the radius' stated assumptions).
#include <algorithm>
#include <cmath>
#include <complex>
#include <cstddef>
#include <initializer_list>
#include <limits>
#include <optional>
#include <sstream>
#include <string>
#include <string_view>
#include <vector>

#include <Eigen/Dense>

#include "stepcert/core/error.hpp"
#include "stepcert/core/state.hpp"
#include "stepcert/methods/method.hpp"
#include "stepcert/run/counted_rhs.hpp"
#include "stepcert/run/run.hpp"
#include "stepcert/transport/extreme_eigenvalues.hpp"
#include "stepcert/transport/jacobian.hpp"
#include "stepcert/transport/jacobian_product.hpp"

namespace stepcert {

/// A mode counts as stable while |R(h lambda)| <= 1 + this. The measured |R| carries the rounding
/// of one method step (about 1e-15 here), so a mode on the boundary (R(-2) = -1 for explicit Euler)
/// is not called unstable by round-off, while (1 + 1e-12)^N stays below 1 + 1e-6 for N <= 1e6 steps.
inline constexpr double amplification_slack = 1e-12;

/// How the Jacobian's eigenvalues are found.
enum class eigenvalue_path {
    automatic,    ///< dense up to dense_up_to unknowns, matrix-free beyond
    dense,        ///< every eigenvalue of the dense Jacobian (refused beyond max_dimension)
    matrix_free,  ///< the extreme eigenvalues from Jacobian-vector products
};

inline std::string_view to_string(eigenvalue_path e) {
    switch (e) {
    case eigenvalue_path::automatic: return "automatic";
    case eigenvalue_path::dense: return "dense";
    case eigenvalue_path::matrix_free: return "matrix-free";
    }
    return "?";
}

struct linear_stability_options {
    double neutral = 1e-8;      ///< Re lambda >= -neutral * max|lambda| (per sample): neutral or growing, not checked
    double max_factor = 1e3;    ///< the stable step limit is searched up to max_factor * h
    double same_mode = 1e-9;    ///< eigenvalues this close (relative) are measured once
    std::size_t max_method_steps = 1'000'000;  ///< budget of measured steps; beyond it budget_exhausted
    std::size_t samples = 16;   ///< sample states along the run (check_run_stability only)
    /// Every eigenvalue of a dense n x n Jacobian is computed (O(n^3) time, 8 n^2 bytes): larger
    /// systems are refused rather than left to run out of memory or time.
    std::size_t max_dimension = 2000;
    eigenvalue_path eigenvalues = eigenvalue_path::automatic;
    /// automatic: dense at or below this many unknowns. Measured (bench/bench_stability_large.cpp,
    /// busbar, one run): the dense check costs 12 ms per sample at 200 unknowns, 97 ms at 400 and
    /// 0.8 s at 800 (n^3), and a certification checks 20 to 50 samples; the matrix-free estimate
    /// takes about 0.6 ms at all these sizes, but sees only the extreme eigenvalues, so small
    /// systems keep every one.
    std::size_t dense_up_to = 200;
    /// Matrix-free estimate (budget of products per sample, tolerance, error radii).
    extreme_eigenvalue_options extreme{};
};

/// A decaying mode: an eigenvalue, the time of the first sample it came from, |R(h lambda)|.
struct stability_mode {
    std::complex<double> lambda;  ///< measured: on the matrix-free path the estimate moved outward by its radius
    double time = 0.0;
    double amplification = 0.0;
    std::complex<double> estimate{};  ///< matrix-free: the Ritz value lambda came from (dense: lambda itself)
    double radius = 0.0;              ///< matrix-free: |lambda - estimate|, the estimate's error bound
};

struct linear_stability_verdict {
    bool stable = true;        ///< |R(h lambda)| <= 1 + amplification_slack for every checked mode
    double step = 0.0;         ///< the h checked
    /// Largest h' with every checked mode stable for all steps in (0, h'] (to the slack); +inf when
    /// none was found up to max_factor * h (limit_found false).
    double step_limit = std::numeric_limits<double>::infinity();
    bool limit_found = false;
    double margin = std::numeric_limits<double>::infinity();  ///< step_limit / step (> 1: stable with room)
    /// The mode closest to leaving the stability region: if unstable, the largest |R(h lambda)|;
    /// if stable, the one that sets step_limit (with no limit, the largest |R|). Empty: nothing checked.
    std::optional<stability_mode> worst;
    std::size_t samples = 0;
    std::size_t eigenvalues_checked = 0;  ///< decaying, over all samples
    std::size_t eigenvalues_skipped = 0;  ///< neutral or growing: physical growth, accuracy governs it
    std::size_t distinct_modes = 0;       ///< measured modes after merging near-equal and conjugate ones
    std::size_t rhs_evaluations = 0;      ///< problem right-hand side: Jacobians (+ the run, check_run_stability)
    std::size_t method_steps = 0;         ///< method steps on the 2-unknown test system
    std::string basis;                    ///< what was checked and how, in words
    eigenvalue_path path = eigenvalue_path::dense;  ///< the one used: dense or matrix_free
    std::size_t jacobian_products = 0;    ///< matrix-free: Jacobian-vector products over all samples
    double largest_radius = 0.0;          ///< matrix-free: largest radius / |estimate| applied (relative)
    bool estimates_converged = true;      ///< matrix-free: every sample's estimate met its tolerance
    double spectral_radius = 0.0;         ///< largest |lambda| seen (matrix-free: estimate + radius)
};

namespace detail {

/// y' = A y with A the real form of multiplication by z = x + iy.
struct complex_multiplier_rhs {
    double x, y;
    template <class S, class T>
    void operator()(const S& u, S& du, T) const {
        du[0] = x * u[0] - y * u[1];
        du[1] = y * u[0] + x * u[1];
    }
};

/// Only fixed-step one-step methods have an amplification factor per step.
template <class M>
void require_one_step_method([[maybe_unused]] const M& m, [[maybe_unused]] const std::string& who) {
    if constexpr (!fixed_step_method<M>)
        throw unsupported_operation(who + "method '" + std::string(m.name()) + "' is adaptive: its step is chosen by its "
                                    "error controller, so one step of a given size is not defined. Check its fixed-step "
                                    "version at the steps the controller takes.");
    else if constexpr (is_multistep<M>::value)
        throw unsupported_operation(who + "method '" + std::string(m.name()) + "' is a multistep method: a step depends on "
                                    "the history (and the first ones are its start-up method), so one step does not measure "
                                    "its stability; its root condition decides it, which this check does not cover.");
}

} // namespace detail

/// R(z): what one step of size 1 of a fixed-step one-step method does to y' = z y.
template <method M>
std::complex<double> amplification_factor(const M& m, std::complex<double> z) {
    const std::string who = "stepcert::amplification_factor: ";
    detail::require_one_step_method(m, who);
    if constexpr (fixed_step_method<M> && !detail::is_multistep<M>::value) {
        if (!std::isfinite(z.real()) || !std::isfinite(z.imag()))
            throw invalid_input(who + "z = h lambda must be finite; check the step and the eigenvalue.");
        std::vector<double> u{1.0, 0.0};  // the state type every fixed-step method accepts (method.hpp)
        std::size_t evaluations = 0;
        const detail::complex_multiplier_rhs f{z.real(), z.imag()};
        const counted_rhs<detail::complex_multiplier_rhs> rhs{&f, &evaluations, 100'000};  // a runaway iteration, if hit
        m.integrate_uniform(rhs, u, 0.0, 1.0, std::size_t{1}, std::size_t{1}, [](const std::vector<double>&, double) {});
        if (!all_finite(u))
            throw non_finite_value(who + "method '" + std::string(m.name()) + "' gave a NaN or infinite result for z = (" +
                                   detail::time_text(z.real()) + ", " + detail::time_text(z.imag()) + "); check its step function.");
        return {u[0], u[1]};
    }
    return {};  // not reached: require_one_step_method threw
}

/// Linear stability of m at step h at the sample states (states[k] at times[k]).
template <problem_like P, method M, class S, class Time>
linear_stability_verdict check_linear_stability(const P& p, const M& m, double h, const std::vector<S>& states,
                                                const std::vector<Time>& times, const linear_stability_options& opt = {}) {
    const std::string who = "stepcert::check_linear_stability: problem '" + p.name() + "': ";
    detail::require_one_step_method(m, who);
    if (!std::isfinite(h) || !(h > 0.0)) throw invalid_input(who + "the step h must be finite and > 0.");
    if (states.empty()) throw invalid_input(who + "no sample states; give at least one state (e.g. a run's trajectory).");
    if (states.size() != times.size())
        throw invalid_input(who + "there are " + std::to_string(states.size()) + " states but " +
                            std::to_string(times.size()) + " times; give one time per state.");
    if (!(opt.neutral >= 0.0 && opt.neutral < 1.0) || !(opt.same_mode >= 0.0 && opt.same_mode < 1e-3) ||
        !(opt.max_factor > 1.0) || !std::isfinite(opt.max_factor))
        throw invalid_input(who + "options: need 0 <= neutral < 1, 0 <= same_mode < 1e-3 and a finite max_factor > 1.");
    linear_stability_verdict v;
    v.step = h;
    v.samples = states.size();
    const std::size_t n = state_size(p.y0());
    const bool dense = opt.eigenvalues == eigenvalue_path::dense ||
                       (opt.eigenvalues == eigenvalue_path::automatic && n <= opt.dense_up_to);
    v.path = dense ? eigenvalue_path::dense : eigenvalue_path::matrix_free;
    if (dense && n > opt.max_dimension)
        throw unsupported_operation(who + "the check computes every eigenvalue of the dense " + std::to_string(n) + " x " +
                                    std::to_string(n) + " Jacobian, beyond its limit of " + std::to_string(opt.max_dimension) +
                                    " unknowns (linear_stability_options::max_dimension). Use the matrix-free estimate of "
                                    "the extreme eigenvalues (linear_stability_options::eigenvalues = eigenvalue_path::"
                                    "matrix_free), check the step on a coarser discretization of the same model, or turn "
                                    "the check off (certify_options::check_stability = false) and give the stability "
                                    "argument yourself.");
    if (!dense) opt.extreme.validate(who + "options.extreme: ");
    std::string estimate_method;  // matrix-free: how the first sample's estimate was made
    std::vector<stability_mode> modes;  // lambda with Im >= 0: R(conj z) = conj R(z) for real methods
    auto add_mode = [&](std::complex<double> lambda, std::complex<double> estimate, double t) {
        const std::complex<double> key(lambda.real(), std::abs(lambda.imag()));
        const bool known = std::any_of(modes.begin(), modes.end(), [&](const stability_mode& q) {
            return std::abs(q.lambda - key) <= opt.same_mode * std::max(std::abs(q.lambda), std::abs(key));
        });
        if (!known)
            modes.push_back({key, t, 0.0, {estimate.real(), std::abs(estimate.imag())}, std::abs(lambda - estimate)});
    };
    for (std::size_t k = 0; k < states.size(); ++k) {
        const double t = static_cast<double>(times[k]);
        if (!std::isfinite(t)) throw non_finite_value(who + "sample time " + std::to_string(k) + " is NaN or infinite.");
        if (state_size(states[k]) != n)
            throw invalid_input(who + "sample state " + std::to_string(k) + " has " + std::to_string(state_size(states[k])) +
                                " components; the problem has " + std::to_string(n) + ".");
        if (!all_finite(states[k]))
            throw non_finite_value(who + "the sample state at t = " + detail::time_text(t) +
                                   " has a NaN or infinite component; the run blew up there (reduce h) or the data is broken.");
        if (dense) {
            const Eigen::MatrixXd J = jacobian_at(p, states[k], t);
            v.rhs_evaluations += jacobian_evaluations(p, n);
            const Eigen::EigenSolver<Eigen::MatrixXd> eig(J, false);
            if (eig.info() != Eigen::Success)
                throw budget_exhausted(who + "the eigenvalue iteration did not converge for the Jacobian at t = " +
                                       detail::time_text(t) + "; check the Jacobian there (badly scaled entries?).");
            const Eigen::VectorXcd lambdas = eig.eigenvalues();
            const double scale = lambdas.cwiseAbs().maxCoeff();
            v.spectral_radius = std::max(v.spectral_radius, scale);
            for (const std::complex<double>& l : lambdas) {
                const bool decaying = l.real() < -opt.neutral * scale;
                ++(decaying ? v.eigenvalues_checked : v.eigenvalues_skipped);
                if (decaying) add_mode(l, l, t);
            }
            continue;
        }
        // Matrix-free: exact products with the problem's own Jacobian on a small system (at most
        // dense_up_to unknowns, where the dense path would have formed it anyway), forward
        // differences otherwise: no n x n matrix beyond dense_up_to.
        const auto source = P::has_jacobian && n <= opt.dense_up_to ? jacobian_product_source::problem_jacobian
                                                                     : jacobian_product_source::forward_difference;
        jacobian_product<P> op(p, states[k], t, opt.extreme.max_products, source);
        const extreme_eigenvalue_estimate est = estimate_extreme_eigenvalues(op, opt.extreme);
        v.rhs_evaluations += op.evaluations();
        v.jacobian_products += op.products();
        v.estimates_converged = v.estimates_converged && est.converged;
        if (estimate_method.empty()) estimate_method = est.method + ", " + op.description();
        const double scale = est.spectral_radius();
        v.spectral_radius = std::max(v.spectral_radius, scale);
        for (const estimated_eigenvalue& e : est.eigenvalues) {
            const bool decaying = e.value.real() < -opt.neutral * scale;
            ++(decaying ? v.eigenvalues_checked : v.eigenvalues_skipped);
            if (!decaying) continue;
            const double size = std::abs(e.value);
            if (size > 0.0) v.largest_radius = std::max(v.largest_radius, e.radius / size);
            const std::complex<double> out = size > 0.0 ? e.value / size : std::complex<double>(-1.0, 0.0);
            // Outward along the ray (the scan's direction); a complex (non-symmetric) estimate also
            // sideways both ways: three points of the disk of its radius.
            std::vector<std::complex<double>> points{e.value + e.radius * out};
            if (!est.symmetric) {
                const std::complex<double> side = out * std::complex<double>(0.0, 1.0);
                points.push_back(e.value + e.radius * side);
                points.push_back(e.value - e.radius * side);
            }
            for (const std::complex<double>& z : points)
                if (z.real() < -opt.neutral * scale) add_mode(z, e.value, t);
        }
    }
    v.distinct_modes = modes.size();
    auto amplification = [&](std::complex<double> z) {
        if (++v.method_steps > opt.max_method_steps)
            throw budget_exhausted(who + "the stability check needed more than " + std::to_string(opt.max_method_steps) +
                                   " measured steps; raise max_method_steps or give fewer samples (or a larger same_mode).");
        return std::abs(amplification_factor(m, z));
    };
    for (stability_mode& q : modes) {
        q.amplification = amplification(h * q.lambda);
        if (!(q.amplification <= 1.0 + amplification_slack)) v.stable = false;
        if (!v.worst || q.amplification > v.worst->amplification) v.worst = q;
    }
    // Step limit, as a factor s of h: each mode is scanned on a geometric grid (2^(1/8) apart)
    // upward from |s h lambda| = 1e-3 cos(arg(-lambda)), where a consistent method damps it
    // (|R(z)|^2 = 1 + 2 Re z + O(|z|^2)), up to the smallest crossing found so far; the first
    // crossing is bisected. The largest modes go first: they usually set the limit, the rest stop early.
    std::sort(modes.begin(), modes.end(), [](const auto& a, const auto& b) { return std::abs(a.lambda) > std::abs(b.lambda); });
    const double ratio = std::exp2(0.125);
    double limit = opt.max_factor;
    for (const stability_mode& q : modes) {
        const std::complex<double> z1 = h * q.lambda;
        auto unstable = [&](double s) { return !(amplification(s * z1) <= 1.0 + amplification_slack); };
        double lo = 0.0, s = 1e-3 * (-z1.real() / std::abs(z1)) / std::abs(z1);
        for (int j = 0; j < 4000 && lo < limit; ++j, s *= ratio) {
            const double hi = std::min(s, limit);
            if (unstable(hi)) {
                double a = lo, b = hi;
                for (int it = 0; it < 100 && b - a > 1e-15 * b; ++it) {
                    const double mid = 0.5 * (a + b);
                    (unstable(mid) ? b : a) = mid;
                }
                limit = a;  // the stable side
                if (v.stable) v.worst = q;
                break;
            }
            lo = hi;
        }
    }
    v.limit_found = limit < opt.max_factor;
    if (v.limit_found) {
        v.step_limit = limit * h;
        v.margin = limit;
    }
    std::ostringstream b;
    b.precision(6);
    b << "method '" << m.name() << "' at h = " << h << ": " << v.samples << " sample states (t = " << times.front() << " to "
      << times.back() << "), ";
    if (dense)
        b << jacobian_source(p) << ", every eigenvalue (dense path, " << n << " unknowns); ";
    else
        b << "matrix-free path (" << n << " unknowns): the extreme eigenvalues (largest magnitude, leftmost, most "
          << "oscillatory) estimated by " << estimate_method << "; " << v.jacobian_products << " products in all; each "
          << "estimate moved outward by its error radius (largest " << v.largest_radius << " of |lambda|) before measuring"
          << (v.estimates_converged ? "" : ", some estimates NOT converged within the product budget (larger radii)")
          << "; eigenvalues inside the spectrum's outline are not checked; ";
    b << v.eigenvalues_checked << " decaying eigenvalues checked ("
      << v.distinct_modes << " distinct after merging near-equal and conjugate ones), |R(h lambda)| measured by one step "
      << "on the 2x2 real form of y' = z y; " << v.eigenvalues_skipped
      << " neutral or growing eigenvalues not checked (physical growth: accuracy governs it). ";
    if (!v.worst) {
        b << "No decaying mode: nothing limits the step.";
    } else {
        b << (v.stable ? "Stable" : "UNSTABLE") << ": worst mode lambda = " << v.worst->lambda.real();
        if (v.worst->lambda.imag() != 0.0) b << " +/- " << v.worst->lambda.imag() << "i";
        b << " (t = " << v.worst->time << "), |R(h lambda)| = " << v.worst->amplification << "; ";
        if (v.limit_found)
            b << "stable step limit " << v.step_limit << " (margin " << v.margin << ")"
              << (v.stable && v.margin < 1.0 ? ", but a shorter step is unstable for some mode." : ".");
        else
            b << "no stability limit found up to " << opt.max_factor << " h.";
    }
    v.basis = b.str();
    return v;
}

/// The same, for a run's output: the trajectory's states and times.
template <problem_like P, method M, class S>
linear_stability_verdict check_linear_stability(const P& p, const M& m, double h, const trajectory<S>& run,
                                                const linear_stability_options& opt = {}) {
    return check_linear_stability(p, m, h, run.states, run.times, opt);
}

/// Runs m at h over [t0, t1] (h must divide it into whole steps) and checks about opt.samples
/// states along that run; the run's evaluations are added to rhs_evaluations.
template <problem_like P, method M>
linear_stability_verdict check_run_stability(const P& p, const M& m, double h, const linear_stability_options& opt = {},
                                             const run_options& run = {}) {
    const std::string who = "stepcert::check_run_stability: problem '" + p.name() + "': ";
    detail::require_one_step_method(m, who);
    if constexpr (fixed_step_method<M> && !detail::is_multistep<M>::value) {
        if (!std::isfinite(h) || !(h > 0.0)) throw invalid_input(who + "the step h must be finite and > 0.");
        if (opt.samples == 0) throw invalid_input(who + "samples must be >= 1.");
        const double span = static_cast<double>(p.t1()) - static_cast<double>(p.t0());
        const double steps = std::round(span / h);
        if (!(steps >= 1.0 && steps <= 1e12) || std::abs(steps * h - span) > 1e-9 * span)
            throw invalid_input(who + "h = " + detail::time_text(h) + " does not divide [t0, t1] into whole steps (span/h = " +
                                detail::time_text(span / h) + "); give h = (t1 - t0)/N for a whole N >= 1.");
        const auto n = static_cast<std::size_t>(steps);
        const std::size_t target = std::max<std::size_t>(1, n / opt.samples);
        std::size_t stride = 1;  // the largest divisor of n at most n / samples
        for (std::size_t d = 1; d * d <= n; ++d)
            if (n % d == 0) stride = std::max({stride, d <= target ? d : 1, n / d <= target ? n / d : 1});
        trajectory<rebind_state<typename P::state_type, double>> out;
        try {
            out = run_uniform<double>(p, m, n, stride, run);
        } catch (const non_finite_value& e) {
            throw non_finite_value(who + "the run at h = " + detail::time_text(h) + " became non-finite before it could be "
                                   "sampled, a sign of instability (or of a broken right-hand side): " + e.what());
        }
        decltype(out) picked;  // at most samples + 1 states, evenly spread, first and last included
        const std::size_t total = out.states.size(), picks = std::min(total, opt.samples + 1);
        for (std::size_t k = 0; k < picks; ++k) {
            const std::size_t i = picks == 1 ? 0 : (k * (total - 1) + (picks - 1) / 2) / (picks - 1);
            picked.states.push_back(out.states[i]);
            picked.times.push_back(out.times[i]);
        }
        linear_stability_verdict v = check_linear_stability(p, m, span / steps, picked, opt);
        v.rhs_evaluations += out.stats.evaluations;
        return v;
    }
    return {};  // not reached: require_one_step_method threw
}

} // namespace stepcert
