#pragma once
// Where a problem's exact solution is evaluated when errors are measured against it: in 50 digits
// when it is generic in the scalar type (more when the run itself is wider), else in the
// problem's own type.
#include <limits>
#include <type_traits>

#include <boost/multiprecision/cpp_bin_float.hpp>

#include "stepcert/core/concepts.hpp"
#include "stepcert/core/state.hpp"

namespace stepcert {

/// Real type in which a generic exact solution is evaluated.
using exact_evaluation_real = boost::multiprecision::cpp_bin_float_50;

namespace detail {

template <class P, class X>
constexpr bool exact_accepts = P::has_exact && exact_solution_for<typename P::exact_type, rebind_state<typename P::state_type, X>>;

/// Where a generic exact solution is evaluated: at least 50 digits, more if the study runs wider.
template <class P, class Tr>
using exact_real_for = std::conditional_t<
    exact_accepts<P, exact_evaluation_real>,
    std::conditional_t<(std::numeric_limits<Tr>::digits > std::numeric_limits<exact_evaluation_real>::digits) &&
                           exact_accepts<P, Tr>,
                       Tr, exact_evaluation_real>,
    typename P::scalar_type>;

} // namespace detail

} // namespace stepcert
