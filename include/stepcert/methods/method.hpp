#pragma once
// What a method is to stepcert: a name, a declared order, a kind of step control, and an
// integrate function the run drivers call. Wrappers of odeint steppers and in-house methods
// both satisfy these concepts, so every study treats them alike.
#include <concepts>
#include <cstddef>
#include <string>
#include <string_view>
#include <type_traits>
#include <vector>

#include "stepcert/core/state.hpp"

namespace stepcert {

enum class step_control { fixed, adaptive };

/// What a run cost: accepted steps, rejected step attempts, right-hand-side evaluations.
struct run_stats {
    std::size_t steps = 0;
    std::size_t rejected = 0;
    std::size_t evaluations = 0;
};

/// Tolerances handed to an adaptive method's error controller.
struct controller_tolerance {
    double atol = 1e-6;
    double rtol = 1e-6;
};

namespace detail {
/// True for methods whose step depends on earlier steps (they declare `steps` > 1).
template <class M>
struct is_multistep : std::false_type {};
template <class M>
    requires requires { M::steps; }
struct is_multistep<M> : std::bool_constant<(M::steps > 1)> {};

// Probe types used only to check the method concepts at compile time.
struct probe_rhs {
    void operator()(const std::vector<double>&, std::vector<double>&, double) const {}
};
struct probe_observer {
    void operator()(const std::vector<double>&, double) const {}
};
} // namespace detail

template <class M>
concept method_description = requires(const M& m) {
    { m.name() } -> std::convertible_to<std::string_view>;
    { m.order() } -> std::convertible_to<int>;
    { M::control } -> std::convertible_to<step_control>;
};

/// A fixed-step method: integrate_uniform(rhs, y, t0, h, n, stride, obs) takes n steps of h
/// and calls obs(y, t) at t0 and after every stride-th step (n is a multiple of stride).
template <class M>
concept fixed_step_method = method_description<M> && (M::control == step_control::fixed) &&
    requires(const M& m, detail::probe_rhs f, std::vector<double>& y, detail::probe_observer obs) {
        m.integrate_uniform(f, y, 0.0, 0.1, std::size_t{2}, std::size_t{1}, obs);
    };

/// An adaptive method: integrate_adaptive(rhs, y, t0, times, tol, obs, stats) integrates from t0
/// through the increasing output times, calling obs(y, t) at t0 and at each output time, and
/// adds accepted and rejected steps to stats (evaluations are counted by the driver).
template <class M>
concept adaptive_method = method_description<M> && (M::control == step_control::adaptive) &&
    requires(const M& m, detail::probe_rhs f, std::vector<double>& y, const std::vector<double>& times,
             detail::probe_observer obs, run_stats& stats) {
        m.integrate_adaptive(f, y, 0.0, times, controller_tolerance{}, obs, stats);
    };

template <class M>
concept method = fixed_step_method<M> || adaptive_method<M>;

/// True for methods that work only on separable problems (problem.as_separable()); such a
/// method declares `static constexpr bool requires_separable = true;`. run_uniform checks it.
template <class M>
inline constexpr bool requires_separable_v = requires { requires M::requires_separable; };

/// True for methods without one fixed order (Bulirsch–Stoer changes its extrapolation order
/// step by step); such a method declares `static constexpr bool variable_order = true;` and its
/// order() returns 0. Studies must not compare a fitted order with it.
template <class M>
inline constexpr bool has_variable_order_v = requires { requires M::variable_order; };

} // namespace stepcert
