#pragma once
// A double as text for messages and reports: printf format `fmt`, NaN as `nan_text`, infinities
// as "inf" / "-inf" (snprintf's own spelling of NaN varies: "nan", "-nan").
#include <cmath>
#include <cstdio>
#include <string>

namespace stepcert::detail {

inline std::string formatted_number(double x, const char* fmt, const char* nan_text = "nan") {
    if (std::isnan(x)) return nan_text;
    if (std::isinf(x)) return x > 0 ? "inf" : "-inf";
    char buf[64];
    std::snprintf(buf, sizeof buf, fmt, x);
    return buf;
}

} // namespace stepcert::detail
