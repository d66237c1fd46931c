#pragma once
// Options of a step certification, and their checks.
#include <cmath>
#include <cstddef>
#include <string>

#include "stepcert/certify/certificate.hpp"
#include "stepcert/core/error.hpp"
#include "stepcert/core/norm.hpp"

namespace stepcert {

struct certify_options {
    error_measured_at measured_at = error_measured_at::every_output_time;
    std::size_t output_times = 8;  ///< evenly spaced, t1 among them; every step count is a multiple
    /// Compare the certified run with the exact solution or a multiprecision reference; when
    /// none can be had the certificate stays at the estimated level and says why.
    bool verify_with_reference = true;
    /// With the reference verified, look for a coarser step that meets the tolerance against it
    /// directly (useful before the asymptotic range, where Richardson cannot be trusted).
    bool coarsen_with_reference = true;
    /// Refuse (refusal::reference_unavailable) instead of settling for the estimated level when no
    /// reference can be had (a right-hand side that runs in double only, a reference that cannot
    /// vouch for the digits the tolerance needs).
    bool require_reference = false;
    /// Grid Convergence Index safety factor on the Richardson estimate (Roache; Celik et al. 2008
    /// use 1.25 with three levels and an observed order).
    double safety_factor = 1.25;
    /// The safety factor where the declared order is not confirmed by the runs: the observed order
    /// stays above it (the estimate then uses the declared order, conservative when the error falls
    /// faster) or the runs agree to rounding. P. J. Roache, Verification and Validation in
    /// Computational Science and Engineering (1998) recommends 3 when the order is not confirmed
    /// (from memory).
    double unconfirmed_safety_factor = 3.0;
    /// The observed order counts as the declared one within this distance (asymptotic range).
    double order_tolerance = 0.35;
    /// A step is certified when safety factor x estimate <= target (< 1 leaves room for the
    /// estimate's own error).
    double target = 0.9;
    /// Round-off floor factor: factor * sqrt(N) * eps * |y| (core/round_off.hpp).
    double round_off_factor = 4.0;
    std::size_t first_steps = 0;      ///< coarsest level of the search (0: from the stability limit)
    std::size_t max_levels = 24;      ///< doublings the search may take
    std::size_t max_evaluations = 20'000'000;  ///< double-precision evaluations over all runs
    /// Check h lambda against the method's stability region at the certified run's output states.
    bool check_stability = true;

    void validate(const std::string& who) const {
        if (output_times == 0) throw invalid_input(who + "output_times must be >= 1 (t1 is always one of them).");
        if (max_evaluations == 0)
            throw invalid_input(who + "the evaluation budget is zero; give max_evaluations > 0 (e.g. 20'000'000).");
        if (!(safety_factor >= 1.0) || !std::isfinite(safety_factor))
            throw invalid_input(who + "safety_factor must be finite and >= 1 (1.25 is usual with three levels).");
        if (!(unconfirmed_safety_factor >= safety_factor) || !std::isfinite(unconfirmed_safety_factor))
            throw invalid_input(who + "unconfirmed_safety_factor must be finite and >= safety_factor (3 is usual where the "
                                "order is not confirmed).");
        if (!(order_tolerance > 0.0) || !std::isfinite(order_tolerance))
            throw invalid_input(who + "order_tolerance must be finite and > 0.");
        if (!(target > 0.0 && target <= 1.0)) throw invalid_input(who + "target must be in (0, 1].");
        if (!(round_off_factor >= 0.0) || !std::isfinite(round_off_factor))
            throw invalid_input(who + "round_off_factor must be finite and >= 0.");
        if (max_levels < 3) throw invalid_input(who + "max_levels must be >= 3 (the order is observed from three levels).");
    }
};

namespace detail {

/// A tolerance is a weighted norm with error <= 1 meaning met; zero, negative or non-finite parts
/// are refused with a message that says so (the norm's own check would call them weights).
inline void check_tolerance(const weighted_norm& tol, const std::string& who) {
    if (!std::isfinite(tol.atol) || !std::isfinite(tol.rtol))
        throw invalid_input(who + "the tolerance is not finite (atol = " + std::to_string(tol.atol) +
                            ", rtol = " + std::to_string(tol.rtol) + "); give finite values.");
    if (tol.atol < 0.0 || tol.rtol < 0.0 || (tol.atol == 0.0 && tol.rtol == 0.0))
        throw invalid_input(who + "the tolerance must have atol >= 0 and rtol >= 0, not both zero (got atol = " +
                            std::to_string(tol.atol) + ", rtol = " + std::to_string(tol.rtol) + ").");
}

} // namespace detail

} // namespace stepcert
