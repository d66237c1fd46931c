#pragma once
// The stability region {z : |R(z)| <= 1} of a tableau, sampled on a grid of the complex plane:
// the stable cells (for shading) and the boundary |R(z)| = 1 as line segments (marching squares
// on f(z) = |R(z)|^2 - 1 with linear interpolation along cell edges), ready for plotting
// (report/stability_svg.hpp). The boundary is accurate to a fraction of a cell; the intervals in
// stability.hpp are the precise numbers.
#include <algorithm>
#include <array>
#include <cmath>
#include <complex>
#include <cstddef>
#include <limits>
#include <string>
#include <utility>
#include <vector>

#include "stepcert/core/error.hpp"
#include "stepcert/tableau/stability.hpp"

namespace stepcert {

struct plane_box {
    double re_min = -4, re_max = 1, im_min = -3.5, im_max = 3.5;
};

struct boundary_segment {
    double x1, y1, x2, y2;
};

struct stability_region {
    std::string name;
    plane_box box;
    std::size_t columns = 0, rows = 0;  ///< cells
    std::vector<boundary_segment> boundary;
    /// Stable cells as runs per row: (row, first column, last column), cell centre |R| <= 1.
    struct run { std::size_t row, first, last; };
    std::vector<run> stable_runs;
    stability_summary summary;  ///< the precise intervals, for labels
};

/// A box that shows the region: the stable intervals plus a margin, or [-10, 2] x [-6, 6] when
/// they are unbounded.
inline plane_box default_plane_box(const stability_summary& s) {
    const double reach = std::max({s.real_interval, s.imaginary_interval, 2.0});
    if (!std::isfinite(reach)) return {-10, 4, -7, 7};
    const double r = 1.25 * reach + 0.5;
    return {-r, std::max(1.0, 0.3 * r), -r * 0.8, r * 0.8};
}

/// Samples |R| on a columns x rows grid of cells over box (at least 8 x 8, at most 4000 x 4000).
template <class T>
stability_region stability_region_of(const stability_function<T>& r, const plane_box& box, std::size_t columns = 400,
                                     std::size_t rows = 400, std::string name = {}) {
    if (!(box.re_min < box.re_max) || !(box.im_min < box.im_max) || !std::isfinite(box.re_min) || !std::isfinite(box.re_max) ||
        !std::isfinite(box.im_min) || !std::isfinite(box.im_max))
        throw invalid_input("stepcert::stability_region_of: the box must be finite with re_min < re_max and im_min < im_max.");
    if (columns < 8 || rows < 8 || columns > 4000 || rows > 4000)
        throw invalid_input("stepcert::stability_region_of: use 8 to 4000 cells in each direction.");
    stability_region out;
    out.name = std::move(name);
    out.box = box;
    out.columns = columns;
    out.rows = rows;
    out.summary = stability_summary_of(r);
    const double dx = (box.re_max - box.re_min) / static_cast<double>(columns), dy = (box.im_max - box.im_min) / static_cast<double>(rows);
    auto f = [&](double x, double y) {
        const std::complex<double> v = r(std::complex<double>(x, y));
        const double m = std::norm(v) - 1.0;
        return std::isnan(m) ? std::numeric_limits<double>::infinity() : m;  // a pole is unstable
    };
    // Node values, (rows + 1) x (columns + 1).
    std::vector<double> node((rows + 1) * (columns + 1));
    auto at = [&](std::size_t i, std::size_t j) -> double& { return node[i * (columns + 1) + j]; };
    for (std::size_t i = 0; i <= rows; ++i)
        for (std::size_t j = 0; j <= columns; ++j) at(i, j) = f(box.re_min + dx * static_cast<double>(j), box.im_min + dy * static_cast<double>(i));
    auto cross = [](double fa, double fb) {  // where f = 0 between a (0) and b (1)
        if (!std::isfinite(fa) || !std::isfinite(fb)) return 0.5;
        return std::clamp(fa / (fa - fb), 0.0, 1.0);
    };
    for (std::size_t i = 0; i < rows; ++i) {
        const double y0 = box.im_min + dy * static_cast<double>(i);
        bool in_run = false;
        std::size_t first = 0;
        for (std::size_t j = 0; j < columns; ++j) {
            const double x0 = box.re_min + dx * static_cast<double>(j);
            const double f00 = at(i, j), f01 = at(i, j + 1), f10 = at(i + 1, j), f11 = at(i + 1, j + 1);
            const double centre = f(x0 + dx / 2, y0 + dy / 2);
            // Edge crossings: bottom (00-01), right (01-11), top (10-11), left (00-10); a cell
            // has 0, 2 or 4 of them.
            std::array<std::pair<double, double>, 4> pts{};
            std::size_t n_pts = 0;
            auto edge = [&](double fa, double fb, double xa, double ya, double xb, double yb) {
                if ((fa > 0) != (fb > 0)) {
                    const double t = cross(fa, fb);
                    pts[n_pts++] = {xa + t * (xb - xa), ya + t * (yb - ya)};
                }
            };
            edge(f00, f01, x0, y0, x0 + dx, y0);
            edge(f01, f11, x0 + dx, y0, x0 + dx, y0 + dy);
            edge(f11, f10, x0 + dx, y0 + dy, x0, y0 + dy);
            edge(f10, f00, x0, y0 + dy, x0, y0);
            if (n_pts == 2) {
                out.boundary.push_back({pts[0].first, pts[0].second, pts[1].first, pts[1].second});
            } else if (n_pts == 4) {  // saddle: pair by the centre's side
                const bool centre_unstable = centre > 0;
                const bool corner_unstable = f00 > 0;
                if (centre_unstable == corner_unstable) {
                    out.boundary.push_back({pts[0].first, pts[0].second, pts[1].first, pts[1].second});
                    out.boundary.push_back({pts[2].first, pts[2].second, pts[3].first, pts[3].second});
                } else {
                    out.boundary.push_back({pts[0].first, pts[0].second, pts[3].first, pts[3].second});
                    out.boundary.push_back({pts[1].first, pts[1].second, pts[2].first, pts[2].second});
                }
            }
            const bool stable = centre <= 0;
            if (stable && !in_run) {
                in_run = true;
                first = j;
            }
            if (!stable && in_run) {
                out.stable_runs.push_back({i, first, j - 1});
                in_run = false;
            }
        }
        if (in_run) out.stable_runs.push_back({i, first, columns - 1});
    }
    return out;
}

} // namespace stepcert
