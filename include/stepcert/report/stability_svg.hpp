#pragma once
// An SVG picture of a stability region (tableau/stability_region.hpp): the stable set shaded,
// its boundary |R(z)| = 1 drawn, axes with ticks and labels Re(z), Im(z), equal scales on both
// axes, and the precise stability intervals written under the title. Plain text, no dependency.
#include <algorithm>
#include <cmath>
#include <cstdio>
#include <string>

#include "stepcert/report/detail/svg_text.hpp"
#include "stepcert/tableau/stability_region.hpp"

namespace stepcert {

namespace detail {
inline std::string tick_label(double x) { return std::to_string(std::lround(x)); }
inline std::string interval_label(double x) {
    if (std::isinf(x)) return "unbounded";
    char buf[32];
    std::snprintf(buf, sizeof buf, "%.4f", x);
    return buf;
}
} // namespace detail

/// The region as an SVG document about width pixels wide.
inline std::string stability_svg(const stability_region& region, double width = 640) {
    using detail::svg_number;
    const plane_box& b = region.box;
    const double margin_left = 60, margin_right = 20, margin_top = 60, margin_bottom = 50;
    const double scale = (width - margin_left - margin_right) / (b.re_max - b.re_min);  // pixels per unit, both axes
    const double height = margin_top + margin_bottom + scale * (b.im_max - b.im_min);
    auto px = [&](double x) { return margin_left + (x - b.re_min) * scale; };
    auto py = [&](double y) { return margin_top + (b.im_max - y) * scale; };
    std::string s;
    s += "<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"" + svg_number(width) + "\" height=\"" + svg_number(height) +
         "\" viewBox=\"0 0 " + svg_number(width) + " " + svg_number(height) + "\" font-family=\"sans-serif\" font-size=\"12\">\n";
    s += "<rect x=\"0\" y=\"0\" width=\"" + svg_number(width) + "\" height=\"" + svg_number(height) + "\" fill=\"white\"/>\n";
    s += "<text x=\"" + svg_number(width / 2) + "\" y=\"20\" text-anchor=\"middle\" font-size=\"15\">" +
         detail::svg_escape(region.name.empty() ? std::string("stability region") : region.name) + ": |R(z)| &lt;= 1 shaded</text>\n";
    s += "<text x=\"" + svg_number(width / 2) + "\" y=\"40\" text-anchor=\"middle\">real interval [-" +
         detail::interval_label(region.summary.real_interval) + ", 0], imaginary interval [-" +
         detail::interval_label(region.summary.imaginary_interval) + " i, " + detail::interval_label(region.summary.imaginary_interval) +
         " i]" + (region.summary.a_stable ? ", A-stable" : "") + "</text>\n";
    // Stable cells, one rectangle per run of a row.
    const double cw = (b.re_max - b.re_min) / static_cast<double>(region.columns), ch = (b.im_max - b.im_min) / static_cast<double>(region.rows);
    s += "<g fill=\"#cfe3f7\" stroke=\"none\">\n";
    for (const auto& r : region.stable_runs) {
        const double x = b.re_min + cw * static_cast<double>(r.first), y = b.im_min + ch * static_cast<double>(r.row);
        s += "<rect x=\"" + svg_number(px(x)) + "\" y=\"" + svg_number(py(y + ch)) + "\" width=\"" +
             svg_number(cw * static_cast<double>(r.last - r.first + 1) * scale + 0.3) + "\" height=\"" + svg_number(ch * scale + 0.3) + "\"/>\n";
    }
    s += "</g>\n";
    // Grid and ticks at integers (or every 2, 5 when wide).
    const double span = std::max(b.re_max - b.re_min, b.im_max - b.im_min);
    const double step = span > 40 ? 10 : span > 16 ? 5 : span > 8 ? 2 : 1;
    s += "<g stroke=\"#dddddd\" stroke-width=\"0.5\">\n";
    for (double x = std::ceil(b.re_min / step) * step; x <= b.re_max; x += step)
        s += "<line x1=\"" + svg_number(px(x)) + "\" y1=\"" + svg_number(py(b.im_min)) + "\" x2=\"" + svg_number(px(x)) + "\" y2=\"" +
             svg_number(py(b.im_max)) + "\"/>\n";
    for (double y = std::ceil(b.im_min / step) * step; y <= b.im_max; y += step)
        s += "<line x1=\"" + svg_number(px(b.re_min)) + "\" y1=\"" + svg_number(py(y)) + "\" x2=\"" + svg_number(px(b.re_max)) + "\" y2=\"" +
             svg_number(py(y)) + "\"/>\n";
    s += "</g>\n";
    // Boundary.
    s += "<g stroke=\"#1f4e9c\" stroke-width=\"1.5\" stroke-linecap=\"round\">\n";
    for (const auto& g : region.boundary)
        s += "<line x1=\"" + svg_number(px(g.x1)) + "\" y1=\"" + svg_number(py(g.y1)) + "\" x2=\"" + svg_number(px(g.x2)) + "\" y2=\"" +
             svg_number(py(g.y2)) + "\"/>\n";
    s += "</g>\n";
    // Axes through 0 (or along the box edge when 0 is outside), ticks and labels.
    const double ax = std::clamp(0.0, b.im_min, b.im_max), ay = std::clamp(0.0, b.re_min, b.re_max);
    s += "<g stroke=\"black\" stroke-width=\"1\">\n";
    s += "<line x1=\"" + svg_number(px(b.re_min)) + "\" y1=\"" + svg_number(py(ax)) + "\" x2=\"" + svg_number(px(b.re_max)) + "\" y2=\"" +
         svg_number(py(ax)) + "\"/>\n";
    s += "<line x1=\"" + svg_number(px(ay)) + "\" y1=\"" + svg_number(py(b.im_min)) + "\" x2=\"" + svg_number(px(ay)) + "\" y2=\"" +
         svg_number(py(b.im_max)) + "\"/>\n";
    s += "</g>\n<g text-anchor=\"middle\">\n";
    for (double x = std::ceil(b.re_min / step) * step; x <= b.re_max; x += step)
        if (x != 0) s += "<text x=\"" + svg_number(px(x)) + "\" y=\"" + svg_number(py(ax) + 15) + "\">" + detail::tick_label(x) + "</text>\n";
    for (double y = std::ceil(b.im_min / step) * step; y <= b.im_max; y += step)
        if (y != 0) s += "<text x=\"" + svg_number(px(ay) - 14) + "\" y=\"" + svg_number(py(y) + 4) + "\">" + detail::tick_label(y) + "</text>\n";
    s += "</g>\n";
    s += "<text x=\"" + svg_number(px(b.re_max) - 4) + "\" y=\"" + svg_number(py(ax) - 6) + "\" text-anchor=\"end\">Re(z)</text>\n";
    s += "<text x=\"" + svg_number(px(ay) + 6) + "\" y=\"" + svg_number(py(b.im_max) + 12) + "\">Im(z)</text>\n";
    s += "<text x=\"" + svg_number(width - margin_right) + "\" y=\"" + svg_number(height - 12) +
         "\" text-anchor=\"end\" fill=\"#555555\">z = h lambda; generated by stepcert</text>\n";
    s += "</svg>\n";
    return s;
}

} // namespace stepcert
