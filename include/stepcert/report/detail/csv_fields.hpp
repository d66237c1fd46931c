#pragma once
// Fields of stepcert's CSV exports: numbers with round-trip precision (%.17g), NaN as an empty
// field, infinities as "inf"/"-inf"; text quoted when it holds a comma, a quote or a line break
// (RFC 4180 style, quotes doubled).
#include <cmath>
#include <cstdio>
#include <string>

namespace stepcert::detail {

inline std::string csv_number(double x) {
    if (std::isnan(x)) return "";
    if (std::isinf(x)) return x > 0 ? "inf" : "-inf";
    char buf[40];
    std::snprintf(buf, sizeof buf, "%.17g", x);
    return buf;
}

inline std::string csv_text(const std::string& s) {
    if (s.find_first_of(",\"\n\r") == std::string::npos) return s;
    std::string out = "\"";
    for (char c : s) {
        if (c == '"') out += '"';
        out += c;
    }
    return out + "\"";
}

} // namespace stepcert::detail
