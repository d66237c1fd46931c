#pragma once
// Least-squares fit of log(error) = log C + p log h, with the standard error of p and a
// two-sided confidence interval from Student's t with n - 2 degrees of freedom.
// With exactly two points the line is determined, so no interval is given (has_interval() false).
#include <cmath>
#include <cstddef>
#include <limits>
#include <span>
#include <string>

#include <boost/math/distributions/students_t.hpp>

#include "stepcert/core/error.hpp"

namespace stepcert {

struct order_fit {
    std::size_t points = 0;  ///< number of (h, error) pairs fitted
    double order = std::numeric_limits<double>::quiet_NaN();           ///< slope p
    double log_constant = std::numeric_limits<double>::quiet_NaN();    ///< intercept log C (natural log)
    double standard_error = std::numeric_limits<double>::quiet_NaN();  ///< of p; NaN with 2 points
    double residual_sd = std::numeric_limits<double>::quiet_NaN();     ///< of log(error) about the line
    double confidence = 0.95;                                          ///< level of [lower, upper]
    double t_quantile = std::numeric_limits<double>::quiet_NaN();      ///< t_{(1+c)/2, n-2}
    double lower = std::numeric_limits<double>::quiet_NaN();
    double upper = std::numeric_limits<double>::quiet_NaN();

    bool has_interval() const { return points >= 3 && std::isfinite(lower) && std::isfinite(upper); }
};

/// Two-sided critical value t_{(1+confidence)/2, dof} of Student's t (Boost.Math).
inline double student_t_critical(double confidence, double dof) {
    if (!(confidence > 0.0 && confidence < 1.0))
        throw invalid_input("stepcert: confidence level must lie strictly between 0 and 1 (e.g. 0.95).");
    if (!(dof >= 1.0) || !std::isfinite(dof))
        throw invalid_input("stepcert: Student's t needs at least 1 degree of freedom (three fitted points).");
    const boost::math::students_t dist(dof);
    return boost::math::quantile(boost::math::complement(dist, (1.0 - confidence) / 2.0));
}

/// Fits log err = log C + p log h over pairs (h[i], err[i]); all values finite and > 0,
/// at least two distinct h. NaN or infinite errors are rejected, never treated as small.
inline order_fit fit_order(std::span<const double> h, std::span<const double> err, double confidence = 0.95) {
    if (h.size() != err.size())
        throw invalid_input("stepcert::fit_order: step and error lists differ in length.");
    if (h.size() < 2)
        throw invalid_input("stepcert::fit_order: need at least 2 points to fit an order (got " + std::to_string(h.size()) + ").");
    if (!(confidence > 0.0 && confidence < 1.0))
        throw invalid_input("stepcert::fit_order: confidence level must lie strictly between 0 and 1.");
    const std::size_t n = h.size();
    double mx = 0.0, my = 0.0;
    for (std::size_t i = 0; i < n; ++i) {
        if (!std::isfinite(h[i]) || !(h[i] > 0.0) || !std::isfinite(err[i]) || !(err[i] > 0.0))
            throw invalid_input("stepcert::fit_order: point " + std::to_string(i) +
                                " has a step or error that is not finite and positive; a NaN/inf/zero error cannot be fitted.");
        mx += std::log(h[i]);
        my += std::log(err[i]);
    }
    mx /= static_cast<double>(n);
    my /= static_cast<double>(n);
    double sxx = 0.0, sxy = 0.0;
    for (std::size_t i = 0; i < n; ++i) {
        const double dx = std::log(h[i]) - mx;
        sxx += dx * dx;
        sxy += dx * (std::log(err[i]) - my);
    }
    if (!(sxx > 0.0)) throw invalid_input("stepcert::fit_order: all steps are equal; an order needs different steps.");
    order_fit f;
    f.points = n;
    f.confidence = confidence;
    f.order = sxy / sxx;
    f.log_constant = my - f.order * mx;
    if (n >= 3) {
        double ssr = 0.0;
        for (std::size_t i = 0; i < n; ++i) {
            const double r = std::log(err[i]) - (f.log_constant + f.order * std::log(h[i]));
            ssr += r * r;
        }
        const double dof = static_cast<double>(n - 2);
        f.residual_sd = std::sqrt(ssr / dof);
        f.standard_error = f.residual_sd / std::sqrt(sxx);
        f.t_quantile = student_t_critical(confidence, dof);
        f.lower = f.order - f.t_quantile * f.standard_error;
        f.upper = f.order + f.t_quantile * f.standard_error;
    }
    return f;
}

} // namespace stepcert
