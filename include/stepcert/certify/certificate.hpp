#pragma once
// What a step certification issues: the step (or the reason there is none), the evidence behind
// it and what it cost. A plain value: report/ prints and exports it, check_certificate re-runs it.
#include <cmath>
#include <cstddef>
#include <limits>
#include <string>
#include <string_view>
#include <vector>

#include "stepcert/core/norm.hpp"

namespace stepcert {

/// The library version written into every certificate (kept equal to project(VERSION) in CMake).
inline constexpr std::string_view library_version = "0.1.0";

/// How strong the evidence for a certified step is, strongest first.
enum class evidence_level {
    reference_verified,  ///< a run at the step, compared with the multiprecision reference, meets the tolerance
    estimated,           ///< Richardson estimate times a safety factor, in a verified asymptotic range
    bounded,             ///< a rigorous bound from user-given constants meets the tolerance
    not_certified,       ///< no step is certified; refusal says why
};

/// Why a certification refused, or none. The detail (step_certificate::reason_detail) gives
/// the figures that were measured and what to do.
enum class refusal {
    none,
    outside_asymptotic_range,  ///< the runs at the step judged do not show the declared order yet
    unstable,                  ///< h * lambda leaves the method's stability region
    below_round_off_floor,     ///< successive runs differ by rounding only, and that exceeds the tolerance
    non_finite,                ///< NaN or infinity from the model (double runs or the reference), with time and component
    budget_exhausted,          ///< the evaluation budget ran out before a step was found
    reference_unavailable,     ///< the level asked for needs a reference that could not be had
    tolerance_not_met,         ///< the step judged (certify_step_count) is too large for the tolerance
    unbounded_growth,          ///< the solution grows without bound as the step shrinks (a blow-up)
    non_smooth,                ///< the order falls below the declared one where the error is made: an interval is named
    order_below_declared,      ///< the order settles below the declared one everywhere (not localized)
    order_not_settled,         ///< the observed order wandered without settling before the search ended
    relative_tolerance_at_zero,  ///< atol = 0 and a component is zero: a relative tolerance has no scale there
};

/// Which case the estimate rests on (the GCI safety factor follows from it).
enum class order_evidence {
    none,                ///< no estimate formed (not certified, or a reference / bound alone)
    declared_confirmed,  ///< three runs show the declared order: Richardson with it, safety factor 1.25
    above_declared,      ///< the observed order stays above the declared one: the declared order, safety factor 3
    round_off_plateau,   ///< successive runs agree to rounding: their difference and the round-off floor, safety factor 3
};

/// What set the certified step: the tolerance, or the method's stability region.
enum class step_limited_by { none, accuracy, stability };

/// Where the tolerance is measured: the largest error over the output grid, or at t1 only.
enum class error_measured_at { every_output_time, final_time };

inline std::string_view to_string(evidence_level l) {
    switch (l) {
    case evidence_level::reference_verified: return "reference-verified";
    case evidence_level::estimated: return "estimated";
    case evidence_level::bounded: return "bounded";
    case evidence_level::not_certified: return "not certified";
    }
    return "?";
}

inline std::string_view to_string(refusal r) {
    switch (r) {
    case refusal::none: return "none";
    case refusal::outside_asymptotic_range: return "outside the asymptotic range";
    case refusal::unstable: return "unstable";
    case refusal::below_round_off_floor: return "below round-off floor";
    case refusal::non_finite: return "non-finite values";
    case refusal::budget_exhausted: return "evaluation budget exhausted";
    case refusal::reference_unavailable: return "reference unavailable";
    case refusal::tolerance_not_met: return "tolerance not met";
    case refusal::unbounded_growth: return "unbounded growth";
    case refusal::non_smooth: return "not smooth";
    case refusal::order_below_declared: return "order below the declared";
    case refusal::order_not_settled: return "order not settled";
    case refusal::relative_tolerance_at_zero: return "relative tolerance at a zero value";
    }
    return "?";
}

inline std::string_view to_string(order_evidence e) {
    switch (e) {
    case order_evidence::none: return "none";
    case order_evidence::declared_confirmed: return "declared order confirmed";
    case order_evidence::above_declared: return "observed order above the declared";
    case order_evidence::round_off_plateau: return "runs agree to round-off";
    }
    return "?";
}

inline std::string_view to_string(step_limited_by l) {
    switch (l) {
    case step_limited_by::none: return "none";
    case step_limited_by::accuracy: return "accuracy";
    case step_limited_by::stability: return "stability";
    }
    return "?";
}

inline std::string_view to_string(error_measured_at m) {
    return m == error_measured_at::final_time ? "final time" : "every output time";
}

/// The outcome of the stability check at the certified step.
struct stability_record {
    bool checked = false;      ///< false: no stability function known for the method
    bool stable = false;
    double margin = std::numeric_limits<double>::quiet_NaN();      ///< stable step limit / h (> 1: room)
    double step_limit = std::numeric_limits<double>::quiet_NaN();  ///< largest stable h found
    std::string worst_mode;    ///< the eigenvalue closest to leaving the region, and where
};

struct step_certificate {
    // What was certified.
    std::string problem;
    std::size_t dimension = 0;
    std::string method;
    int declared_order = 0;
    double observed_order = std::numeric_limits<double>::quiet_NaN();
    double t0 = 0.0, t1 = 0.0;
    weighted_norm tolerance;   ///< error <= 1 in this norm means met
    error_measured_at measured_at = error_measured_at::every_output_time;
    std::size_t output_times = 1;  ///< evenly spaced, t1 among them (per segment: see breakpoints)
    /// The problem's breakpoints: the certified runs land on each, with uniform steps of at most h
    /// within each segment (run_uniform's layout: each segment gets its share of the output times).
    std::vector<double> breakpoints;

    // The answer.
    evidence_level level = evidence_level::not_certified;
    refusal reason = refusal::none;
    std::string reason_detail;  ///< what was seen, and what to do
    std::size_t steps = 0;      ///< N; h = (t1 - t0) / N (adaptive: the certified run's accepted steps; 0 when not certified)
    double step = std::numeric_limits<double>::quiet_NaN();  ///< h (NaN for adaptive methods)
    /// Adaptive methods: the certified controller tolerances (NaN for fixed-step methods).
    double controller_atol = std::numeric_limits<double>::quiet_NaN();
    double controller_rtol = std::numeric_limits<double>::quiet_NaN();

    // The evidence, in tolerance units (<= 1: met).
    order_evidence evidence = order_evidence::none;     ///< the case the estimate rests on
    step_limited_by limited_by = step_limited_by::none;  ///< what set the certified step
    double estimated_error = std::numeric_limits<double>::quiet_NaN();  ///< Richardson (+ difference: basis)
    double safety_factor = std::numeric_limits<double>::quiet_NaN();
    double error_band = std::numeric_limits<double>::quiet_NaN();       ///< safety factor * Richardson part (+ difference)
    std::string basis;                                                 ///< the runs and formula behind it
    double bound = std::numeric_limits<double>::quiet_NaN();            ///< rigorous bound, if one was given
    double reference_error = std::numeric_limits<double>::quiet_NaN();  ///< measured against the reference
    double reference_digits = std::numeric_limits<double>::quiet_NaN(); ///< digits the reference vouches for
    stability_record stability;

    // The cost of certifying.
    std::size_t evaluations = 0;            ///< right-hand-side evaluations in double-precision runs
    std::size_t reference_evaluations = 0;  ///< of the multiprecision reference (0 when exact or none)
    std::string library = std::string(library_version);

    bool issued() const { return level != evidence_level::not_certified; }
};

} // namespace stepcert
