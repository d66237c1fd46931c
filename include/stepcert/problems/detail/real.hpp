#pragma once
// Helpers that keep the problem catalogue generic in the scalar type. Constants are built
// from exact integers or decimal strings, never from double literals: a double literal
// carries double's rounding into a multiprecision run (the Arenstorf orbit then closes to
// 1e-11 instead of 5e-27, see reference-values §12).
#include <charconv>
#include <cstddef>
#include <cstring>
#include <limits>
#include <sstream>
#include <string>
#include <type_traits>
#include <utility>

#include "stepcert/core/error.hpp"
#include "stepcert/core/state.hpp"

namespace stepcert::problems {

/// A real floating-point scalar (core/state.hpp): the problems take the states' own definition.
using stepcert::real_scalar;

/// Where a Jacobian is written: J(i, j) = value (an Eigen matrix, or any two-index callable).
template <class M>
concept matrix_sink = requires(M& J, std::size_t i) { J(i, i); };

namespace detail {

template <class T>
constexpr void require_real() {
    static_assert(real_scalar<T>, "stepcert::problems: the scalar type must be a real floating-point type "
                                  "(double, long double, or a Boost.Multiprecision float such as cpp_bin_float_50).");
}

/// num/den rounded once in U (exact when den is a power of two and U wide enough).
template <class U>
U ratio(long long num, long long den) {
    return static_cast<U>(num) / static_cast<U>(den);
}

/// A decimal constant, correctly rounded to U (locale independent for the built-in types).
template <class U>
U decimal(const char* text) {
    if constexpr (std::is_floating_point_v<U>) {
        U v{};
        const auto [end, ec] = std::from_chars(text, text + std::strlen(text), v);
        if (ec != std::errc{} || *end != '\0')
            throw invalid_input(std::string("stepcert::problems: cannot read the decimal constant '") + text + "'.");
        return v;
    } else {
        return U(text);
    }
}

/// J(i, j) = v, converting v to J's element type explicitly (multiprecision -> double needs it).
template <class M, class V>
void set_entry(M& J, std::size_t i, std::size_t j, const V& v) {
    using E = std::remove_cvref_t<decltype(J(i, j))>;
    J(i, j) = static_cast<E>(v);
}

/// Short text for a parameter in a problem name, e.g. "0.5" or "-1000".
template <class T>
std::string param_text(const T& v) {
    std::ostringstream os;
    os.precision(6);
    os << static_cast<double>(v);
    return os.str();
}

template <class T>
void require_finite(const T& v, const char* what, const char* function) {
    if (!(boost::math::isfinite)(v))
        throw non_finite_value(std::string("stepcert::problems::") + function + ": " + what +
                               " is NaN or infinite; give a finite value.");
}

} // namespace detail
} // namespace stepcert::problems
