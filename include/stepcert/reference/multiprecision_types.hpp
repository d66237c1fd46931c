#pragma once
// The scalar types a reference solution can be computed in, and the default one.
//
// default_reference_real was chosen by measurement (bench/bench_reference_cost.cpp: one
// Arenstorf period, order-20 extrapolation at tolerance 1e-28, g++ 12 -O3, CPU time per
// right-hand-side evaluation, stepper included, median of 3, on a shared 2-core machine):
//   float128            113 bits   1.25 us   round-off floor on that orbit ~5e-26 (measured)
//   cpp_bin_float_quad  113 bits   2.25 us   the same floor, Boost only
//   cpp_bin_float_38    128 bits   2.33 us   floor ~1e-29 (measured)
//   mpfr_float_50       168 bits   2.69 us   (expression templates off; needs MPFR)
//   cpp_bin_float_50    168 bits   3.50 us
// cpp_bin_float_38 is the cheapest type, Boost only, that carries 25+ digits on that orbit
// with room to spare; float128 is cheaper but too narrow for the answer, so it serves as the
// cheap check run when available (see reference_solution.hpp).
//
// float128 (GCC's __float128 through Boost) is used only when the build defines
// STEPCERT_HAVE_FLOAT128 and links libquadmath; it needs GCC in GNU mode (CMake's default
// -std=gnu++20). Without it the cheap check runs in cpp_bin_float_quad (same 113 bits in
// software, about 1.7x the cost per evaluation). mpfr_float needs STEPCERT_HAVE_MPFR and
// linking mpfr and gmp. The core needs neither.
#include <limits>
#include <string>
#include <type_traits>

#include <boost/multiprecision/cpp_bin_float.hpp>

#include "stepcert/reference/odeint_multiprecision.hpp"

#if defined(STEPCERT_HAVE_FLOAT128)
#if !defined(BOOST_HAS_FLOAT128)
#error "STEPCERT_HAVE_FLOAT128 is defined but Boost sees no __float128: compile with GCC in GNU mode (-std=gnu++20)."
#endif
#include <boost/multiprecision/float128.hpp>
#endif
#if defined(STEPCERT_HAVE_MPFR)
#include <boost/multiprecision/mpfr.hpp>
#endif

namespace stepcert {

/// 128-bit significand (about 38 decimal digits), no expression templates: two 64-bit limbs,
/// so about 1.6x cheaper per operation than cpp_bin_float_50.
using cpp_bin_float_38 =
    boost::multiprecision::number<boost::multiprecision::cpp_bin_float<128, boost::multiprecision::digit_base_2>,
                                  boost::multiprecision::et_off>;
using boost::multiprecision::cpp_bin_float_50;
using boost::multiprecision::cpp_bin_float_100;
using boost::multiprecision::cpp_bin_float_quad;
#if defined(STEPCERT_HAVE_FLOAT128)
using boost::multiprecision::float128;
#endif
#if defined(STEPCERT_HAVE_MPFR)
/// MPFR at 50 digits with expression templates off. Boost's own mpfr_float_50 has them on,
/// and generic code that deduces a type from an expression (t1 - t0 passed to a template)
/// then sees an expression object, not a number.
using mpfr_float_50 =
    boost::multiprecision::number<boost::multiprecision::mpfr_float_backend<50>, boost::multiprecision::et_off>;
#endif

/// The type reference_solution computes in unless told otherwise (chosen by measurement, above).
using default_reference_real = cpp_bin_float_38;

/// Decimal digits a type carries (numeric_limits<T>::digits10).
template <class T>
inline constexpr int carried_digits = std::numeric_limits<T>::digits10;

/// Significand bits (numeric_limits<T>::digits): compares the round-off of two types.
template <class T>
inline constexpr int significand_bits = std::numeric_limits<T>::digits;

template <class... Ts>
struct type_list {};

/// Types reference_solution may run its check in, narrowest first. A check type must be at
/// least 10 bits narrower than the answer's type and more than half as wide
/// (see reference_solution.hpp).
using reference_check_types = type_list<long double,
#if defined(STEPCERT_HAVE_FLOAT128)
                                        float128,
#else
                                        cpp_bin_float_quad,
#endif
                                        cpp_bin_float_38, cpp_bin_float_50>;

/// A readable name for messages and for reference_result::how.
template <class T>
std::string real_type_name() {
    if constexpr (std::is_same_v<T, double>) return "double";
    else if constexpr (std::is_same_v<T, long double>) return "long double";
    else if constexpr (std::is_same_v<T, cpp_bin_float_38>) return "cpp_bin_float_38";
    else if constexpr (std::is_same_v<T, cpp_bin_float_50>) return "cpp_bin_float_50";
    else if constexpr (std::is_same_v<T, cpp_bin_float_100>) return "cpp_bin_float_100";
    else if constexpr (std::is_same_v<T, cpp_bin_float_quad>) return "cpp_bin_float_quad";
#if defined(STEPCERT_HAVE_FLOAT128)
    else if constexpr (std::is_same_v<T, float128>) return "float128";
#endif
#if defined(STEPCERT_HAVE_MPFR)
    else if constexpr (std::is_same_v<T, mpfr_float_50>) return "mpfr_float_50";
#endif
    else return "a " + std::to_string(significand_bits<T>) + "-bit type";
}

} // namespace stepcert
