#pragma once
// Finds the asymptotic range of a convergence sequence: the levels over which the error
// behaves like C h^p, so an order fitted there means something.
//
// Input: points from coarse to fine, each with its step h, its error (or difference), the
// local order q_i between point i-1 and point i, and a round-off floor.
// Algorithm:
//  1. A point is usable when its error is finite, > 0, above its floor and below its ceiling
//     (NaN/inf never count as small; an error at or below the floor is round-off, not
//     discretization error; an error above the ceiling, by default 10% of the solution's size,
//     leaves no correct digit, so the expansion in powers of h cannot have taken hold yet).
//  2. The interval between points i-1 and i is converging when both points are usable and
//     q_i > stall_order (the error really falls).
//  3. Among all runs of consecutive converging intervals, keep those whose local orders agree:
//     max(q) - min(q) <= max(order_spread, relative_order_spread * |median q|) * w, where
//     w = min(4, max(1, ln 2 / ln rho)) and rho is the smallest step ratio in the run: the
//     spreads are meant for halving, and a given wobble of log(error) moves a local order by
//     1/ln(rho), so smaller ratios (rounded ladders, adaptive levels) get a wider allowance.
//  4. Take the longest such run (ties: smaller spread, then the finer run). It must cover at
//     least min_points points (>= 3, i.e. two intervals); otherwise the verdict is
//     "no asymptotic range found" and nothing is fitted. Then let it settle: while more than
//     min_points remain, drop its coarsest interval if that local order differs from the median
//     of the finer ones by more than the unwidened spread (a drift towards the asymptotic order).
//  5. Points coarser than the run are pre-asymptotic. Points finer than it belong to the
//     round-off plateau from the first one that is below its floor, stops falling, or whose
//     local order collapses below the run's orders; finer points whose order rises above the
//     run are "unsettled". Non-finite points are always marked non_finite.
// The method's declared order is never used, so a wrong method is reported at the order it has.
#include <algorithm>
#include <cmath>
#include <cstddef>
#include <cstdio>
#include <limits>
#include <span>
#include <string>
#include <string_view>
#include <vector>

#include "stepcert/core/error.hpp"
#include "stepcert/core/number_text.hpp"

namespace stepcert {

enum class level_status { in_range, pre_asymptotic, round_off_plateau, non_finite, unsettled, baseline };

inline std::string_view to_string(level_status s) {
    switch (s) {
    case level_status::in_range: return "in_range";
    case level_status::pre_asymptotic: return "pre_asymptotic";
    case level_status::round_off_plateau: return "round_off_plateau";
    case level_status::non_finite: return "non_finite";
    case level_status::unsettled: return "unsettled";
    case level_status::baseline: return "baseline";
    }
    return "unknown";
}

/// Tuning of the range detection (defaults measured on RK4/Dormand–Prince Kepler and
/// Prothero–Robinson ladders, see tests/test_study_*).
struct range_settings {
    double order_spread = 0.3;            ///< local orders in the range agree within this ...
    double relative_order_spread = 0.05;  ///< ... or this fraction of the order, whichever is larger
                                          ///< (both for step ratio 2; widened for smaller ratios)
    double stall_order = 0.5;             ///< local order at or below this: the error stopped falling
    double max_relative_error = 0.1;      ///< errors above this times |y| are pre-asymptotic (see order_study.hpp)
    double round_off_factor = 1.0;        ///< scales the floor sqrt(N) * eps * |y| (see order_study.hpp)
    std::size_t min_points = 3;           ///< fewest levels a fit may use (>= 3)

    void validate() const {
        if (!(order_spread > 0.0) || !std::isfinite(order_spread) || !(relative_order_spread >= 0.0) ||
            !std::isfinite(relative_order_spread))
            throw invalid_input("stepcert: range_settings: order_spread must be finite and > 0, relative_order_spread finite and >= 0.");
        if (!std::isfinite(stall_order))
            throw invalid_input("stepcert: range_settings: stall_order must be finite.");
        if (!(max_relative_error > 0.0))
            throw invalid_input("stepcert: range_settings: max_relative_error must be > 0 (infinity switches the ceiling off).");
        if (!(round_off_factor >= 0.0) || !std::isfinite(round_off_factor))
            throw invalid_input("stepcert: range_settings: round_off_factor must be finite and >= 0.");
        if (min_points < 3)
            throw invalid_input("stepcert: range_settings: min_points must be at least 3 (a fit through two points cannot be checked).");
    }
};

/// One level of a convergence sequence as the range detection sees it.
struct convergence_point {
    double h;            ///< step (actual or effective)
    double error;        ///< error or successive difference in the study's norm
    double local_order;  ///< order between the previous point and this one (NaN for the first)
    double floor;        ///< round-off floor for this point's error
    double ceiling = std::numeric_limits<double>::infinity();  ///< errors above it have no correct digit
};

struct asymptotic_range {
    bool found = false;
    std::size_t first = 0;  ///< first point (or level) in the range, inclusive
    std::size_t last = 0;   ///< last point (or level) in the range, inclusive
    double median_order = std::numeric_limits<double>::quiet_NaN();  ///< of the local orders inside
    double spread = std::numeric_limits<double>::quiet_NaN();        ///< max - min of those orders
    std::string verdict;                                             ///< one line, human readable
    std::vector<level_status> status;                                ///< per point (or level)
    std::vector<std::string> notes;                                  ///< why a point is out of range

    std::size_t size() const { return found ? last - first + 1 : 0; }
};

namespace detail {
inline std::string short_number(double x, const char* fmt = "%.3g") { return formatted_number(x, fmt); }
// Widening of the order spread for step ratio rho (see the header comment).
inline double ratio_widening(double rho) {
    if (!(rho > 1.0)) return 4.0;
    return std::min(4.0, std::max(1.0, std::log(2.0) / std::log(rho)));
}
inline double median_of(std::vector<double> v) {
    std::sort(v.begin(), v.end());
    const std::size_t n = v.size();
    return n % 2 ? v[n / 2] : 0.5 * (v[n / 2 - 1] + v[n / 2]);
}
} // namespace detail

/// Detects the asymptotic range of points ordered from coarse to fine (see the header comment).
inline asymptotic_range find_asymptotic_range(std::span<const convergence_point> pts, const range_settings& s = {}) {
    s.validate();
    const std::size_t n = pts.size();
    asymptotic_range r;
    r.status.assign(n, level_status::unsettled);
    r.notes.assign(n, std::string());

    std::vector<char> finite(n), usable(n), too_large(n), converging(n, 0);
    for (std::size_t i = 0; i < n; ++i) {
        finite[i] = std::isfinite(pts[i].error) && std::isfinite(pts[i].h);
        too_large[i] = finite[i] && !(pts[i].error < pts[i].ceiling);
        usable[i] = finite[i] && pts[i].error > 0.0 && pts[i].error > pts[i].floor && !too_large[i];
    }
    for (std::size_t i = 1; i < n; ++i)
        converging[i] = usable[i - 1] && usable[i] && std::isfinite(pts[i].local_order) && pts[i].local_order > s.stall_order;

    // Best run of intervals [a, b] (interval i joins points i-1 and i).
    std::size_t best_a = 0, best_b = 0, best_len = 0;
    double best_spread = 0.0, best_median = 0.0, best_allowed = 0.0;
    for (std::size_t a = 1; a < n; ++a) {
        if (!converging[a]) continue;
        double lo = pts[a].local_order, hi = lo, widening = 1.0;
        std::vector<double> qs;
        for (std::size_t b = a; b < n && converging[b]; ++b) {
            const double q = pts[b].local_order;
            lo = std::min(lo, q);
            hi = std::max(hi, q);
            qs.push_back(q);
            widening = std::max(widening, detail::ratio_widening(pts[b - 1].h / pts[b].h));
            const double med = detail::median_of(qs);
            const double allowed = std::max(s.order_spread, s.relative_order_spread * std::abs(med)) * widening;
            if (hi - lo > allowed) continue;  // a longer run may still agree around a new median
            const std::size_t len = b - a + 1;
            const double spread = hi - lo;
            if (len > best_len || (len == best_len && spread <= best_spread)) {  // ties: finer wins
                best_a = a; best_b = b; best_len = len; best_spread = spread; best_median = med; best_allowed = allowed;
            }
        }
    }

    // Settling: drop coarse-end intervals whose order differs from the median of the finer ones
    // by more than the unwidened spread (a drift towards the asymptotic order, not noise).
    if (best_len + 1 >= s.min_points) {
        auto base_allowance = [&](double med) { return std::max(s.order_spread, s.relative_order_spread * std::abs(med)); };
        while (best_b - best_a + 2 > s.min_points) {
            std::vector<double> finer;
            for (std::size_t i = best_a + 1; i <= best_b; ++i) finer.push_back(pts[i].local_order);
            const double med = detail::median_of(finer);
            if (std::abs(pts[best_a].local_order - med) <= base_allowance(med)) break;
            ++best_a;
        }
        std::vector<double> qs;
        for (std::size_t i = best_a; i <= best_b; ++i) qs.push_back(pts[i].local_order);
        best_len = qs.size();
        best_median = detail::median_of(qs);
        best_spread = *std::max_element(qs.begin(), qs.end()) - *std::min_element(qs.begin(), qs.end());
    }

    std::size_t usable_count = 0;
    for (std::size_t i = 0; i < n; ++i) usable_count += usable[i] ? 1 : 0;

    auto mark_unusable = [&](std::size_t i) {
        if (!finite[i]) {
            r.status[i] = level_status::non_finite;
            r.notes[i] = "error is NaN or infinite";
            return true;
        }
        if (too_large[i]) {
            r.status[i] = r.found && i > r.last ? level_status::unsettled : level_status::pre_asymptotic;
            r.notes[i] = "error " + detail::short_number(pts[i].error) + " is above " + detail::short_number(pts[i].ceiling) +
                         " (no correct digit yet)";
            return true;
        }
        if (!usable[i]) {
            r.status[i] = level_status::round_off_plateau;
            r.notes[i] = "error " + detail::short_number(pts[i].error) + " at or below round-off floor " +
                         detail::short_number(pts[i].floor);
            return true;
        }
        return false;
    };

    if (best_len + 1 < s.min_points) {
        for (std::size_t i = 0; i < n; ++i)
            if (!mark_unusable(i)) r.notes[i] = "local orders do not settle here";
        if (usable_count < s.min_points)
            r.verdict = "no asymptotic range found: only " + std::to_string(usable_count) +
                        " levels have finite errors between the round-off floor and the no-correct-digit ceiling (need " +
                        std::to_string(s.min_points) + "); add levels between the coarse ones and the round-off plateau";
        else
            r.verdict = "no asymptotic range found: no " + std::to_string(s.min_points) +
                        " consecutive levels have falling errors with local orders that agree within " +
                        detail::short_number(s.order_spread) + " (widened for step ratios below 2; longest agreeing run: " +
                        std::to_string(best_len == 0 ? std::size_t{1} : best_len + 1) +
                        " levels); add levels, or check the method and the problem";
        return r;
    }

    r.found = true;
    r.first = best_a - 1;
    r.last = best_b;
    r.median_order = best_median;
    r.spread = best_spread;
    double range_lo = pts[best_a].local_order;
    for (std::size_t i = best_a; i <= best_b; ++i) range_lo = std::min(range_lo, pts[i].local_order);
    const double allowed = best_allowed;
    const std::string range_orders = "the range's local orders " + detail::short_number(range_lo, "%.2f") + " .. " +
                                     detail::short_number(range_lo + best_spread, "%.2f");

    for (std::size_t i = r.first; i <= r.last; ++i) r.status[i] = level_status::in_range;
    if (r.first > 0) r.notes[r.first] = "first level of the range; its local order is measured against the level before it";
    for (std::size_t i = 0; i < r.first; ++i) {
        if (mark_unusable(i)) continue;
        r.status[i] = level_status::pre_asymptotic;
        r.notes[i] = "coarser than the asymptotic range: local orders not yet settled";
    }
    bool plateau = false;
    for (std::size_t i = r.last + 1; i < n; ++i) {
        if (mark_unusable(i)) {
            plateau = plateau || (finite[i] && !too_large[i]);
            continue;
        }
        const double q = pts[i].local_order;
        if (plateau) {
            r.status[i] = level_status::round_off_plateau;
            r.notes[i] = "finer than the start of the round-off plateau";
        } else if (!(q > s.stall_order)) {
            plateau = true;
            r.status[i] = level_status::round_off_plateau;
            r.notes[i] = "error stopped falling (local order " + detail::short_number(q, "%.2f") + ")";
        } else if (q < range_lo - allowed) {
            plateau = true;
            r.status[i] = level_status::round_off_plateau;
            r.notes[i] = "local order " + detail::short_number(q, "%.2f") + " collapsed below " + range_orders;
        } else {
            r.status[i] = level_status::unsettled;
            r.notes[i] = "local order " + detail::short_number(q, "%.2f") + " differs from " + range_orders;
        }
    }
    r.verdict = "asymptotic range: " + std::to_string(r.size()) + " levels with local orders " +
                detail::short_number(range_lo, "%.2f") + " .. " + detail::short_number(range_lo + best_spread, "%.2f") +
                " (agreeing within " + detail::short_number(allowed, "%.2g") + ")";
    return r;
}

} // namespace stepcert
