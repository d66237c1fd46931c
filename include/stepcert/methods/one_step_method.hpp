#pragma once
// In-house one-step methods: one_step_method(name, order, step) turns a step function
// step(rhs, y, t, h), which advances y from t to t + h in place, into a stepcert fixed-step
// method. It runs through run_uniform and every study exactly as the odeint wrappers do, and
// its right-hand-side evaluations are counted the same way (the rhs it gets is the counted one).
#include <concepts>
#include <cstddef>
#include <string>
#include <string_view>
#include <utility>

#include "stepcert/core/concepts.hpp"
#include "stepcert/core/error.hpp"
#include "stepcert/methods/detail/uniform_loop.hpp"
#include "stepcert/methods/method.hpp"

namespace stepcert {

template <std::copy_constructible Step>
struct in_house_method {
    static constexpr step_control control = step_control::fixed;
    std::string label;
    int declared_order;
    Step step;

    std::string_view name() const { return label; }
    int order() const { return declared_order; }

    template <class Rhs, class S, class T, class Obs>
    void integrate_uniform(Rhs rhs, S& y, T t0, T h, std::size_t n, std::size_t stride, Obs obs) const {
        static_assert(one_step_function_for<Step, Rhs, S>,
                      "stepcert::one_step_method: the step function must be callable (as const) as step(rhs, y, t, h), "
                      "advancing the state y (a non-const State&) from t to t + h in place and calling rhs(y, dydt, t) for "
                      "its stages. The run may use another scalar type than double (multiprecision references): write it "
                      "generic, e.g. [](auto& rhs, auto& y, auto t, auto h) { ... }.");
        detail::check_uniform_arguments(label, h, n, stride);
        detail::uniform_loop([&](S& x, const T& t, const T& dt) { step(rhs, x, t, dt); }, y, t0, h, n, stride, obs);
    }
};

/// Wraps step(rhs, y, t, h) as a fixed-step method with a name and a declared order (>= 1).
template <class Step>
auto one_step_method(std::string name, int order, Step step) {
    static_assert(std::copy_constructible<Step>,
                  "stepcert::one_step_method: the step function must be copy constructible (a lambda or function object).");
    if (name.empty()) throw invalid_input("stepcert::one_step_method: give the method a name (used in reports).");
    if (order < 1)
        throw invalid_input("stepcert::one_step_method: method '" + name + "' declares order " + std::to_string(order) +
                            "; the declared order must be >= 1.");
    return in_house_method<Step>{std::move(name), order, std::move(step)};
}

} // namespace stepcert
