#pragma once
// Numbers written as published: "1/3", "-22/7", "0.25", "7". Parsed exactly (integers and a
// decimal point only) and converted to T once: exact for boost::multiprecision::cpp_rational,
// one rounding of numerator / denominator for floating types, so no double literal ever carries
// 16 digits into a 50-digit coefficient.
#include <cstddef>
#include <string>
#include <string_view>

#include <boost/multiprecision/cpp_int.hpp>

#include "stepcert/core/error.hpp"

namespace stepcert {

namespace detail {

/// Parses an optionally signed run of digits with at most one decimal point into an exact
/// integer and a power-of-ten scale: "12.5" -> (125, 1). Throws invalid_input naming the text.
inline boost::multiprecision::cpp_int parse_decimal_digits(std::string_view s, std::size_t& decimals, std::string_view whole) {
    boost::multiprecision::cpp_int v = 0;
    decimals = 0;
    bool negative = false, any = false, point = false;
    std::size_t i = 0;
    if (i < s.size() && (s[i] == '-' || s[i] == '+')) negative = s[i++] == '-';
    for (; i < s.size(); ++i) {
        const char ch = s[i];
        if (ch == '.' && !point) {
            point = true;
        } else if (ch >= '0' && ch <= '9') {
            v = v * 10 + (ch - '0');
            any = true;
            if (point) ++decimals;
        } else {
            throw invalid_input("stepcert: '" + std::string(whole) + "' is not a number of the form p, p/q or a decimal such as 0.25 (character '" +
                                std::string(1, ch) + "' at position " + std::to_string(i) + ").");
        }
    }
    if (!any) throw invalid_input("stepcert: '" + std::string(whole) + "' is not a number (no digits); write e.g. 1/3 or 0.25.");
    return negative ? boost::multiprecision::cpp_int(-v) : v;
}

} // namespace detail

/// The exact value of a published coefficient as numerator / denominator (denominator > 0).
struct exact_fraction {
    boost::multiprecision::cpp_int numerator = 0, denominator = 1;

    static exact_fraction parse(std::string_view text) {
        std::string_view s = text;
        while (!s.empty() && s.front() == ' ') s.remove_prefix(1);
        while (!s.empty() && s.back() == ' ') s.remove_suffix(1);
        const std::size_t slash = s.find('/');
        std::size_t dn = 0, dd = 0;
        exact_fraction f;
        f.numerator = detail::parse_decimal_digits(s.substr(0, slash), dn, text);
        f.denominator = 1;
        if (slash != std::string_view::npos) {
            f.denominator = detail::parse_decimal_digits(s.substr(slash + 1), dd, text);
            if (f.denominator == 0)
                throw invalid_input("stepcert: '" + std::string(text) + "' divides by zero.");
        }
        // p.10^-dn / (q.10^-dd) = p.10^dd / (q.10^dn)
        for (std::size_t k = 0; k < dd; ++k) f.numerator *= 10;
        for (std::size_t k = 0; k < dn; ++k) f.denominator *= 10;
        if (f.denominator < 0) {
            f.numerator = -f.numerator;
            f.denominator = -f.denominator;
        }
        return f;
    }

    /// The value in T: exact when T is exact (cpp_rational), else numerator and denominator
    /// rounded to T and divided.
    template <class T>
    T as() const {
        return static_cast<T>(numerator) / static_cast<T>(denominator);
    }
};

/// Shorthand: exact_number<T>("1/3").
template <class T>
T exact_number(std::string_view text) {
    return exact_fraction::parse(text).as<T>();
}

} // namespace stepcert
