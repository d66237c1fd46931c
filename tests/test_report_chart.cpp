// The cost-accuracy chart (report/cost_accuracy_svg.hpp), checked on its SVG text: one root of
// the asked size, tags that nest, one curve and one legend entry per method, decade labels for the
// data's range, the target line only when asked, escaped names, the note on points left out, and
// typed rejection of what cannot be drawn. The rendered picture: test_report_chart_render.cpp.
#include <cmath>
#include <cstddef>
#include <limits>
#include <set>
#include <string>
#include <vector>

#include <gtest/gtest.h>

#include "stepcert/core/error.hpp"
#include "stepcert/report/cost_accuracy_svg.hpp"

namespace test_report_chart {

std::size_t count_of(const std::string& s, const std::string& part) {
    std::size_t n = 0;
    for (std::size_t at = s.find(part); at != std::string::npos; at = s.find(part, at + part.size())) ++n;
    return n;
}

/// The text between the opening tag that contains `opening` and its closing </g> (groups holding
/// no nested group except one level of legend entries).
std::string group(const std::string& svg, const std::string& opening) {
    const std::size_t from = svg.find(opening);
    if (from == std::string::npos) return {};
    std::size_t depth = 0, at = from;
    while (at < svg.size()) {
        const std::size_t open = svg.find("<g", at + 1), close = svg.find("</g>", at + 1);
        if (close == std::string::npos) return {};
        if (open != std::string::npos && open < close) {
            ++depth;
            at = open;
        } else if (depth == 0) {
            return svg.substr(from, close - from);
        } else {
            --depth;
            at = close;
        }
    }
    return {};
}

/// Tags nest properly under one <svg> root: a small XML check, enough for text we generate.
::testing::AssertionResult well_formed(const std::string& svg) {
    std::vector<std::string> open;
    std::size_t roots = 0;
    for (std::size_t at = svg.find('<'); at != std::string::npos; at = svg.find('<', at + 1)) {
        const std::size_t end = svg.find('>', at);
        if (end == std::string::npos) return ::testing::AssertionFailure() << "unclosed tag at " << at;
        const std::string tag = svg.substr(at + 1, end - at - 1);
        if (tag.find('<') != std::string::npos) return ::testing::AssertionFailure() << "'<' inside a tag at " << at;
        if (tag.front() == '/') {
            const std::string name = tag.substr(1);
            if (open.empty() || open.back() != name) return ::testing::AssertionFailure() << "</" << name << "> closes nothing open at " << at;
            open.pop_back();
        } else if (tag.back() != '/') {
            const std::string name = tag.substr(0, tag.find_first_of(" \n"));
            if (open.empty()) ++roots;
            open.push_back(name);
        } else if (open.empty()) {
            return ::testing::AssertionFailure() << "an element outside the root at " << at;
        }
    }
    if (!open.empty()) return ::testing::AssertionFailure() << "<" << open.back() << "> never closed";
    if (roots != 1) return ::testing::AssertionFailure() << roots << " root elements";
    return ::testing::AssertionSuccess();
}

/// The tick label 10^k as the chart writes it (exponent raised in a tspan, minus sign U+2212).
std::string decade(int k) {
    std::string s = "10<tspan dy=\"-6\" font-size=\"9\">";
    if (k < 0) s += "\xE2\x88\x92";
    s += std::to_string(std::abs(k));
    s += "</tspan>";
    return s;
}
std::string x_decade(int k) { return "text-anchor=\"middle\">" + decade(k); }
std::string y_decade(int k) { return "text-anchor=\"end\">" + decade(k); }

// Three invented methods on an invented problem: error = e0 (cost / c0)^-p.
std::vector<stepcert::chart_series> three_methods() {
    auto curve = [](std::string name, double c0, double e0, double p, int n) {
        stepcert::chart_series s{std::move(name), {}, {}};
        for (int i = 0; i < n; ++i) {
            const double c = c0 * std::pow(2.0, i);
            s.cost.push_back(c);
            s.error.push_back(e0 * std::pow(c / c0, -p));
        }
        return s;
    };
    // costs 20 .. 5120, errors 1.9e-9 .. 2e-2
    return {curve("fourth-order ladder", 40, 2e-3, 4, 6), curve("fifth-order pair", 80, 4e-4, 5, 4), curve("first-order ladder", 20, 2e-2, 1, 9)};
}

std::vector<double> polyline_xs(const std::string& svg, std::size_t which) {
    std::size_t at = 0;
    for (std::size_t i = 0; i <= which; ++i) at = svg.find("<polyline", i ? at + 1 : 0);
    const std::size_t from = svg.find("points=\"", at) + 8, to = svg.find('"', from);
    std::vector<double> xs;
    for (std::size_t p = from; p < to;) {
        xs.push_back(std::stod(svg.substr(p)));
        p = svg.find(' ', p);
        if (p == std::string::npos || p > to) break;
        ++p;
    }
    return xs;
}

template <class F>
void expect_invalid_input(F&& draw, const std::vector<std::string>& parts) {
    try {
        draw();
        ADD_FAILURE() << "drew a chart from input it should refuse";
    } catch (const stepcert::invalid_input& e) {
        const std::string message = e.what();
        for (const auto& part : parts) EXPECT_NE(message.find(part), std::string::npos) << "'" << part << "' not in: " << message;
    }
}

} // namespace test_report_chart

using namespace test_report_chart;

TEST(ReportChart, OneRootOfTheAskedSizeWithNestedTags) {
    stepcert::chart_options o;
    o.title = "invented trolley";
    o.width = 900;
    o.height = 600;
    const std::string svg = stepcert::cost_accuracy_svg(three_methods(), o);
    EXPECT_EQ(svg.rfind("<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"900\" height=\"600\" viewBox=\"0 0 900 600\"", 0), 0u) << svg.substr(0, 200);
    EXPECT_EQ(count_of(svg, "<svg"), 1u);
    EXPECT_TRUE(well_formed(svg));
    EXPECT_NE(svg.find(">invented trolley</text>"), std::string::npos);
    EXPECT_NE(svg.find(">right-hand-side evaluations</text>"), std::string::npos);
    EXPECT_NE(svg.find(">achieved error (max over output times)</text>"), std::string::npos);
}

TEST(ReportChart, OneCurveAndOneLegendEntryPerMethodEachInItsOwnColour) {
    const auto methods = three_methods();
    const std::string svg = stepcert::cost_accuracy_svg(methods);
    EXPECT_EQ(count_of(svg, "<polyline"), 3u);
    const std::string legend = group(svg, "<g class=\"legend\">");
    ASSERT_FALSE(legend.empty());
    EXPECT_EQ(count_of(legend, "class=\"legend-entry\""), 3u);
    for (const auto& m : methods) EXPECT_NE(legend.find(">" + m.name + "</text>"), std::string::npos) << m.name;
    // Eight methods get eight colours and eight marker shapes (Okabe-Ito has eight colours; common practice, no source).
    std::vector<stepcert::chart_series> eight;
    for (int i = 0; i < 8; ++i) eight.push_back({"method " + std::to_string(i), {10.0, 100.0}, {1e-2, 1e-4}});
    const std::string svg8 = stepcert::cost_accuracy_svg(eight);
    std::set<std::string> colours, shapes;
    for (std::size_t at = svg8.find("<polyline"); at != std::string::npos; at = svg8.find("<polyline", at + 1)) {
        const std::size_t from = svg8.find("stroke=\"", at) + 8;
        colours.insert(svg8.substr(from, svg8.find('"', from) - from));
        // The first marker after the curve: all eight sit on the same points, so without their colour
        // the marker texts differ exactly when the shapes do.
        const std::size_t marker = svg8.find('<', svg8.find("/>", at) + 1), marker_end = svg8.find("/>", marker);
        std::string m = svg8.substr(marker, marker_end - marker);
        const std::size_t c = m.find("\"#");
        if (c != std::string::npos) m.erase(c, 9);
        shapes.insert(m);
    }
    EXPECT_EQ(colours.size(), 8u);
    EXPECT_EQ(shapes.size(), 8u);
}

TEST(ReportChart, CurvesRunThroughPointsSortedByCost) {
    std::vector<stepcert::chart_series> s = {{"shuffled", {400, 25, 1600, 100}, {1e-6, 1e-2, 1e-8, 1e-4}}};
    const auto xs = polyline_xs(stepcert::cost_accuracy_svg(s), 0);
    ASSERT_EQ(xs.size(), 4u);
    for (std::size_t i = 1; i < xs.size(); ++i) EXPECT_LT(xs[i - 1], xs[i]);
}

TEST(ReportChart, DecadeLabelsSpanTheDataInWholeDecades) {
    // Whole decades around the data on both log axes: common practice, no source.
    const std::string svg = stepcert::cost_accuracy_svg(three_methods());  // costs 20 .. 5120, errors 1.9e-9 .. 2e-2
    for (int k = 1; k <= 4; ++k) EXPECT_NE(svg.find(x_decade(k)), std::string::npos) << "x 10^" << k;
    for (int k = -9; k <= -1; ++k) EXPECT_NE(svg.find(y_decade(k)), std::string::npos) << "y 10^" << k;
    for (int k : {0, 5}) EXPECT_EQ(svg.find(x_decade(k)), std::string::npos) << "x 10^" << k;
    for (int k : {-10, 0}) EXPECT_EQ(svg.find(y_decade(k)), std::string::npos) << "y 10^" << k;
    // Minor ticks at 2..9 in each decade: 3 x-decades and 8 y-decades, 8 each, beside 4 + 9 decade ticks.
    EXPECT_EQ(count_of(group(svg, "<g class=\"ticks\""), "<line"), 4u + 9u + 8u * (3u + 8u));
    // Light grid lines at the inner decades.
    EXPECT_EQ(count_of(group(svg, "<g class=\"grid\""), "<line"), 2u + 7u);
}

TEST(ReportChart, ASingleValueStillGetsADecade) {
    std::vector<stepcert::chart_series> one = {{"one point", {300}, {5e-4}}};
    const std::string svg = stepcert::cost_accuracy_svg(one);
    EXPECT_NE(svg.find(x_decade(2)), std::string::npos);
    EXPECT_NE(svg.find(x_decade(3)), std::string::npos);
    EXPECT_NE(svg.find(y_decade(-4)), std::string::npos);
    EXPECT_NE(svg.find(y_decade(-3)), std::string::npos);
    EXPECT_EQ(count_of(svg, "<polyline"), 0u);  // one point makes no line, only its marker
    EXPECT_TRUE(well_formed(svg));
    // On a decade line the value gets a decade on each side, so its marker is off the frame.
    one = {{"on the decades", {100, 100}, {1e-5, 1e-5}}};
    const std::string on_decade = stepcert::cost_accuracy_svg(one);
    for (int k : {1, 2, 3}) EXPECT_NE(on_decade.find(x_decade(k)), std::string::npos) << "x 10^" << k;
    for (int k : {-6, -5, -4}) EXPECT_NE(on_decade.find(y_decade(k)), std::string::npos) << "y 10^" << k;
}

TEST(ReportChart, TargetLineOnlyWhenAskedLabelledWithItsValue) {
    const auto methods = three_methods();
    const std::string without = stepcert::cost_accuracy_svg(methods);
    EXPECT_EQ(count_of(without, "class=\"target"), 0u);
    EXPECT_EQ(count_of(group(without, "<g class=\"legend\">"), "class=\"legend-entry\""), 3u);
    stepcert::chart_options o;
    o.target = 1e-6;
    const std::string with = stepcert::cost_accuracy_svg(methods, o);
    EXPECT_EQ(count_of(with, "<line class=\"target\""), 1u);
    EXPECT_NE(with.find(">target " + decade(-6) + "</text>"), std::string::npos);
    EXPECT_NE(group(with, "<g class=\"legend\">").find(">target</text>"), std::string::npos);
    EXPECT_NE(with.find("stroke-dasharray"), std::string::npos);
    o.target = 2.5e-7;
    EXPECT_NE(stepcert::cost_accuracy_svg(methods, o).find(">target 2.5\xC3\x97" + decade(-7) + "</text>"), std::string::npos);
    // A target below every error widens the error axis to show it.
    o.target = 1e-12;
    EXPECT_NE(stepcert::cost_accuracy_svg(methods, o).find(y_decade(-12)), std::string::npos);
}

TEST(ReportChart, NamesTitleAndLabelsAreEscaped) {
    auto methods = three_methods();
    methods[0].name = "RK4 & <friends>";
    stepcert::chart_options o;
    o.title = "a \"quoted\" title & more";
    o.x_label = "cost <seconds>";
    const std::string svg = stepcert::cost_accuracy_svg(methods, o);
    EXPECT_NE(svg.find(">RK4 &amp; &lt;friends&gt;</text>"), std::string::npos);
    EXPECT_EQ(svg.find("RK4 & <"), std::string::npos);
    EXPECT_NE(svg.find(">a &quot;quoted&quot; title &amp; more</text>"), std::string::npos);
    EXPECT_NE(svg.find(">cost &lt;seconds&gt;</text>"), std::string::npos);
    EXPECT_TRUE(well_formed(svg));
}

TEST(ReportChart, PointsALogAxisCannotShowAreLeftOutAndCounted) {
    const double nan = std::numeric_limits<double>::quiet_NaN(), inf = std::numeric_limits<double>::infinity();
    auto methods = three_methods();
    const std::size_t before = methods[2].cost.size();
    methods[2].cost.insert(methods[2].cost.end(), {1e4, nan, -5, 2e4});
    methods[2].error.insert(methods[2].error.end(), {0.0, 1e-3, 1e-3, inf});
    const std::string svg = stepcert::cost_accuracy_svg(methods);
    EXPECT_NE(svg.find(">4 points with cost or error zero, negative or not finite not shown"), std::string::npos);
    EXPECT_EQ(polyline_xs(svg, 2).size(), before);
    EXPECT_EQ(svg.find("nan"), std::string::npos);
    EXPECT_EQ(svg.find("inf"), std::string::npos);
    methods = three_methods();
    methods[1].error[0] = 0;
    EXPECT_NE(stepcert::cost_accuracy_svg(methods).find(">1 point with cost or error zero"), std::string::npos);
    EXPECT_EQ(stepcert::cost_accuracy_svg(three_methods()).find("class=\"note\""), std::string::npos);
}

TEST(ReportChart, RejectsNoSeries) {
    expect_invalid_input([] { (void)stepcert::cost_accuracy_svg({}); }, {"no series", "at least one"});
}

TEST(ReportChart, RejectsSeriesWithoutAPointALogAxisCanShow) {
    const double nan = std::numeric_limits<double>::quiet_NaN();
    std::vector<stepcert::chart_series> s = {{"zeros", {0, 10}, {1e-3, 0}}, {"nan", {nan}, {1e-3}}, {"empty", {}, {}}};
    expect_invalid_input([&] { (void)stepcert::cost_accuracy_svg(s); }, {"none of the 3 points", "positive, finite"});
}

TEST(ReportChart, RejectsCostsAndErrorsOfDifferentLengths) {
    std::vector<stepcert::chart_series> s = {{"lopsided", {10, 20, 40}, {1e-3, 1e-4}}};
    expect_invalid_input([&] { (void)stepcert::cost_accuracy_svg(s); }, {"'lopsided'", "3 costs but 2 errors"});
}

TEST(ReportChart, RejectsATargetThatIsNotPositiveAndFinite) {
    for (double t : {0.0, -1e-6, std::numeric_limits<double>::quiet_NaN(), std::numeric_limits<double>::infinity()}) {
        stepcert::chart_options o;
        o.target = t;
        expect_invalid_input([&] { (void)stepcert::cost_accuracy_svg(three_methods(), o); }, {"target error must be positive and finite"});
    }
}

TEST(ReportChart, RejectsASizeThatLeavesNoRoom) {
    stepcert::chart_options o;
    o.width = 100;
    expect_invalid_input([&] { (void)stepcert::cost_accuracy_svg(three_methods(), o); }, {"chart size 100 x 560", "width and height"});
}

TEST(ReportChart, RejectsMoreSeriesThanTheLegendHolds) {
    std::vector<stepcert::chart_series> many(40, stepcert::chart_series{"m", {10, 100}, {1e-2, 1e-4}});
    stepcert::chart_options o;
    o.height = 400;
    expect_invalid_input([&] { (void)stepcert::cost_accuracy_svg(many, o); }, {"40 series do not fit", "taller"});
}
