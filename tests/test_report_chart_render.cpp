// The cost-accuracy chart rendered by a real SVG renderer (librsvg's rsvg-convert), checked the way
// a person would first look: a PNG of the asked size that is not blank, and that changes with the
// data. Skipped, with a message, where rsvg-convert is not installed (Debian: librsvg2-bin).
// With zlib (STEPCERT_TEST_HAVE_ZLIB, set by tests/CMakeLists.txt) the pixels are decoded too.
#include <algorithm>
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <iterator>
#include <optional>
#include <string>
#include <system_error>
#include <vector>

#include <unistd.h>

#include <gtest/gtest.h>

#include "stepcert/report/cost_accuracy_svg.hpp"

#ifdef STEPCERT_TEST_HAVE_ZLIB
#include <zlib.h>
#endif

namespace test_report_chart_render {

namespace fs = std::filesystem;

std::optional<fs::path> renderer() {
    const char* path = std::getenv("PATH");
    std::string dirs = path ? path : "/usr/bin:/bin";
    for (std::size_t from = 0; from <= dirs.size();) {
        std::size_t to = dirs.find(':', from);
        if (to == std::string::npos) to = dirs.size();
        const fs::path candidate = fs::path(dirs.substr(from, to - from)) / "rsvg-convert";
        if (to > from && ::access(candidate.c_str(), X_OK) == 0) return candidate;
        from = to + 1;
    }
    return std::nullopt;
}

/// A directory of this test's own (ctest may run tests in parallel), removed at the end.
struct scratch_dir {
    fs::path path;
    scratch_dir() {
        const auto* info = ::testing::UnitTest::GetInstance()->current_test_info();
        std::string name = "stepcert-chart-";
        name += std::to_string(::getpid());
        name += '-';
        name += info ? info->name() : "test";
        path = fs::temp_directory_path() / name;
        fs::create_directories(path);
    }
    ~scratch_dir() {
        std::error_code ignored;
        fs::remove_all(path, ignored);
    }
    scratch_dir(const scratch_dir&) = delete;
    scratch_dir& operator=(const scratch_dir&) = delete;
};

inline constexpr const char* no_renderer =
    "rsvg-convert (librsvg) not found on PATH: install package librsvg2-bin to render and check the chart";

using bytes = std::vector<unsigned char>;

/// The PNG rsvg-convert makes of svg (at the SVG's own size), or empty when it failed.
bytes render(const fs::path& rsvg, const scratch_dir& dir, const std::string& name, const std::string& svg) {
    const fs::path in = dir.path / (name + ".svg"), out = dir.path / (name + ".png");
    std::ofstream(in) << svg;
    std::string command = "'";
    command += rsvg.string();
    command += "' -o '";
    command += out.string();
    command += "' '";
    command += in.string();
    command += "'";
    if (std::system(command.c_str()) != 0) return {};
    std::ifstream f(out, std::ios::binary);
    return bytes(std::istreambuf_iterator<char>(f), std::istreambuf_iterator<char>());
}

std::uint32_t big_endian(const bytes& b, std::size_t at) {
    return (std::uint32_t{b[at]} << 24) | (std::uint32_t{b[at + 1]} << 16) | (std::uint32_t{b[at + 2]} << 8) | std::uint32_t{b[at + 3]};
}

// PNG layout: the 8-byte signature 89 50 4E 47 0D 0A 1A 0A, then chunks (4-byte length, 4-byte type,
// data, CRC), IHDR first with width and height as 4-byte big-endian numbers. W3C, "Portable Network
// Graphics (PNG) Specification (Second Edition)", 2003, sections 5.2, 5.3 and 11.2.2 (from memory).
bool has_png_signature(const bytes& png) {
    const unsigned char signature[8] = {0x89, 'P', 'N', 'G', 0x0D, 0x0A, 0x1A, 0x0A};
    return png.size() > 33 && std::equal(signature, signature + 8, png.begin());
}
struct header {
    std::uint32_t width, height;
    int bit_depth, colour_type;
};
header header_of(const bytes& png) {
    return {big_endian(png, 16), big_endian(png, 20), png[24], png[25]};
}

// Four scenario methods of an invented problem; `shift` moves every error, for a second picture.
std::vector<stepcert::chart_series> methods(double shift = 1) {
    auto curve = [shift](std::string name, double c0, double e0, double p, int n) {
        stepcert::chart_series s{std::move(name), {}, {}};
        for (int i = 0; i < n; ++i) {
            const double c = c0 * std::pow(2.0, i);
            s.cost.push_back(c);
            s.error.push_back(shift * e0 * std::pow(c / c0, -p));
        }
        return s;
    };
    return {curve("fourth-order ladder", 40, 3e-2, 4, 9), curve("fifth-order pair", 70, 1e-3, 5, 8), curve("first-order ladder", 10, 0.5, 1, 10)};
}

std::string blank_svg(int width, int height) {
    std::string s = "<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"";
    s += std::to_string(width);
    s += "\" height=\"";
    s += std::to_string(height);
    s += "\"><rect x=\"0\" y=\"0\" width=\"";
    s += std::to_string(width);
    s += "\" height=\"";
    s += std::to_string(height);
    s += "\" fill=\"white\"/></svg>\n";
    return s;
}

#ifdef STEPCERT_TEST_HAVE_ZLIB
/// Pixels of an 8-bit RGB or RGBA PNG as RGBA rows, undoing the per-row filters (PNG specification,
/// section 9.2, filter types 0-4 with the Paeth predictor; from memory). Empty when not decodable.
bytes rgba_pixels(const bytes& png) {
    const header h = header_of(png);
    const std::size_t channels = h.colour_type == 6 ? 4 : h.colour_type == 2 ? 3 : 0;
    if (h.bit_depth != 8 || channels == 0 || png[28] != 0) return {};  // no interlacing expected
    bytes idat;
    for (std::size_t at = 8; at + 12 <= png.size();) {
        const std::uint32_t length = big_endian(png, at);
        if (at + 12 + length > png.size()) return {};
        if (std::equal(png.begin() + static_cast<std::ptrdiff_t>(at + 4), png.begin() + static_cast<std::ptrdiff_t>(at + 8), "IDAT"))
            idat.insert(idat.end(), png.begin() + static_cast<std::ptrdiff_t>(at + 8), png.begin() + static_cast<std::ptrdiff_t>(at + 8 + length));
        at += 12 + length;
    }
    const std::size_t stride = h.width * channels;
    bytes raw(h.height * (stride + 1));
    uLongf raw_size = static_cast<uLongf>(raw.size());
    if (uncompress(raw.data(), &raw_size, idat.data(), static_cast<uLong>(idat.size())) != Z_OK || raw_size != raw.size()) return {};
    bytes out(std::size_t{h.width} * h.height * 4), previous(stride, 0), row(stride);
    for (std::size_t y = 0; y < h.height; ++y) {
        const unsigned char filter = raw[y * (stride + 1)];
        const unsigned char* in = &raw[y * (stride + 1) + 1];
        for (std::size_t i = 0; i < stride; ++i) {
            const int a = i >= channels ? row[i - channels] : 0, b = previous[i], c = i >= channels ? previous[i - channels] : 0;
            int predicted = 0;
            switch (filter) {
            case 0: predicted = 0; break;
            case 1: predicted = a; break;
            case 2: predicted = b; break;
            case 3: predicted = (a + b) / 2; break;
            case 4: {
                const int p = a + b - c, pa = std::abs(p - a), pb = std::abs(p - b), pc = std::abs(p - c);
                predicted = pa <= pb && pa <= pc ? a : pb <= pc ? b : c;
                break;
            }
            default: return {};
            }
            row[i] = static_cast<unsigned char>(in[i] + predicted);
        }
        for (std::size_t x = 0; x < h.width; ++x)
            for (std::size_t k = 0; k < 4; ++k) out[(y * h.width + x) * 4 + k] = k < channels ? row[x * channels + k] : 255;
        previous = row;
    }
    return out;
}

struct pixel_counts {
    std::size_t not_white = 0;
    std::size_t near_colour = 0;
};
/// Pixels that are not (opaque) white, and those within 12 per channel of colour "#rrggbb".
pixel_counts count_pixels(const bytes& rgba, const std::string& colour) {
    const auto channel = [&](std::size_t k) { return std::stoi(colour.substr(1 + 2 * k, 2), nullptr, 16); };
    pixel_counts n;
    for (std::size_t at = 0; at + 4 <= rgba.size(); at += 4) {
        if (rgba[at] != 255 || rgba[at + 1] != 255 || rgba[at + 2] != 255 || rgba[at + 3] != 255) ++n.not_white;
        if (std::abs(rgba[at] - channel(0)) <= 12 && std::abs(rgba[at + 1] - channel(1)) <= 12 && std::abs(rgba[at + 2] - channel(2)) <= 12 &&
            rgba[at + 3] == 255)
            ++n.near_colour;
    }
    return n;
}
#endif

} // namespace test_report_chart_render

using namespace test_report_chart_render;

TEST(ReportChartRender, PngHasTheAskedSizeAndIsNotBlank) {
    const auto rsvg = renderer();
    if (!rsvg) GTEST_SKIP() << no_renderer;
    const scratch_dir dir;
    stepcert::chart_options o;
    o.title = "invented pendulum, cost against error";
    o.target = 1e-6;
    const bytes chart = render(*rsvg, dir, "chart", stepcert::cost_accuracy_svg(methods(), o));
    const bytes blank = render(*rsvg, dir, "blank", blank_svg(o.width, o.height));
    ASSERT_TRUE(has_png_signature(chart)) << "rsvg-convert made no PNG of the chart";
    ASSERT_TRUE(has_png_signature(blank)) << "rsvg-convert made no PNG of the blank page";
    EXPECT_EQ(header_of(chart).width, 800u);
    EXPECT_EQ(header_of(chart).height, 560u);
    EXPECT_EQ(header_of(blank).width, 800u);
    EXPECT_EQ(header_of(blank).height, 560u);
    // A white page compresses to almost nothing; curves, markers, text and grid do not.
    // Measured (librsvg 2.54.7) on a like chart: 60.8 kB against 2.6 kB for the blank page; 7.5 % of
    // the pixels inked, 350 to 650 of them in each series colour.
    EXPECT_GT(chart.size(), 10 * blank.size()) << "chart " << chart.size() << " bytes, blank " << blank.size() << " bytes";
#ifdef STEPCERT_TEST_HAVE_ZLIB
    const bytes blank_pixels = rgba_pixels(blank), chart_pixels = rgba_pixels(chart);
    ASSERT_EQ(blank_pixels.size(), 800u * 560u * 4u);
    ASSERT_EQ(chart_pixels.size(), 800u * 560u * 4u);
    EXPECT_EQ(count_pixels(blank_pixels, "#000000").not_white, 0u);
    const auto all = count_pixels(chart_pixels, "#000000");
    const double inked = static_cast<double>(all.not_white) / (800.0 * 560.0);
    EXPECT_GT(inked, 0.02) << "the chart is almost blank";
    EXPECT_LT(inked, 0.5) << "the chart is mostly ink";
    // Each of the three methods shows in its colour (Okabe-Ito blue, vermillion, bluish green).
    for (const char* colour : {"#0072B2", "#D55E00", "#009E73"}) EXPECT_GT(count_pixels(chart_pixels, colour).near_colour, 200u) << colour;
#endif
}

TEST(ReportChartRender, PngFollowsTheAskedSize) {
    const auto rsvg = renderer();
    if (!rsvg) GTEST_SKIP() << no_renderer;
    const scratch_dir dir;
    stepcert::chart_options o;
    o.width = 640;
    o.height = 420;
    const bytes chart = render(*rsvg, dir, "small", stepcert::cost_accuracy_svg(methods(), o));
    ASSERT_TRUE(has_png_signature(chart));
    EXPECT_EQ(header_of(chart).width, 640u);
    EXPECT_EQ(header_of(chart).height, 420u);
}

TEST(ReportChartRender, OtherDataGiveAnotherPicture) {
    const auto rsvg = renderer();
    if (!rsvg) GTEST_SKIP() << no_renderer;
    const scratch_dir dir;
    const bytes first = render(*rsvg, dir, "first", stepcert::cost_accuracy_svg(methods()));
    const bytes again = render(*rsvg, dir, "again", stepcert::cost_accuracy_svg(methods()));
    const bytes other = render(*rsvg, dir, "other", stepcert::cost_accuracy_svg(methods(7.0)));
    ASSERT_TRUE(has_png_signature(first));
    ASSERT_TRUE(has_png_signature(other));
    EXPECT_EQ(first, again);  // the writer and the renderer are deterministic
    EXPECT_NE(first, other);
}
