#pragma once
// Ladders of refinement levels for an order study.
//  - step_ladder (fixed-step methods): level k takes N_k = round(N0 r^k) uniform steps of
//    h_k = (t1 - t0)/N_k; fits use this actual h_k, so any real ratio r > 1 works.
//  - tolerance_ladder (adaptive methods): level k runs at controller tolerance tol0 / r^k;
//    its effective step for the fit is (t1 - t0) / accepted steps.
// Two consecutive levels that round to the same N are REJECTED (invalid_input), not merged:
// a study that silently had fewer levels than asked would fit fewer points than the user thinks.
#include <cmath>
#include <cstddef>
#include <cstdio>
#include <numeric>
#include <string>
#include <vector>

#include "stepcert/core/error.hpp"
#include "stepcert/core/number_text.hpp"
#include "stepcert/methods/method.hpp"

namespace stepcert {

namespace detail {
inline std::string number_text(double x) { return formatted_number(x, "%.6g"); }
inline void check_ratio_and_levels(const char* who, double ratio, std::size_t levels) {
    if (!std::isfinite(ratio) || !(ratio > 1.0))
        throw invalid_input(std::string("stepcert: ") + who + ": the refinement ratio must be a finite number > 1 (got " +
                            number_text(ratio) + "); use e.g. 2 to halve the step from level to level.");
    if (levels < 3)
        throw invalid_input(std::string("stepcert: ") + who + ": an order study needs at least 3 levels (got " +
                            std::to_string(levels) + "): two levels give one slope and nothing to check it against.");
    if (levels > 64)
        throw invalid_input(std::string("stepcert: ") + who + ": at most 64 levels are supported (got " +
                            std::to_string(levels) + ").");
}
} // namespace detail

/// Uniform-step ladder for fixed-step methods.
struct step_ladder {
    std::size_t coarsest_steps = 16;  ///< N0, steps at the coarsest level
    double ratio = 2.0;               ///< r > 1, step-count growth per level (any real)
    std::size_t levels = 8;           ///< number of levels, >= 3

    /// Largest step count a ladder may ask for (keeps runs and the output grid bounded).
    static constexpr double max_steps = 1e11;

    /// Ladder whose coarsest step is at most h0 on [t0, t1]: N0 = (t1 - t0)/h0 rounded up
    /// (rounded to nearest when h0 divides the interval to 1e-9), so the actual h0 may be smaller.
    static step_ladder from_coarsest_step(double h0, double t0, double t1, double ratio, std::size_t levels) {
        if (!std::isfinite(t0) || !std::isfinite(t1) || !(t1 > t0))
            throw invalid_input("stepcert: step_ladder::from_coarsest_step: the interval [t0, t1] must be finite with t1 > t0.");
        if (!std::isfinite(h0) || !(h0 > 0.0))
            throw invalid_input("stepcert: step_ladder::from_coarsest_step: the coarsest step h0 must be finite and > 0 (got " +
                                detail::number_text(h0) + ").");
        const double length = t1 - t0;
        if (h0 > length)
            throw invalid_input("stepcert: step_ladder::from_coarsest_step: the coarsest step h0 = " + detail::number_text(h0) +
                                " is larger than the interval length " + detail::number_text(length) +
                                "; give h0 <= t1 - t0.");
        const double q = length / h0;
        const double nearest = std::round(q);
        const double n0 = std::abs(q - nearest) <= 1e-9 * q ? nearest : std::ceil(q);
        step_ladder l{static_cast<std::size_t>(n0), ratio, levels};
        l.validate();
        return l;
    }

    /// Throws invalid_input when the ladder cannot give `levels` distinct, growing step counts.
    void validate() const { (void)steps(); }

    /// N_k = round(N0 r^k) for k = 0 .. levels-1 (validated).
    std::vector<std::size_t> steps() const {
        detail::check_ratio_and_levels("step_ladder", ratio, levels);
        if (coarsest_steps == 0)
            throw invalid_input("stepcert: step_ladder: coarsest_steps must be at least 1.");
        std::vector<std::size_t> n(levels);
        for (std::size_t k = 0; k < levels; ++k) {
            const double nk = std::round(static_cast<double>(coarsest_steps) * std::pow(ratio, static_cast<double>(k)));
            if (!(nk <= max_steps))
                throw invalid_input("stepcert: step_ladder: level " + std::to_string(k) + " would need " +
                                    detail::number_text(nk) + " steps (limit 1e11); use fewer levels or a smaller ratio.");
            n[k] = static_cast<std::size_t>(nk);
            if (k > 0 && n[k] == n[k - 1])
                throw invalid_input("stepcert: step_ladder: levels " + std::to_string(k - 1) + " and " + std::to_string(k) +
                                    " both round to " + std::to_string(n[k]) + " steps (N0 = " + std::to_string(coarsest_steps) +
                                    ", ratio " + detail::number_text(ratio) +
                                    "); equal levels are rejected, not merged: raise coarsest_steps or the ratio.");
        }
        return n;
    }

    /// G = gcd of all N_k: the output grid t0 + j (t1 - t0)/G is hit by every level (stride N_k/G).
    std::size_t common_divisor() const {
        std::size_t g = 0;
        for (std::size_t n : steps()) g = std::gcd(g, n);
        return g;
    }

    std::string describe() const {
        return "steps N_k = round(" + std::to_string(coarsest_steps) + " * " + detail::number_text(ratio) + "^k), " +
               std::to_string(levels) + " levels";
    }
};

/// Tolerance ladder for adaptive methods: level k uses atol = rtol = coarsest / ratio^k.
struct tolerance_ladder {
    double coarsest = 1e-3;  ///< tol0, controller tolerance at the coarsest level
    double ratio = 10.0;     ///< r > 1, tolerance reduction per level
    std::size_t levels = 6;  ///< number of levels, >= 3

    void validate() const {
        detail::check_ratio_and_levels("tolerance_ladder", ratio, levels);
        if (!std::isfinite(coarsest) || !(coarsest > 0.0))
            throw invalid_input("stepcert: tolerance_ladder: the coarsest tolerance must be finite and > 0 (got " +
                                detail::number_text(coarsest) + ").");
        const double finest = tolerance(levels - 1);
        if (!(finest >= 1e-300))
            throw invalid_input("stepcert: tolerance_ladder: the finest tolerance " + detail::number_text(finest) +
                                " underflows; use fewer levels or a smaller ratio.");
    }

    /// tol_k = coarsest / ratio^k.
    double tolerance(std::size_t k) const { return coarsest / std::pow(ratio, static_cast<double>(k)); }

    /// Controller tolerances of level k (absolute and relative parts both tol_k).
    controller_tolerance at(std::size_t k) const { return {tolerance(k), tolerance(k)}; }

    std::string describe() const {
        return "tolerances tol_k = " + detail::number_text(coarsest) + " / " + detail::number_text(ratio) + "^k, " +
               std::to_string(levels) + " levels";
    }
};

} // namespace stepcert
