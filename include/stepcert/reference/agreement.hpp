#pragma once
// How many significant digits two runs agree on: the measure behind vouched_digits.
//
// For answer states a_i and check states c_i at the same output times t_i,
//   r = max_i ||a_i - c_i||_inf / max(||a_i||_inf, floor),
//   digits = -log10(kappa * r), capped at the digits the answer's type carries.
// So "d digits" means: at every output time, every component's error is at most 10^-d times
// the largest component of the state at that time (a relative measure per time, absolute
// per component), or times `floor` where the state is smaller than that. reference_solution
// sets floor to 1e-3 of the solution's size over the interval (the same level where its
// controller switches from relative to absolute control): without it, a state at rest before
// an input arrives (size 1e-17, say) would demand relative digits nobody needs. kappa >= 1 is a safety factor chosen by the caller (reference_solution.hpp
// explains when it is 1 and when 3).
#include <algorithm>
#include <cmath>
#include <cstddef>
#include <limits>
#include <string>
#include <vector>

#include <boost/math/special_functions/fpclassify.hpp>

#include "stepcert/core/error.hpp"
#include "stepcert/core/state.hpp"

namespace stepcert {

struct run_agreement {
    double largest_relative_difference = 0.0;  ///< r above; +inf if a value is not finite
    std::size_t worst_index = 0;               ///< output index where r was reached
};

/// Compares two runs state by state in the answer's scalar type (no rounding to double first).
template <state S>
run_agreement compare_runs(const std::vector<S>& answer, const std::vector<S>& check,
                           double floor = std::numeric_limits<double>::min()) {
    if (answer.size() != check.size())
        throw invalid_input("stepcert::compare_runs: the runs have " + std::to_string(answer.size()) + " and " +
                            std::to_string(check.size()) + " output states; compare runs on the same output times.");
    using T = scalar_of<S>;
    using std::abs;
    const T tiny = static_cast<T>(std::max(floor, std::numeric_limits<double>::min()));
    run_agreement out;
    for (std::size_t i = 0; i < answer.size(); ++i) {
        const std::size_t n = state_size(answer[i]);
        if (state_size(check[i]) != n)
            throw invalid_input("stepcert::compare_runs: states of different sizes at output " + std::to_string(i) + ".");
        T diff = 0, scale = 0;
        bool finite = true;
        for (std::size_t k = 0; k < n; ++k) {
            const T a = answer[i][k], c = static_cast<T>(check[i][k]);
            // NaN never counts as agreement (max() would skip it).
            finite = finite && (boost::math::isfinite)(a) && (boost::math::isfinite)(c);
            diff = std::max<T>(diff, abs(a - c));
            scale = std::max<T>(scale, abs(a));
        }
        const double r = static_cast<double>(diff / std::max<T>(scale, tiny));
        const double rr = finite && (boost::math::isfinite)(r) ? r : std::numeric_limits<double>::infinity();
        if (i == 0 || rr > out.largest_relative_difference) {
            out.largest_relative_difference = rr;
            out.worst_index = i;
        }
    }
    return out;
}

/// -log10(kappa * r) capped at cap; exact agreement gives cap, any non-finite value gives 0.
inline double agreement_digits(double largest_relative_difference, double kappa, double cap) {
    const double r = largest_relative_difference;
    if (!(r >= 0.0) || !std::isfinite(r)) return 0.0;
    if (r == 0.0) return cap;
    return std::clamp(-std::log10(kappa * r), 0.0, cap);
}

} // namespace stepcert
