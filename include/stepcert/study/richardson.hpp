#pragma once
// Observed order without any reference, from differences of successive solutions
// (Richardson's model y(h) = y* + C h^p). For three solutions at h_a > h_b > h_c with
// d_ab = |y_a - y_b| and d_bc = |y_b - y_c|:
//   d_ab / d_bc = rho_bc^p (rho_ab^p - 1) / (rho_bc^p - 1),  rho_ab = h_a/h_b, rho_bc = h_b/h_c,
// which for equal ratios r is r^p, i.e. p = log(d_ab/d_bc) / log r. Rounded step counts make
// the ratios unequal, so the general equation is solved (its left side grows with p).
#include <cmath>
#include <cstddef>
#include <limits>
#include <span>
#include <vector>

#include "stepcert/core/error.hpp"
#include "stepcert/study/order_fit.hpp"

namespace stepcert {

namespace detail {
// log|e^x - 1| without overflow for large |x|.
inline double log_abs_expm1(double x) {
    if (x > 30.0) return x + std::log1p(-std::exp(-x));
    if (x < -30.0) return std::log1p(-std::exp(x));
    return std::log(std::abs(std::expm1(x)));
}
// log of rho_bc^p (rho_ab^p - 1)/(rho_bc^p - 1) with la = log rho_ab, lc = log rho_bc.
inline double difference_ratio_log(double p, double la, double lc) {
    if (std::abs(p) * std::max(la, lc) < 1e-12) return std::log(la / lc);  // limit p -> 0
    return p * lc + log_abs_expm1(p * la) - log_abs_expm1(p * lc);
}
} // namespace detail

/// Observed order from three solutions at steps h_a > h_b > h_c with differences
/// d_ab = |y_a - y_b| and d_bc = |y_b - y_c|. NaN when a value is non-finite or zero.
inline double three_level_order(double h_a, double h_b, double h_c, double d_ab, double d_bc) {
    const double nan = std::numeric_limits<double>::quiet_NaN();
    if (!(h_a > h_b && h_b > h_c && h_c > 0.0) || !std::isfinite(h_a)) return nan;
    if (!std::isfinite(d_ab) || !std::isfinite(d_bc) || !(d_ab > 0.0) || !(d_bc > 0.0)) return nan;
    const double la = std::log(h_a / h_b), lc = std::log(h_b / h_c);
    const double target = std::log(d_ab / d_bc);
    const double equal_ratio_guess = target / (0.5 * (la + lc));
    if (std::abs(la - lc) <= 1e-12 * lc) return target / lc;
    double lo = -1.0, hi = 1.0;
    while (detail::difference_ratio_log(hi, la, lc) < target && hi < 1024.0) hi *= 2.0;
    while (detail::difference_ratio_log(lo, la, lc) > target && lo > -1024.0) lo *= 2.0;
    if (detail::difference_ratio_log(hi, la, lc) < target || detail::difference_ratio_log(lo, la, lc) > target)
        return equal_ratio_guess;  // beyond |p| = 1024: the exact root no longer matters
    for (int it = 0; it < 200 && hi - lo > 1e-13 * std::max(1.0, std::abs(hi)); ++it) {
        const double mid = 0.5 * (lo + hi);
        (detail::difference_ratio_log(mid, la, lc) < target ? lo : hi) = mid;
    }
    return 0.5 * (lo + hi);
}

/// Fits the order from differences d_i = |y(h_coarse_i) - y(h_fine_i)| under the model
/// d_i = C h_fine_i^p (rho_i^p - 1), rho_i = h_coarse_i / h_fine_i, by repeating the
/// straight-line fit with the rho correction until p settles. The result's log_constant is the
/// log C of the fine solutions' error C h^p. The interval treats the correction as known.
inline order_fit fit_order_from_differences(std::span<const double> h_coarse, std::span<const double> h_fine,
                                            std::span<const double> diff, double confidence = 0.95) {
    if (h_coarse.size() != diff.size() || h_fine.size() != diff.size())
        throw invalid_input("stepcert::fit_order_from_differences: step and difference lists differ in length.");
    for (std::size_t i = 0; i < diff.size(); ++i)
        if (!(h_coarse[i] > h_fine[i]) || !(h_fine[i] > 0.0))
            throw invalid_input("stepcert::fit_order_from_differences: each pair needs h_coarse > h_fine > 0.");
    order_fit f = fit_order(h_fine, diff, confidence);
    std::vector<double> adjusted(diff.size());
    for (int it = 0; it < 100; ++it) {
        if (!(f.order > 0.0)) break;  // no convergence in the data: no correction is meaningful
        for (std::size_t i = 0; i < diff.size(); ++i)
            adjusted[i] = diff[i] / std::expm1(f.order * std::log(h_coarse[i] / h_fine[i]));
        const order_fit next = fit_order(h_fine, adjusted, confidence);
        const bool settled = std::abs(next.order - f.order) <= 1e-12 * std::max(1.0, std::abs(f.order));
        f = next;
        if (settled) break;
    }
    return f;
}

} // namespace stepcert
