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
        const std::size_t n = state_size(reference);
        double acc = 0.0;
        for (std::size_t i = 0; i < n; ++i) {
            const double r = static_cast<double>(reference[i]);
            using W = wider_scalar_t<scalar_of<A>, scalar_of<R>>;
            // Subtract in the wider type, then round the (small) difference to double.
            const double d = static_cast<double>(static_cast<W>(approx[i]) - static_cast<W>(reference[i]));
            if (!(boost::math::isfinite)(d) || !std::isfinite(r)) return std::numeric_limits<double>::infinity();
            const double scaled = std::abs(d) / (atol + rtol * std::abs(r));
            if (kind == norm_kind::max)
                acc = std::max(acc, scaled);
            else
                acc += scaled * scaled;
        }
        return kind == norm_kind::max ? acc : std::sqrt(acc / static_cast<double>(n));
    }
};

} // namespace stepcert
