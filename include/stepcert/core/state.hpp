#pragma once
// What stepcert needs of a state type: a scalar type, a size, element access,
// and a way to rebind the same container shape to another scalar (double -> multiprecision).
#include <array>
#include <concepts>
#include <cstddef>
#include <limits>
#include <type_traits>
#include <vector>

#include <boost/math/special_functions/fpclassify.hpp>

namespace stepcert {

/// Customization point: specialize for a user container to make it a stepcert state.
template <class State>
struct state_traits; // primary left undefined on purpose: the concept below reports it.

template <class T, class Alloc>
struct state_traits<std::vector<T, Alloc>> {
    using scalar_type = T;
    template <class U>
    using rebind = std::vector<U>;
    static constexpr bool fixed_size = false;
    static std::size_t size(const std::vector<T, Alloc>& s) { return s.size(); }
    static std::vector<T, Alloc> make(std::size_t n) { return std::vector<T, Alloc>(n); }
};

template <class T, std::size_t N>
struct state_traits<std::array<T, N>> {
    using scalar_type = T;
    template <class U>
    using rebind = std::array<U, N>;
    static constexpr bool fixed_size = true;
    static constexpr std::size_t size(const std::array<T, N>&) { return N; }
    static std::array<T, N> make(std::size_t) { return std::array<T, N>{}; }
};

/// A real floating-point scalar: float, double, long double, or a Boost.Multiprecision float
/// (numeric_limits specialized, neither integer nor exact). Integers, rationals and complex
/// numbers are not: errors are measured as |difference| against a tolerance and step sizes
/// are halved, which needs a rounding real type.
template <class T>
concept real_scalar = std::numeric_limits<T>::is_specialized && !std::numeric_limits<T>::is_integer &&
                      !std::numeric_limits<T>::is_exact;

/// A state: a container stepcert knows through state_traits, indexable by position, of real scalars.
template <class S>
concept state = requires(S s, const S cs, std::size_t i) {
    typename state_traits<S>::scalar_type;
    { state_traits<S>::size(cs) } -> std::convertible_to<std::size_t>;
    { state_traits<S>::make(i) } -> std::same_as<S>;
    s[i];
    cs[i];
} && real_scalar<typename state_traits<S>::scalar_type>;

namespace detail {

template <class>
inline constexpr bool always_false = false;

/// Eigen dense types (Matrix, Array, Map, expressions) and Boost.uBLAS containers, recognized
/// by their member names so that this header includes neither library.
template <class S>
concept eigen_like = requires {
    typename S::Scalar;
    S::RowsAtCompileTime;
    S::ColsAtCompileTime;
};
template <class S>
concept ublas_like = requires {
    typename S::value_type;
    typename S::array_type;
    typename S::closure_type;
};
template <class S>
concept ublas_vector_like = ublas_like<S> && requires(const S& s) { s.size(); } && !requires(const S& s) { s.size1(); };
template <class S>
concept has_state_traits = requires { typename state_traits<S>::scalar_type; };

/// Fails the compilation with one message saying why S is not a state and what to do; true
/// when it is one. Called first by make_problem, so a wrong state type stops there.
template <class S>
constexpr bool require_state() {
    if constexpr (state<S>) {
        return true;
    } else if constexpr (eigen_like<S>) {
        if constexpr (S::ColsAtCompileTime != 1)
            static_assert(always_false<S>,
                          "stepcert: this Eigen type is not a state: a state is a column vector "
                          "(Eigen::VectorXd, Eigen::Matrix<double, N, 1>); row vectors and matrices are not. "
                          "Keep the unknowns in one column (copy a matrix into a VectorXd, e.g. with .reshaped()).");
        else if constexpr (!real_scalar<typename S::Scalar>)
            static_assert(always_false<S>,
                          "stepcert: the scalar of this Eigen vector is not a real floating-point type; use double, "
                          "long double or a Boost.Multiprecision float (integer and complex states are not supported).");
        else
            static_assert(always_false<S>,
                          "stepcert: Eigen vector states need #include <stepcert/core/state_eigen.hpp> (the core "
                          "does not include Eigen). It makes Eigen::Matrix<T, N, 1> and Eigen::VectorXd states; "
                          "Eigen::Array, Map and expressions are not states: copy them into a VectorXd.");
        return false;
    } else if constexpr (ublas_like<S>) {
        if constexpr (!ublas_vector_like<S>)
            static_assert(always_false<S>,
                          "stepcert: this uBLAS type is not a state: a state is a boost::numeric::ublas::vector; "
                          "copy the unknowns of a matrix into one vector.");
        else if constexpr (!real_scalar<typename S::value_type>)
            static_assert(always_false<S>,
                          "stepcert: the scalar of this uBLAS vector is not a real floating-point type; use double, "
                          "long double or a Boost.Multiprecision float (integer and complex states are not supported).");
        else
            static_assert(always_false<S>,
                          "stepcert: boost::numeric::ublas::vector states need "
                          "#include <stepcert/core/state_ublas.hpp>.");
        return false;
    } else if constexpr (has_state_traits<S>) {
        if constexpr (!real_scalar<typename state_traits<S>::scalar_type>)
            static_assert(always_false<S>,
                          "stepcert: the state's scalar is not a real floating-point type; use double, long double "
                          "or a Boost.Multiprecision float (e.g. std::vector<double>, not std::vector<int>).");
        else
            static_assert(always_false<S>,
                          "stepcert: state_traits<S> is incomplete or S is not indexable: give scalar_type, "
                          "rebind<U>, size(s) and make(n) (see stepcert/core/state.hpp), and s[i] element access.");
        return false;
    } else {
        static_assert(always_false<S>,
                      "stepcert: this type is not a state: use std::vector<double>, std::array<double, N>, an Eigen "
                      "column vector (#include <stepcert/core/state_eigen.hpp>), a boost::numeric::ublas::vector "
                      "(#include <stepcert/core/state_ublas.hpp>), or specialize stepcert::state_traits for it "
                      "(see stepcert/core/state.hpp).");
        return false;
    }
}

} // namespace detail

/// The scalar type with more significand bits (the first on a tie): differences of states of
/// two types, and output times, are taken in it, so a multiprecision value is not rounded to
/// double first.
template <class A, class B>
using wider_scalar_t = std::conditional_t<(std::numeric_limits<A>::digits >= std::numeric_limits<B>::digits), A, B>;

template <state S>
using scalar_of = typename state_traits<S>::scalar_type;

/// The user's state shape with scalar T, e.g. std::vector<double> -> std::vector<cpp_bin_float_50>.
template <state S, class T>
using rebind_state = typename state_traits<S>::template rebind<T>;

template <state S>
std::size_t state_size(const S& s) { return state_traits<S>::size(s); }

/// Copies with conversion; multiprecision targets are built from the source value exactly.
template <state To, state From>
To convert_state(const From& from) {
    using T = scalar_of<To>;
    To to = state_traits<To>::make(state_size(from));
    for (std::size_t i = 0; i < state_size(from); ++i) to[i] = static_cast<T>(from[i]);
    return to;
}

template <state S>
bool all_finite(const S& s) {
    for (std::size_t i = 0; i < state_size(s); ++i)
        if (!(boost::math::isfinite)(s[i])) return false;
    return true;
}

} // namespace stepcert
