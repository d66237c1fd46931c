#pragma once
// Grid Convergence Index (GCI): an error band for a solution from solutions on two or three
// grids (here: step sizes), the safety factor of step certification.
// Three grids: I. B. Celik, U. Ghia, P. J. Roache, C. J. Freitas, H. Coleman, P. E. Raad,
//   "Procedure for Estimation and Reporting of Uncertainty Due to Discretization in CFD
//   Applications", ASME J. Fluids Eng. 130(7) 078001 (2008), eqs. (5)-(7) (numbers from memory).
// Two grids, declared order, Fs = 3: P. J. Roache, "Verification and Validation in
//   Computational Science and Engineering", Hermosa 1998.
// Index 1 is the finest grid: h1 < h2 < h3, r21 = h2/h1, r32 = h3/h2.
#include <cmath>
#include <cstdio>
#include <initializer_list>
#include <limits>
#include <string>
#include <utility>

#include "stepcert/core/error.hpp"

namespace stepcert {

inline constexpr double gci_safety_factor_three_grids = 1.25;  ///< Celik et al. (2008)
inline constexpr double gci_safety_factor_two_grids = 3.0;     ///< Roache (1998)

/// One GCI evaluation. Relative quantities are fractions (0.022 is 2.2 %).
struct grid_convergence_index_result {
    double order = 0;                        ///< p: apparent (observed) order, or the declared one
    bool order_observed = false;             ///< true: p solved from three grids; false: declared
    double extrapolated = 0;                 ///< phi_ext21, eq. (6a)
    double relative_difference = 0;          ///< e_a21 = |(phi1 - phi2)/phi1|, eq. (7a)
    double extrapolated_relative_error = 0;  ///< e_ext21 = |(phi_ext21 - phi1)/phi_ext21|, eq. (7b)
    double fine_grid_index = 0;              ///< GCI_fine21 = Fs e_a21 / (r21^p - 1), eq. (7c)
    double fine_error_band = 0;              ///< absolute: Fs |phi1 - phi2| / (r21^p - 1)
    double safety_factor = 0;                ///< Fs used
    int iterations = 0;                      ///< fixed-point iterations for p (0 when declared)
    bool oscillatory = false;                ///< s < 0: the differences change sign
    bool differences_grow = false;           ///< data fit a negative order; the |.| in eq. (5a) hides it
    std::string basis{};                     ///< which formula, how many grids, Fs
};

/// Budget of the fixed-point iteration for p, and the three-grid safety factor.
struct three_grid_options {
    int max_iterations = 200;
    double relative_tolerance = 1e-13;  ///< stop when |p_new - p| <= tol * max(1, p_new)
    double safety_factor = gci_safety_factor_three_grids;
};

namespace detail {
inline std::string gci_num(double x) {
    char buf[32];
    std::snprintf(buf, sizeof buf, "%.9g", x);
    return buf;
}
// Messages are built with += (g++ 12 warns -Wrestrict on chains of temporary strings).
template <class E, class... Parts>
[[noreturn]] void gci_fail(const char* fn, const Parts&... parts) {
    std::string m = "stepcert::";
    m.append(fn).append(": ");
    ((m += parts), ...);
    throw E(m);
}
// Non-finite inputs are non_finite_value; finite ones out of their domain are invalid_input.
inline void gci_check_finite(const char* fn, std::initializer_list<std::pair<const char*, double>> values) {
    for (const auto& [name, x] : values)
        if (!std::isfinite(x)) gci_fail<non_finite_value>(fn, name, " is not finite (", gci_num(x), "); pass numbers.");
}
inline void gci_check_ratio(const char* fn, const char* name, double r) {
    if (!(r > 1.0)) gci_fail<invalid_input>(fn, name, " = ", gci_num(r), " is not > 1; pass h_coarse / h_fine.");
}
inline void gci_check_factor(const char* fn, double fs) {
    if (!(fs >= 1.0))
        gci_fail<invalid_input>(fn, "safety factor ", gci_num(fs), " < 1 would shrink the band; use 1.25 (p observed)",
                                " or 3 (p declared).");
}
inline void gci_check_order(const char* fn, double p) {
    if (!(p > 0.0)) gci_fail<invalid_input>(fn, "order p = ", gci_num(p), " is not > 0; pass the method's order.");
}
// ln(r^p - s) for p > 0, r > 1, s = +-1, without overflow for large p.
inline double gci_log_rp_minus_s(double log_r, double p, double s) {
    const double x = p * log_r;
    if (s < 0) return x + std::log1p(std::exp(-x));
    return x > 1.0 ? x + std::log1p(-std::exp(-x)) : std::log(std::expm1(x));
}
// Eqs. (6a), (7a)-(7c) from phi1, phi2, r21 and the order and Fs already in g; names the basis.
inline void gci_finish(const char* fn, grid_convergence_index_result& g, double phi1, double phi2, double r21,
                       const char* basis, const char* source) {
    g.basis = basis;
    g.basis.append(", Fs = ").append(gci_num(g.safety_factor)).append(source);
    const double rp1 = std::expm1(g.order * std::log(r21));  // r21^p - 1 without cancellation
    const double eps21 = phi2 - phi1;
    g.extrapolated = phi1 - eps21 / rp1;  // = (r21^p phi1 - phi2)/(r21^p - 1), without overflow
    if (phi1 == 0.0 || g.extrapolated == 0.0 || !std::isfinite(g.extrapolated))
        gci_fail<invalid_input>(fn, "the fine or the extrapolated value is 0 (or overflowed), so the relative",
                                " errors are undefined; use fine_solution_error_band with |phi1 - phi2| instead.");
    g.relative_difference = std::abs(eps21 / phi1);
    g.extrapolated_relative_error = std::abs((g.extrapolated - phi1) / g.extrapolated);
    g.fine_grid_index = g.safety_factor * g.relative_difference / rp1;
    g.fine_error_band = g.safety_factor * std::abs(eps21) / rp1;
}
// Fs d / (r^p - 1) after the checks of the absolute forms, which report as fn.
inline double gci_fine_band(const char* fn, double d, double r, double p, double fs) {
    gci_check_finite(fn, {{"the difference norm d", d}, {"the ratio r", r}, {"the order p", p}, {"Fs", fs}});
    if (d < 0.0) gci_fail<invalid_input>(fn, "difference norm d = ", gci_num(d), " is negative; pass a norm.");
    gci_check_ratio(fn, "the ratio r", r);
    gci_check_order(fn, p);
    gci_check_factor(fn, fs);
    return fs * d / std::expm1(p * std::log(r));
}
} // namespace detail

/// Three grids (Celik et al. 2008): apparent order from eq. (5) by fixed-point iteration,
///   p = |ln|eps32/eps21| + q(p)| / ln r21,  q(p) = ln((r21^p - s)/(r32^p - s)),  s = sign(eps32/eps21),
/// started at q = 0, then eqs. (6a), (7a)-(7c). Throws accuracy_unreachable when p does not
/// settle within the budget (very unequal ratios make the iteration diverge) or comes out 0.
inline grid_convergence_index_result grid_convergence_index_three_grids(
    double phi1, double phi2, double phi3, double r21, double r32, const three_grid_options& opt = {}) {
    constexpr const char* fn = "grid_convergence_index_three_grids";
    const double fs = opt.safety_factor, eps21 = phi2 - phi1, eps32 = phi3 - phi2;
    detail::gci_check_finite(fn, {{"phi1", phi1}, {"phi2", phi2}, {"phi3", phi3}, {"r21", r21}, {"r32", r32},
                                  {"the safety factor", fs}, {"phi2 - phi1", eps21}, {"phi3 - phi2", eps32}});
    detail::gci_check_ratio(fn, "r21", r21);
    detail::gci_check_ratio(fn, "r32", r32);
    detail::gci_check_factor(fn, fs);
    if (opt.max_iterations < 1 || !(opt.relative_tolerance >= 8 * std::numeric_limits<double>::epsilon()))
        detail::gci_fail<invalid_input>(fn, "the iteration needs max_iterations >= 1 and relative_tolerance >= 8 eps",
                                        " (1.8e-15; below, double cannot resolve p); 1e-13 is the default.");
    if (eps21 == 0.0 || eps32 == 0.0)
        detail::gci_fail<invalid_input>(fn, eps21 == 0.0 ? "phi1 == phi2" : "phi2 == phi3",
                                        ": two grids gave the same value, so no order can be observed; report more",
                                        " digits, use grids further apart, or use grid_convergence_index_two_grids.");
    const bool oscillatory = (eps32 < 0.0) != (eps21 < 0.0);
    grid_convergence_index_result g{.order_observed = true, .safety_factor = fs, .oscillatory = oscillatory};
    const double s = oscillatory ? -1.0 : 1.0;
    const double l21 = std::log(r21), l32 = std::log(r32);
    const double log_ratio = std::log(std::abs(eps32)) - std::log(std::abs(eps21));  // no overflow of the quotient
    auto inner = [&](double p) {  // ln|eps32/eps21| + q(p); at p = 0 the limit of q
        if (p == 0.0) return log_ratio + (s > 0 ? std::log(l21 / l32) : 0.0);
        return log_ratio + detail::gci_log_rp_minus_s(l21, p, s) - detail::gci_log_rp_minus_s(l32, p, s);
    };
    double p = std::abs(log_ratio) / l21;
    bool settled = false;
    while (!settled && g.iterations < opt.max_iterations) {
        const double next = std::abs(inner(p)) / l21;
        ++g.iterations;
        settled = std::abs(next - p) <= opt.relative_tolerance * std::fmax(1.0, next);  // false on NaN
        p = next;
    }
    if (!settled)
        detail::gci_fail<accuracy_unreachable>(fn, "p did not settle in ", std::to_string(opt.max_iterations),
                                               " fixed-point iterations (last p = ", detail::gci_num(p), "); use grids",
                                               " with more nearly equal ratios r21, r32, or raise max_iterations.");
    if (!(p > 0.0))
        detail::gci_fail<accuracy_unreachable>(fn, "the apparent order is 0: the differences do not shrink with h,",
                                               " so no error band follows; refine further.");
    g.order = p;
    g.differences_grow = inner(p) < 0.0;
    detail::gci_finish(fn, g, phi1, phi2, r21, "three grids, observed order",
                       g.oscillatory ? " (Celik et al. 2008); oscillatory convergence" : " (Celik et al. 2008)");
    return g;
}

/// Two grids with a declared (not observed) order p: eqs. (6a), (7a)-(7c), Fs = 3 by default (Roache 1998).
inline grid_convergence_index_result grid_convergence_index_two_grids(
    double phi1, double phi2, double r21, double p, double safety_factor = gci_safety_factor_two_grids) {
    constexpr const char* fn = "grid_convergence_index_two_grids";
    detail::gci_check_finite(fn, {{"phi1", phi1}, {"phi2", phi2}, {"r21", r21}, {"the order p", p},
                                  {"the safety factor", safety_factor}});
    detail::gci_check_ratio(fn, "r21", r21);
    detail::gci_check_order(fn, p);
    detail::gci_check_factor(fn, safety_factor);
    grid_convergence_index_result g{.order = p, .safety_factor = safety_factor};
    detail::gci_finish(fn, g, phi1, phi2, r21, "two grids, declared order", " (Roache 1998)");
    return g;
}

/// Absolute form for vector solutions: d = ||y_coarse - y_fine|| in any norm, r = h_coarse/h_fine.
/// The fine solution's band Fs d / (r^p - 1): Richardson's model e_fine = (y_fine - y_coarse) /
/// (r^p - 1) taken in the norm (derived), times Fs as in the GCI.
inline double fine_solution_error_band(double d, double r, double p, double safety_factor) {
    return detail::gci_fine_band("fine_solution_error_band", d, r, p, safety_factor);
}

/// The coarse solution's band Fs d r^p / (r^p - 1) (same model: e_coarse = r^p e_fine), computed as
/// Fs d + Fs d / (r^p - 1) so that a large p cannot overflow.
inline double coarse_solution_error_band(double d, double r, double p, double safety_factor) {
    return safety_factor * d + detail::gci_fine_band("coarse_solution_error_band", d, r, p, safety_factor);
}

} // namespace stepcert
