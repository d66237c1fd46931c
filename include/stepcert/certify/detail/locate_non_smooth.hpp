#pragma once
// Where the error of a run is made when the observed order falls below the declared one. For a
// method of order p on a smooth right-hand side the local error of a step scales as h^(p+1), so
// a step of the run with n steps makes 2^p times the local error of the two steps of the run with
// 2n steps that cover it. Where the right-hand side jumps (or kinks), the step that straddles the
// jump makes an O(h) (or O(h^2)) local error instead, and that ratio falls to about 2 (or 4). So
// the windows whose ratio stays below 2^(p-1) while they carry a fair share of the local error
// are where the error is made: the right-hand side is likely not smooth there. The local errors
// are step-doubling estimates (one step of h against two of h/2, from the run's own states), in
// the run's own layout (run_uniform: segments between breakpoints, output blocks).
#include <algorithm>
#include <cmath>
#include <cstddef>
#include <limits>
#include <string>
#include <utility>
#include <vector>

#include "stepcert/core/norm.hpp"
#include "stepcert/core/number_text.hpp"
#include "stepcert/core/problem.hpp"
#include "stepcert/run/counted_rhs.hpp"
#include "stepcert/run/detail/segments.hpp"
#include "stepcert/run/run.hpp"

namespace stepcert::detail {

struct non_smooth_window {
    double from = 0.0, to = 0.0;  ///< the step of the finer run where the local error sits
    double ratio = 0.0;           ///< coarse step's local error / the two finer steps'
    double share = 0.0;           ///< of the coarse run's summed local error
};

struct non_smooth_finding {
    std::vector<non_smooth_window> windows;  ///< largest share first, at most three
    double smooth_ratio = std::numeric_limits<double>::quiet_NaN();  ///< median ratio elsewhere (2^p when smooth)
    std::size_t evaluations = 0;
    std::string note;  ///< why nothing could be measured, if so
};

/// Step-doubling local errors (weighted by tol) of the run with n steps and output blocks G, step
/// by step, with the right-hand side held inside each segment as run_uniform does.
template <class P, class M>
std::vector<std::pair<double, double>> doubling_local_errors(const P& p, const M& m, std::size_t n, std::size_t G,
                                                             const weighted_norm& tol, counted_rhs<typename P::rhs_type>& rhs,
                                                             std::vector<double>& step_start) {
    using S = rebind_state<typename P::state_type, double>;
    const auto grid = output_grid(static_cast<double>(p.t0()), static_cast<double>(p.t1()), G, breakpoints_of(p));
    const std::size_t r = n / G;
    std::vector<std::pair<double, double>> out;  // (local error, step length)
    step_start.clear();
    S y = convert_state<S>(p.y0());
    auto ignore = [](const S&, double) {};
    for (std::size_t j = 0; j + 1 < grid.size(); ++j) {
        auto inside = inside_segment(rhs, grid[j], grid[j + 1]);
        const double h = (grid[j + 1].t - grid[j].t) / static_cast<double>(r);
        for (std::size_t k = 0; k < r; ++k) {
            const double t = grid[j].t + static_cast<double>(k) * h;
            S whole = y, halves = y;
            m.integrate_uniform(inside, whole, t, h, 1, 1, ignore);
            m.integrate_uniform(inside, halves, t, h / 2, 2, 2, ignore);
            out.emplace_back(tol(whole, halves), h);
            step_start.push_back(t);
            y = whole;
        }
    }
    return out;
}

/// The windows where the run with n steps makes local error that does not shrink as h^(p+1);
/// empty when there is none (the order is then low everywhere) or nothing could be measured.
template <class P, class M>
non_smooth_finding locate_non_smooth(const P& p, const M& m, std::size_t n, std::size_t G, const weighted_norm& tol,
                                     std::size_t budget) {
    non_smooth_finding out;
    const int order = m.order();
    const typename P::rhs_type local = p.rhs();
    counted_rhs<typename P::rhs_type> rhs{&local, &out.evaluations, budget};
    std::vector<double> start_c, start_f;
    std::vector<std::pair<double, double>> coarse, fine;
    try {
        coarse = doubling_local_errors(p, m, n, G, tol, rhs, start_c);
        fine = doubling_local_errors(p, m, 2 * n, G, tol, rhs, start_f);
    } catch (const error& e) {
        out.note = std::string("the local errors could not be measured: ") + e.what();
        return out;
    }
    if (fine.size() != 2 * coarse.size()) {
        out.note = "the finer run's steps do not pair with the coarser run's";
        return out;
    }
    double total = 0.0, largest = 0.0;
    for (const auto& c : coarse)
        if (std::isfinite(c.first)) total += c.first, largest = std::max(largest, c.first);
    if (!(total > 0.0)) {
        out.note = "the local errors are zero or not finite";
        return out;
    }
    const double flag_below = std::ldexp(1.0, order - 1);  // ratio 2^p when smooth
    std::vector<double> smooth;
    std::vector<non_smooth_window> flagged;
    for (std::size_t i = 0; i < coarse.size(); ++i) {
        const double e = coarse[i].first, f = fine[2 * i].first + fine[2 * i + 1].first;
        if (!(e >= 1e-3 * largest) || !(f > 0.0)) continue;  // negligible windows say nothing
        const double ratio = e / f;
        if (ratio >= flag_below) {
            smooth.push_back(ratio);
            continue;
        }
        const std::size_t k = fine[2 * i].first >= fine[2 * i + 1].first ? 2 * i : 2 * i + 1;
        flagged.push_back({start_f[k], start_f[k] + fine[k].second, ratio, e / total});
    }
    if (!smooth.empty()) {
        std::nth_element(smooth.begin(), smooth.begin() + static_cast<std::ptrdiff_t>(smooth.size() / 2), smooth.end());
        out.smooth_ratio = smooth[smooth.size() / 2];
    }
    std::sort(flagged.begin(), flagged.end(), [](const auto& a, const auto& b) { return a.share > b.share; });
    if (flagged.size() > 3) flagged.resize(3);
    out.windows = std::move(flagged);
    return out;
}

/// "[0.3320, 0.3359] (ratio 2.1, 97% of the local error)" for each window.
inline std::string windows_text(const non_smooth_finding& f) {
    std::string s;
    for (const auto& w : f.windows) {
        if (!s.empty()) s += ", ";
        s += "[" + formatted_number(w.from, "%.6g") + ", " + formatted_number(w.to, "%.6g") + "] (local error ratio " +
             formatted_number(w.ratio, "%.3g") + ", " + formatted_number(100.0 * w.share, "%.3g") + "% of the local error)";
    }
    return s;
}

} // namespace stepcert::detail
