#pragma once
// A cost-accuracy chart as SVG: achieved error against cost on log-log axes, one curve per
// method, for choosing the cheapest method at a target error. Plain text, no dependency, and
// independent of how the points were measured: an adapter fills chart_series.
#include <algorithm>
#include <array>
#include <cmath>
#include <cstddef>
#include <cstdio>
#include <optional>
#include <string>
#include <utility>
#include <vector>

#include "stepcert/core/error.hpp"
#include "stepcert/report/detail/svg_text.hpp"

namespace stepcert {

/// One method's curve: point i is (cost[i], error[i]); drawn sorted by cost.
struct chart_series {
    std::string name;
    std::vector<double> cost;   ///< x: right-hand-side evaluations, seconds, ... (> 0 to be shown)
    std::vector<double> error;  ///< y: achieved error (> 0 to be shown)
};

struct chart_options {
    std::string title;  ///< empty: no title line
    std::string x_label = "right-hand-side evaluations";
    std::string y_label = "achieved error (max over output times)";
    std::optional<double> target;  ///< a target error, drawn as a dashed horizontal line
    int width = 800;               ///< pixels
    int height = 560;
};

namespace detail::chart {

// Okabe and Ito, "Color Universal Design (CUD): how to make figures and presentations that are
// friendly to colorblind people", 2008 (from memory). Yellow last: it is faint on white.
inline constexpr std::array<const char*, 8> palette = {"#0072B2", "#D55E00", "#009E73", "#CC79A7",
                                                       "#E69F00", "#56B4E9", "#000000", "#F0E442"};
inline constexpr int marker_shapes = 8;
inline constexpr double marker_radius = 4.5;
inline constexpr double font_size = 12;
inline constexpr double char_width = 7.0;  // DejaVu Sans at 12 px averages about 6.5; errs wide
inline constexpr double legend_row = 20;

template <class... Parts>
void append(std::string& s, const Parts&... parts) {
    (s += ... += parts);
}
// Built with += (a + b + c of temporaries trips g++ 12's -Wrestrict).
template <class... Parts>
std::string message(const Parts&... parts) {
    std::string s;
    append(s, parts...);
    return s;
}

inline std::size_t code_points(const std::string& s) {
    return static_cast<std::size_t>(std::count_if(s.begin(), s.end(), [](char c) { return (static_cast<unsigned char>(c) & 0xC0) != 0x80; }));
}
inline double text_width(const std::string& s, double size = font_size) {
    return static_cast<double>(code_points(s)) * char_width * size / font_size;
}

/// s cut to at most max_width pixels (whole UTF-8 characters), an ellipsis marking the cut.
inline std::string fit_text(const std::string& s, double max_width) {
    if (text_width(s) <= max_width) return s;
    const auto keep = static_cast<std::size_t>(std::max(1.0, std::floor(max_width / char_width) - 1));
    std::size_t n = 0, i = 0;
    for (; i < s.size(); ++i)
        if ((static_cast<unsigned char>(s[i]) & 0xC0) != 0x80 && n++ == keep) break;
    std::string out = s.substr(0, i);
    out += "\xE2\x80\xA6";  // ellipsis
    return out;
}

/// An axis label that fits its side of the plot: smaller type first (down to 9 px), then cut.
struct fitted {
    double size;
    std::string text;
};
inline fitted fit_label(const std::string& text, double room) {
    const double width = text_width(text);
    if (width <= room) return {font_size, text};
    const double size = std::max(9.0, font_size * room / width);
    return {size, fit_text(text, room * font_size / size)};
}

/// "10^k" with k raised: a tspan with dy, which browsers and librsvg both honour.
inline std::string power_of_ten(int k) {
    std::string s = "10<tspan dy=\"-6\" font-size=\"9\">";
    if (k < 0) s += "\xE2\x88\x92";  // minus sign
    s += std::to_string(k < 0 ? -k : k);
    s += "</tspan>";
    return s;
}
inline double power_label_width(int k) { return 2 * char_width + 5.5 * static_cast<double>(std::to_string(k).size()); }

/// x as "m×10^k" with three significant digits (just "10^k" when m is 1).
inline std::string scientific(double x) {
    int k = static_cast<int>(std::floor(std::log10(x)));
    char m[32];
    std::snprintf(m, sizeof m, "%.3g", x / std::pow(10.0, k));
    std::string mantissa = m;
    if (mantissa == "10") {
        ++k;
        mantissa = "1";
    }
    if (mantissa == "1") return power_of_ten(k);
    mantissa += "\xC3\x97";  // multiplication sign
    mantissa += power_of_ten(k);
    return mantissa;
}

/// Whole decades 10^lo .. 10^hi around [min, max], hi > lo; data on a decade line gets one more
/// decade beyond it, so no marker sits on the frame.
struct decades {
    int lo, hi;
};
inline decades decades_around(double min, double max) {
    const double a = std::log10(min), b = std::log10(max), edge = 0.02;
    decades d{static_cast<int>(std::floor(a)), static_cast<int>(std::ceil(b))};
    if (a - d.lo < edge) --d.lo;
    if (d.hi - b < edge) ++d.hi;
    return d;
}

/// Label every step-th decade, step the first of 1, 2, 5, 10, ... that keeps labels min_gap apart.
inline int label_step(double pixels_per_decade, double min_gap) {
    for (int step = 1;; step *= 10)
        for (int f : {1, 2, 5})
            if (pixels_per_decade * f * step >= min_gap || step > 1000) return f * step;
}
inline bool labelled(int k, int step) { return ((k % step) + step) % step == 0; }

/// One marker: shape picks circle, square, triangle up, diamond, triangle down, star, cross, plus.
inline std::string marker(int shape, double x, double y, const char* colour) {
    using detail::svg_number;
    const double r = marker_radius;
    auto pt = [&](double dx, double dy) {
        std::string p = svg_number(x + dx);
        p += ',';
        p += svg_number(y + dy);
        return p;
    };
    std::string s, filled = "\" fill=\"";
    append(filled, colour, "\" stroke=\"white\" stroke-width=\"0.8\"/>\n");
    switch (shape) {
    case 0: append(s, "<circle cx=\"", svg_number(x), "\" cy=\"", svg_number(y), "\" r=\"", svg_number(r), filled); break;
    case 1:
        append(s, "<rect x=\"", svg_number(x - 0.85 * r), "\" y=\"", svg_number(y - 0.85 * r), "\" width=\"", svg_number(1.7 * r), "\" height=\"",
               svg_number(1.7 * r), filled);
        break;
    case 2: append(s, "<path d=\"M", pt(0, -1.15 * r), " L", pt(1.05 * r, 0.75 * r), " L", pt(-1.05 * r, 0.75 * r), " Z", filled); break;
    case 3: append(s, "<path d=\"M", pt(0, -1.25 * r), " L", pt(r, 0), " L", pt(0, 1.25 * r), " L", pt(-r, 0), " Z", filled); break;
    case 4: append(s, "<path d=\"M", pt(0, 1.15 * r), " L", pt(1.05 * r, -0.75 * r), " L", pt(-1.05 * r, -0.75 * r), " Z", filled); break;
    case 5: {
        s += "<path d=\"M";
        for (int i = 0; i < 10; ++i) {
            const double a = 3.14159265358979 * i / 5, rr = (i % 2 == 0 ? 1.3 : 0.55) * r;
            if (i > 0) s += " L";
            s += pt(rr * std::sin(a), -rr * std::cos(a));
        }
        append(s, " Z", filled);
        break;
    }
    case 6:
        append(s, "<path d=\"M", pt(-r, -r), " L", pt(r, r), " M", pt(-r, r), " L", pt(r, -r), "\" fill=\"none\" stroke=\"", colour,
               "\" stroke-width=\"2\"/>\n");
        break;
    default:
        append(s, "<path d=\"M", pt(-1.2 * r, 0), " L", pt(1.2 * r, 0), " M", pt(0, -1.2 * r), " L", pt(0, 1.2 * r), "\" fill=\"none\" stroke=\"",
               colour, "\" stroke-width=\"2\"/>\n");
        break;
    }
    return s;
}

/// Colour and marker of series i: 8 colours, and the marker shifted each round so 64 series
/// still differ in the pair.
inline const char* colour_of(std::size_t i) { return palette[i % palette.size()]; }
inline int shape_of(std::size_t i) { return static_cast<int>((i + i / palette.size()) % marker_shapes); }

struct point {
    double cost, error;
};

} // namespace detail::chart

/// The chart as an SVG document of options.width x options.height pixels. Points whose cost or
/// error is zero, negative or not finite cannot sit on a log axis: they are left out and counted
/// in a note on the chart. Throws invalid_input when there is nothing to draw or the options
/// cannot be met.
inline std::string cost_accuracy_svg(const std::vector<chart_series>& series, const chart_options& options = {}) {
    namespace c = detail::chart;
    using c::append;
    using detail::svg_escape;
    using detail::svg_number;
    if (series.empty())
        throw invalid_input("cost_accuracy_svg: no series given; pass at least one chart_series with (cost, error) points");
    if (options.width < 320 || options.height < 240 || options.width > 20000 || options.height > 20000)
        throw invalid_input(c::message("cost_accuracy_svg: chart size ", std::to_string(options.width), " x ", std::to_string(options.height),
                                       " pixels is outside 320 x 240 .. 20000 x 20000; set chart_options width and height in that range"));
    if (options.target && !(std::isfinite(*options.target) && *options.target > 0))
        throw invalid_input("cost_accuracy_svg: the target error must be positive and finite to sit on a log axis; leave target unset for no line");

    // Usable points, sorted by cost, and the data range.
    std::vector<std::vector<c::point>> shown(series.size());
    std::size_t left_out = 0;
    double cost_min = HUGE_VAL, cost_max = 0, error_min = HUGE_VAL, error_max = 0;
    for (std::size_t i = 0; i < series.size(); ++i) {
        const chart_series& s = series[i];
        if (s.cost.size() != s.error.size())
            throw invalid_input(c::message("cost_accuracy_svg: series '", s.name, "' has ", std::to_string(s.cost.size()), " costs but ",
                                           std::to_string(s.error.size()), " errors; give one error per cost"));
        for (std::size_t j = 0; j < s.cost.size(); ++j) {
            const double x = s.cost[j], y = s.error[j];
            if (!(std::isfinite(x) && std::isfinite(y) && x > 0 && y > 0)) {
                ++left_out;
                continue;
            }
            shown[i].push_back({x, y});
            cost_min = std::min(cost_min, x), cost_max = std::max(cost_max, x);
            error_min = std::min(error_min, y), error_max = std::max(error_max, y);
        }
        std::sort(shown[i].begin(), shown[i].end(), [](const c::point& a, const c::point& b) {
            return a.cost < b.cost || (a.cost == b.cost && a.error < b.error);
        });
    }
    if (cost_max == 0)
        throw invalid_input(c::message("cost_accuracy_svg: none of the ", std::to_string(left_out),
                                       " points has a positive, finite cost and error, so none fits on log axes; check what the series hold"));
    if (options.target) error_min = std::min(error_min, *options.target), error_max = std::max(error_max, *options.target);
    const c::decades xd = c::decades_around(cost_min, cost_max), yd = c::decades_around(error_min, error_max);

    // Layout: y label and tick labels on the left, legend outside the plot on the right (it never
    // covers data), tick labels, x label and the note below.
    const std::size_t legend_rows = series.size() + (options.target ? 1 : 0);
    double names_width = 0;
    for (const auto& s : series) names_width = std::max(names_width, c::text_width(s.name.empty() ? std::string("series 00") : s.name));
    names_width = std::min(std::max(names_width, c::text_width("target")), std::max(90.0, 0.3 * options.width));
    const double legend_width = 46 + names_width + 10;
    const double y_tick_width = std::max(c::power_label_width(yd.lo), c::power_label_width(yd.hi));
    const double W = options.width, H = options.height;
    const double left = 30 + y_tick_width + 14, right = legend_width + 26;
    const double top = options.title.empty() ? 24 : 50;
    const double bottom = 62 + (left_out > 0 ? 18 : 0);
    const double pw = W - left - right, ph = H - top - bottom;
    if (pw < 160 || ph < 120)
        throw invalid_input(c::message("cost_accuracy_svg: a ", std::to_string(options.width), " x ", std::to_string(options.height),
                                       " chart leaves too small a plot beside the legend and labels; make the chart wider or taller, or the names shorter"));
    if (12 + legend_rows * c::legend_row > ph)
        throw invalid_input(c::message("cost_accuracy_svg: ", std::to_string(series.size()), " series do not fit the legend of a chart ",
                                       std::to_string(options.height), " pixels high; make it taller or split the series over several charts"));
    const double x_decade = pw / (xd.hi - xd.lo), y_decade = ph / (yd.hi - yd.lo);
    auto px = [&](double x) { return left + (std::log10(x) - xd.lo) * x_decade; };
    auto py = [&](double y) { return top + (yd.hi - std::log10(y)) * y_decade; };

    std::string s;
    append(s, "<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"", std::to_string(options.width), "\" height=\"", std::to_string(options.height),
           "\" viewBox=\"0 0 ", std::to_string(options.width), " ", std::to_string(options.height),
           "\" font-family=\"DejaVu Sans, Verdana, sans-serif\" font-size=\"12\">\n");
    append(s, "<title>", svg_escape(options.title.empty() ? std::string("cost against achieved error") : options.title), "</title>\n");
    append(s, "<rect x=\"0\" y=\"0\" width=\"", std::to_string(options.width), "\" height=\"", std::to_string(options.height), "\" fill=\"white\"/>\n");
    if (!options.title.empty()) {
        const double centre = c::text_width(options.title, 16) < pw ? left + pw / 2 : W / 2;
        append(s, "<text class=\"title\" x=\"", svg_number(centre), "\" y=\"30\" text-anchor=\"middle\" font-size=\"16\">", svg_escape(options.title),
               "</text>\n");
    }

    // Grid at decades, then the frame, ticks and labels.
    const int x_step = c::label_step(x_decade, 48), y_step = c::label_step(y_decade, 18);
    const bool x_all_decades = x_decade >= 5, y_all_decades = y_decade >= 5;
    s += "<g class=\"grid\" stroke=\"#dddddd\" stroke-width=\"1\">\n";
    for (int k = xd.lo + 1; k < xd.hi; ++k)
        if (x_all_decades || c::labelled(k, x_step))
            append(s, "<line x1=\"", svg_number(left + (k - xd.lo) * x_decade), "\" y1=\"", svg_number(top), "\" x2=\"",
                   svg_number(left + (k - xd.lo) * x_decade), "\" y2=\"", svg_number(top + ph), "\"/>\n");
    for (int k = yd.lo + 1; k < yd.hi; ++k)
        if (y_all_decades || c::labelled(k, y_step))
            append(s, "<line x1=\"", svg_number(left), "\" y1=\"", svg_number(top + (yd.hi - k) * y_decade), "\" x2=\"", svg_number(left + pw),
                   "\" y2=\"", svg_number(top + (yd.hi - k) * y_decade), "\"/>\n");
    s += "</g>\n";
    append(s, "<rect class=\"frame\" x=\"", svg_number(left), "\" y=\"", svg_number(top), "\" width=\"", svg_number(pw), "\" height=\"", svg_number(ph),
           "\" fill=\"none\" stroke=\"#333333\" stroke-width=\"1\"/>\n");
    s += "<g class=\"ticks\" stroke=\"#333333\" stroke-width=\"1\">\n";
    for (int k = xd.lo; k <= xd.hi; ++k) {
        const double x = left + (k - xd.lo) * x_decade;
        if (c::labelled(k, x_step))
            append(s, "<line x1=\"", svg_number(x), "\" y1=\"", svg_number(top + ph), "\" x2=\"", svg_number(x), "\" y2=\"", svg_number(top + ph + 6),
                   "\"/>\n");
        if (k < xd.hi && x_decade >= 30)
            for (int m = 2; m <= 9; ++m) {
                const double xm = x + std::log10(m) * x_decade;
                append(s, "<line x1=\"", svg_number(xm), "\" y1=\"", svg_number(top + ph), "\" x2=\"", svg_number(xm), "\" y2=\"",
                       svg_number(top + ph + 3), "\"/>\n");
            }
    }
    for (int k = yd.lo; k <= yd.hi; ++k) {
        const double y = top + (yd.hi - k) * y_decade;
        if (c::labelled(k, y_step))
            append(s, "<line x1=\"", svg_number(left - 6), "\" y1=\"", svg_number(y), "\" x2=\"", svg_number(left), "\" y2=\"", svg_number(y), "\"/>\n");
        if (k < yd.hi && y_decade >= 30)
            for (int m = 2; m <= 9; ++m) {
                const double ym = y - std::log10(m) * y_decade;
                append(s, "<line x1=\"", svg_number(left - 3), "\" y1=\"", svg_number(ym), "\" x2=\"", svg_number(left), "\" y2=\"", svg_number(ym),
                       "\"/>\n");
            }
    }
    s += "</g>\n<g class=\"tick-labels\" fill=\"#222222\">\n";
    for (int k = xd.lo; k <= xd.hi; ++k)
        if (c::labelled(k, x_step))
            append(s, "<text x=\"", svg_number(left + (k - xd.lo) * x_decade), "\" y=\"", svg_number(top + ph + 24), "\" text-anchor=\"middle\">",
                   c::power_of_ten(k), "</text>\n");
    for (int k = yd.lo; k <= yd.hi; ++k)
        if (c::labelled(k, y_step))
            append(s, "<text x=\"", svg_number(left - 9), "\" y=\"", svg_number(top + (yd.hi - k) * y_decade + 5), "\" text-anchor=\"end\">",
                   c::power_of_ten(k), "</text>\n");
    s += "</g>\n";
    const c::fitted x_label = c::fit_label(options.x_label, pw), y_label = c::fit_label(options.y_label, ph);
    append(s, "<text class=\"x-label\" x=\"", svg_number(left + pw / 2), "\" y=\"", svg_number(top + ph + 46), "\" text-anchor=\"middle\" font-size=\"",
           svg_number(x_label.size), "\">", svg_escape(x_label.text), "</text>\n");
    append(s, "<text class=\"y-label\" transform=\"translate(18,", svg_number(top + ph / 2), ") rotate(-90)\" text-anchor=\"middle\" font-size=\"",
           svg_number(y_label.size), "\">", svg_escape(y_label.text), "</text>\n");

    // Target line, its label at the end of the line with the fewest points near it.
    if (options.target) {
        const double ty = py(*options.target);
        append(s, "<line class=\"target\" x1=\"", svg_number(left), "\" y1=\"", svg_number(ty), "\" x2=\"", svg_number(left + pw), "\" y2=\"",
               svg_number(ty), "\" stroke=\"#444444\" stroke-width=\"1.2\" stroke-dasharray=\"7 4\"/>\n");
        std::string label = "target ";
        label += c::scientific(*options.target);
        const double lw = c::text_width("target 0.00x10-00"), lh = 15;  // wide enough for any value
        // Candidate places: right or left end, above or below the line (text-anchor end on the right).
        const double above = ty - 5, below = ty + 5 + lh - 3;
        struct spot {
            double x, y;
            bool right;
        };
        const std::array<spot, 4> spots = {spot{left + pw - 6, above, true}, spot{left + pw - 6, below, true}, spot{left + 6, above, false},
                                           spot{left + 6, below, false}};
        std::size_t best = 0, best_count = static_cast<std::size_t>(-1);
        for (std::size_t i = 0; i < spots.size(); ++i) {
            const spot& p = spots[i];
            if (p.y - lh + 3 < top + 2 || p.y + 4 > top + ph - 2) continue;  // would leave the plot
            const double x0 = p.right ? p.x - lw : p.x, r = c::marker_radius + 2;
            std::size_t count = 0;
            for (const auto& pts : shown)
                for (const auto& q : pts) {
                    const double qx = px(q.cost), qy = py(q.error);
                    if (qx > x0 - r && qx < x0 + lw + r && qy > p.y - lh + 3 - r && qy < p.y + 4 + r) ++count;
                }
            if (count < best_count) best = i, best_count = count;
        }
        append(s, "<text class=\"target-label\" x=\"", svg_number(spots[best].x), "\" y=\"", svg_number(spots[best].y), "\" text-anchor=\"",
               spots[best].right ? "end" : "start",
               "\" fill=\"#333333\" stroke=\"white\" stroke-width=\"3\" stroke-linejoin=\"round\" paint-order=\"stroke\">", label, "</text>\n");
    }

    // Series: a polyline (when two or more points) and the markers.
    for (std::size_t i = 0; i < series.size(); ++i) {
        const char* colour = c::colour_of(i);
        append(s, "<g class=\"series\">\n");
        if (shown[i].size() >= 2) {
            append(s, "<polyline fill=\"none\" stroke=\"", colour, "\" stroke-width=\"1.8\" stroke-linejoin=\"round\" points=\"");
            for (std::size_t j = 0; j < shown[i].size(); ++j) append(s, j ? " " : "", svg_number(px(shown[i][j].cost)), ",", svg_number(py(shown[i][j].error)));
            s += "\"/>\n";
        }
        for (const auto& q : shown[i]) s += c::marker(c::shape_of(i), px(q.cost), py(q.error), colour);
        s += "</g>\n";
    }

    // Legend outside the plot, top right.
    const double lx = left + pw + 16, ly = top;
    append(s, "<g class=\"legend\">\n<rect x=\"", svg_number(lx), "\" y=\"", svg_number(ly), "\" width=\"", svg_number(legend_width), "\" height=\"",
           svg_number(12 + legend_rows * c::legend_row), "\" fill=\"white\" stroke=\"#aaaaaa\"/>\n");
    for (std::size_t i = 0; i < legend_rows; ++i) {
        const double y = ly + 6 + c::legend_row * (static_cast<double>(i) + 0.5);
        const bool target_row = i == series.size();
        const std::string name =
            target_row ? std::string("target") : series[i].name.empty() ? c::message("series ", std::to_string(i + 1)) : series[i].name;
        append(s, "<g class=\"legend-entry\"><title>", svg_escape(name), "</title>\n");
        if (target_row)
            append(s, "<line x1=\"", svg_number(lx + 8), "\" y1=\"", svg_number(y), "\" x2=\"", svg_number(lx + 38), "\" y2=\"", svg_number(y),
                   "\" stroke=\"#444444\" stroke-width=\"1.2\" stroke-dasharray=\"7 4\"/>\n");
        else {
            append(s, "<line x1=\"", svg_number(lx + 8), "\" y1=\"", svg_number(y), "\" x2=\"", svg_number(lx + 38), "\" y2=\"", svg_number(y),
                   "\" stroke=\"", c::colour_of(i), "\" stroke-width=\"1.8\"/>\n");
            s += c::marker(c::shape_of(i), lx + 23, y, c::colour_of(i));
        }
        append(s, "<text x=\"", svg_number(lx + 46), "\" y=\"", svg_number(y + 4), "\">", svg_escape(c::fit_text(name, names_width)), "</text></g>\n");
    }
    s += "</g>\n";

    if (left_out > 0)
        append(s, "<text class=\"note\" x=\"", svg_number(left), "\" y=\"", svg_number(H - 10), "\" font-size=\"11\" fill=\"#555555\">",
               std::to_string(left_out), left_out == 1 ? " point" : " points",
               " with cost or error zero, negative or not finite not shown (no place on a log axis)</text>\n");
    s += "</svg>\n";
    return s;
}

} // namespace stepcert
