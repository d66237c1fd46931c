#pragma once
// Text pieces every SVG writer of report/ shares: escaping of user text and fixed-point
// coordinates, so two pictures never disagree on how a name or a number is written.
#include <cstdio>
#include <string>

namespace stepcert::detail {

/// Text made safe for SVG content and double-quoted attributes.
inline std::string svg_escape(const std::string& s) {
    std::string out;
    for (char ch : s) {
        if (ch == '&') out += "&amp;";
        else if (ch == '<') out += "&lt;";
        else if (ch == '>') out += "&gt;";
        else if (ch == '"') out += "&quot;";
        else out += ch;
    }
    return out;
}

/// A coordinate or length in pixels, to a hundredth (finer is invisible and only bloats the file).
inline std::string svg_number(double x) {
    char buf[32];
    std::snprintf(buf, sizeof buf, "%.2f", x);
    return buf;
}

} // namespace stepcert::detail
