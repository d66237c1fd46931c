#pragma once
// Weighted error norm: component i is scaled by atol + rtol * |reference_i|, then combined
// by max or root-mean-square. A value <= 1 means "within tolerance". NaN never counts as small:
// a non-finite difference makes the norm +infinity.
#include <algorithm>
#include <cmath>
#include <cstddef>
#include <limits>
#include <string>

#include <boost/math/special_functions/fpclassify.hpp>

#include "stepcert/core/error.hpp"
#include "stepcert/core/state.hpp"

namespace stepcert {

enum class norm_kind { max, rms };

struct weighted_norm {
    double atol = 1.0;  ///< absolute part of the component scale
    double rtol = 0.0;  ///< relative part (times |reference component|)
    norm_kind kind = norm_kind::max;

    /// Plain absolute max norm (atol = 1, rtol = 0).
    static weighted_norm absolute_max() { return {}; }

    void validate() const {
        if (!(atol >= 0.0) || !(rtol >= 0.0) || !std::isfinite(atol) || !std::isfinite(rtol) || (atol == 0.0 && rtol == 0.0))
            throw invalid_input("stepcert: weighted_norm needs finite atol >= 0 and rtol >= 0, not both zero (got atol=" +
                                std::to_string(atol) + ", rtol=" + std::to_string(rtol) + ").");
    }

    /// Norm of (approx - reference), scaled by the reference.
    template <state A, state R>
    double operator()(const A& approx, const R& reference) const {
        using W = wider_scalar_t<scalar_of<A>, scalar_of<R>>;
        return combine(state_size(reference), [&](std::size_t i) {
            // Subtract in the wider type, then round the (small) difference to double.
            return scaled(static_cast<double>(static_cast<W>(approx[i]) - static_cast<W>(reference[i])),
                          static_cast<double>(reference[i]));
        });
    }

    /// Norm of a difference already formed (an error estimate), scaled by the state `scale`.
    template <state D, state R>
    double of_difference(const D& difference, const R& scale) const {
        if (rtol == 0.0) return absolute_of(difference);
        return combine(state_size(scale),
                       [&](std::size_t i) { return scaled(static_cast<double>(difference[i]), static_cast<double>(scale[i])); });
    }

private:
    /// With fixed weights (rtol = 0) one division at the end instead of one per component: this
    /// runs after every step of a monitored production run. Four independent accumulators, so
    /// that the max (or sum) does not wait on the previous component's result; the finiteness
    /// test is a plain comparison (false for NaN and inf), not a branch.
    template <state D>
    double absolute_of(const D& difference) const {
        const std::size_t n = state_size(difference);
        constexpr double largest = std::numeric_limits<double>::max();
        double acc[4] = {0.0, 0.0, 0.0, 0.0};
        bool finite = true;
        const bool use_max = kind == norm_kind::max;
        std::size_t i = 0;
        auto take = [&](double& a, std::size_t k) {
            const double d = std::abs(static_cast<double>(difference[k]));
            finite &= d <= largest;
            a = use_max ? (d > a ? d : a) : a + d * d;
        };
        for (; i + 4 <= n; i += 4) {
            take(acc[0], i);
            take(acc[1], i + 1);
            take(acc[2], i + 2);
            take(acc[3], i + 3);
        }
        for (; i < n; ++i) take(acc[0], i);
        if (!finite) return std::numeric_limits<double>::infinity();
        if (use_max) return std::max(std::max(acc[0], acc[1]), std::max(acc[2], acc[3])) / atol;
        return std::sqrt((acc[0] + acc[1] + acc[2] + acc[3]) / static_cast<double>(n)) / atol;
    }

    /// |d| / (atol + rtol |r|), or +inf when d or r is not finite. An exact agreement is 0 even
    /// where the scale is 0 (a component at rest under a purely relative tolerance); any other
    /// difference there is +inf: a relative tolerance has nothing to be relative to.
    double scaled(double d, double r) const {
        if (!std::isfinite(d) || !std::isfinite(r)) return std::numeric_limits<double>::infinity();
        if (d == 0.0) return 0.0;
        return std::abs(d) / (atol + rtol * std::abs(r));
    }

    template <class Scaled>
    double combine(std::size_t n, Scaled&& scaled_at) const {
        double acc = 0.0;
        for (std::size_t i = 0; i < n; ++i) {
            const double x = scaled_at(i);
            if (std::isinf(x)) return x;
            if (kind == norm_kind::max)
                acc = std::max(acc, x);
            else
                acc += x * x;
        }
        return kind == norm_kind::max ? acc : std::sqrt(acc / static_cast<double>(n));
    }
};

} // namespace stepcert
