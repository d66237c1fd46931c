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

/// A state: a container stepcert knows through state_traits, indexable by position.
template <class S>
concept state = requires(S s, const S cs, std::size_t i) {
    typename state_traits<S>::scalar_type;
    { state_traits<S>::size(cs) } -> std::convertible_to<std::size_t>;
    { state_traits<S>::make(i) } -> std::same_as<S>;
    s[i];
    cs[i];
};

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
