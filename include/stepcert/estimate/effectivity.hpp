#pragma once
// Effectivity index of an error estimator: estimate / true error, step by step for local error
// profiles of the same run grid (an estimator's and true_local_error_profile's), or grid time by
// grid time for global estimates (richardson_global_error against true_global_error). 1 is a
// perfect estimate; above 1 it overestimates. Steps whose true error is at or below `floor`
// (round-off, or an exact zero) are left out, because there the ratio says nothing.
#include <algorithm>
#include <cmath>
#include <cstddef>
#include <limits>
#include <string>
#include <vector>

#include "stepcert/core/error.hpp"
#include "stepcert/core/norm.hpp"
#include "stepcert/estimate/local_error.hpp"
#include "stepcert/estimate/global_error.hpp"

namespace stepcert {

struct effectivity_summary {
    std::vector<double> per_step;  ///< estimate / truth; NaN where the truth is at or below the floor
    std::size_t counted = 0;       ///< steps with a finite ratio
    double smallest = 0.0, median = 0.0, largest = 0.0;

    /// True when every counted step's ratio lies in [low, high] (and at least one was counted).
    bool within(double low, double high) const { return counted > 0 && smallest >= low && largest <= high; }
};

namespace detail {
/// Ratios estimate_j / truth_j (NaN where truth_j <= floor) and their spread.
inline effectivity_summary ratio_summary(const std::vector<double>& estimate, const std::vector<double>& truth, double floor) {
    effectivity_summary out;
    out.per_step.reserve(truth.size());
    std::vector<double> counted;
    for (std::size_t j = 0; j < truth.size(); ++j) {
        const double r = truth[j] > floor ? estimate[j] / truth[j] : std::numeric_limits<double>::quiet_NaN();
        out.per_step.push_back(r);
        if (std::isfinite(r)) counted.push_back(r);
    }
    out.counted = counted.size();
    if (!counted.empty()) {
        std::sort(counted.begin(), counted.end());
        out.smallest = counted.front();
        out.largest = counted.back();
        const std::size_t m = counted.size() / 2;
        out.median = counted.size() % 2 ? counted[m] : 0.5 * (counted[m - 1] + counted[m]);
    }
    return out;
}

inline void check_same_norm(const weighted_norm& a, const weighted_norm& b, const std::string& who) {
    if (a.atol != b.atol || a.rtol != b.rtol || a.kind != b.kind) throw invalid_input(who + "the two were measured in different norms.");
}

inline void check_floor(double floor, const std::string& who) {
    if (!(floor >= 0.0) || !std::isfinite(floor)) throw invalid_input(who + "the floor must be finite and >= 0.");
}
} // namespace detail

/// Per-step effectivity of a local error profile against the true local errors of the same grid.
inline effectivity_summary effectivity(const local_error_profile& estimate, const local_error_profile& truth, double floor = 0.0) {
    const std::string who = "stepcert::effectivity: ";
    if (estimate.steps.size() != truth.steps.size())
        throw invalid_input(who + "the profiles have " + std::to_string(estimate.steps.size()) + " and " +
                            std::to_string(truth.steps.size()) + " steps; compare profiles of the same grid.");
    if (estimate.power != truth.power)
        throw invalid_input(who + "the estimate scales as h^" + std::to_string(estimate.power) + " and the truth as h^" +
                            std::to_string(truth.power) +
                            ": they concern solutions of different order (for an embedded pair, take the truth of "
                            "embedded_solution_tableau).");
    detail::check_same_norm(estimate.norm, truth.norm, who);
    detail::check_floor(floor, who);
    std::vector<double> e, x;
    for (std::size_t j = 0; j < truth.steps.size(); ++j) {
        const auto& a = estimate.steps[j];
        const auto& b = truth.steps[j];
        if (std::abs(a.t - b.t) > 1e-12 * std::max(1.0, std::abs(b.t)) || std::abs(a.h - b.h) > 1e-12 * b.h)
            throw invalid_input(who + "step " + std::to_string(j) + " starts at different times in the two profiles.");
        e.push_back(a.estimate);
        x.push_back(b.estimate);
    }
    return detail::ratio_summary(e, x, floor);
}

/// Effectivity of a global error estimate against the true global error, per grid time.
inline effectivity_summary effectivity(const global_error_estimate& estimate, const global_error_estimate& truth, double floor = 0.0) {
    const std::string who = "stepcert::effectivity: ";
    if (estimate.times.size() != truth.times.size() || estimate.steps != truth.steps)
        throw invalid_input(who + "the estimate and the truth belong to different runs or grids (" +
                            std::to_string(estimate.steps) + " and " + std::to_string(truth.steps) + " steps, " +
                            std::to_string(estimate.times.size()) + " and " + std::to_string(truth.times.size()) + " grid times).");
    detail::check_same_norm(estimate.norm, truth.norm, who);
    detail::check_floor(floor, who);
    return detail::ratio_summary(estimate.estimate, truth.estimate, floor);
}

} // namespace stepcert
