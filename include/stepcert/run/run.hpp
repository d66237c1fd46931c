#pragma once
// Run drivers: integrate a problem with a method in scalar type T and collect the states at
// output times. They count evaluations, enforce the budget, and reject non-finite results.
#include <cmath>
#include <cstddef>
#include <limits>
#include <sstream>
#include <string>
#include <string_view>
#include <vector>

#include "stepcert/core/concepts.hpp"
#include "stepcert/core/error.hpp"
#include "stepcert/core/problem.hpp"
#include "stepcert/methods/method.hpp"
#include "stepcert/run/counted_rhs.hpp"
#include "stepcert/run/trajectory.hpp"

namespace stepcert {

struct run_options {
    std::size_t max_evaluations = 50'000'000;  ///< budget; exceeding it throws budget_exhausted
};

namespace detail {

template <class T>
std::string time_text(const T& t) {
    std::ostringstream os;
    os.precision(17);
    os << static_cast<long double>(t);
    return os.str();
}

template <class P, class T>
void require_rhs_in(const P& p) {
    if constexpr (!P::template rhs_accepts<T>) {
        (void)p;
        static_assert(P::template rhs_accepts<T>,
                      "stepcert: this run needs the right-hand side in another scalar type; write it generic "
                      "([](const auto& y, auto& dydt, auto t){...}) or use the double-only reference path.");
    }
}

/// Collects output states and rejects non-finite ones with a message naming the time window.
template <class S>
struct collecting_observer {
    trajectory<S>* out;
    const std::string* problem_name;

    void operator()(const S& y, const scalar_of<S>& t) const {
        if (!all_finite(y)) {
            const std::string from = out->times.empty() ? std::string("the start") : "t = " + time_text(out->times.back());
            throw non_finite_value("stepcert: problem '" + *problem_name + "': the solution became NaN or infinite between " +
                                   from + " and t = " + time_text(t) +
                                   " (the right-hand side returned a non-finite value, or the step is unstable); "
                                   "check the right-hand side there or reduce the step.");
        }
        out->times.push_back(t);
        out->states.push_back(y);
    }
};

/// A method that needs the (q, p) layout (requires_separable) runs only on a problem declared so.
template <class P, class M>
void require_separable_if_needed(const P& p, const M& m, std::string_view who) {
    if constexpr (requires_separable_v<M>) {
        bool separable = false;
        if constexpr (requires { p.separable(); }) separable = p.separable();
        if (!separable)
            throw unsupported_operation(std::string(who) + ": method '" + std::string(m.name()) +
                                        "' needs a separable problem y = (q, p) with q' = g(p) and p' = h(q); problem '" +
                                        p.name() + "' is not declared so. If its right-hand side has that form, pass "
                                        "problem.as_separable(); otherwise use a general method.");
    } else {
        (void)p;
        (void)m;
        (void)who;
    }
}

} // namespace detail

/// n uniform steps of h = (t1 - t0)/n in scalar T, output at t0 and every stride steps.
template <class T = void, problem_like P, fixed_step_method M>
auto run_uniform(const P& p, const M& m, std::size_t n, std::size_t stride = 0, const run_options& opt = {}) {
    using Tr = std::conditional_t<std::is_void_v<T>, typename P::scalar_type, T>;
    using S = rebind_state<typename P::state_type, Tr>;
    detail::require_rhs_in<P, Tr>(p);
    detail::require_separable_if_needed(p, m, "stepcert::run_uniform");
    if (n == 0) throw invalid_input("stepcert::run_uniform: the number of steps must be at least 1.");
    if (stride == 0) stride = n;
    if (n % stride != 0)
        throw invalid_input("stepcert::run_uniform: the output stride " + std::to_string(stride) +
                            " does not divide the number of steps " + std::to_string(n) + ".");
    trajectory<S> out;
    out.times.reserve(n / stride + 1);
    out.states.reserve(n / stride + 1);
    S y = convert_state<S>(p.y0());
    const Tr t0 = static_cast<Tr>(p.t0());
    const Tr h = (static_cast<Tr>(p.t1()) - t0) / static_cast<Tr>(n);
    std::size_t evaluations = 0;
    // A local copy: the compiler then knows the stages' stores cannot change its parameters,
    // which keeps wrapping within 2% of a raw odeint loop (bench/bench_wrapper_overhead.cpp).
    const typename P::rhs_type local_rhs = p.rhs();
    counted_rhs<typename P::rhs_type> rhs{&local_rhs, &evaluations, opt.max_evaluations};
    m.integrate_uniform(rhs, y, t0, h, n, stride, detail::collecting_observer<S>{&out, &p.name()});
    out.stats.steps = n;
    out.stats.evaluations = evaluations;
    return out;
}

/// Adaptive run in scalar T with controller tolerance tol, output at t0 and at each of times.
template <class T = void, problem_like P, adaptive_method M>
auto run_adaptive(const P& p, const M& m, controller_tolerance tol,
                  std::vector<std::conditional_t<std::is_void_v<T>, typename P::scalar_type, T>> times = {},
                  const run_options& opt = {}) {
    using Tr = std::conditional_t<std::is_void_v<T>, typename P::scalar_type, T>;
    using S = rebind_state<typename P::state_type, Tr>;
    detail::require_rhs_in<P, Tr>(p);
    if (!(tol.atol >= 0.0) || !(tol.rtol >= 0.0) || (tol.atol == 0.0 && tol.rtol == 0.0) || !std::isfinite(tol.atol) || !std::isfinite(tol.rtol))
        throw invalid_input("stepcert::run_adaptive: controller tolerances must be finite, >= 0 and not both zero.");
    const Tr t0 = static_cast<Tr>(p.t0());
    const Tr t1 = static_cast<Tr>(p.t1());
    if (times.empty()) times.push_back(t1);
    for (std::size_t i = 0; i < times.size(); ++i) {
        if (!(times[i] > (i == 0 ? t0 : times[i - 1])) || times[i] > t1)
            throw invalid_input("stepcert::run_adaptive: output times must increase strictly, lie in (t0, t1].");
    }
    trajectory<S> out;
    S y = convert_state<S>(p.y0());
    std::size_t evaluations = 0;
    const typename P::rhs_type local_rhs = p.rhs();  // as in run_uniform
    counted_rhs<typename P::rhs_type> rhs{&local_rhs, &evaluations, opt.max_evaluations};
    m.integrate_adaptive(rhs, y, t0, times, tol, detail::collecting_observer<S>{&out, &p.name()}, out.stats);
    out.stats.evaluations = evaluations;
    if (out.times.size() != times.size() + 1)
        throw error("stepcert::run_adaptive: method '" + std::string(m.name()) + "' reported " +
                    std::to_string(out.times.size()) + " output states, expected " + std::to_string(times.size() + 1) + ".");
    return out;
}

/// Fixed-step run of a one-step method on a given, possibly non-uniform, grid t0 = times[0] <
/// times[1] < ... = t1 (the steps a schedule suggests), with the state at every grid time.
/// Multistep methods are refused: their history assumes one step size.
template <class T = void, problem_like P, fixed_step_method M>
auto run_on_grid(const P& p, const M& m, const std::vector<std::conditional_t<std::is_void_v<T>, typename P::scalar_type, T>>& times,
                 const run_options& opt = {}) {
    using Tr = std::conditional_t<std::is_void_v<T>, typename P::scalar_type, T>;
    using S = rebind_state<typename P::state_type, Tr>;
    static_assert(!detail::is_multistep<M>::value,
                  "stepcert::run_on_grid: a multistep method's history assumes one step size; run it with run_uniform.");
    detail::require_rhs_in<P, Tr>(p);
    detail::require_separable_if_needed(p, m, "stepcert::run_on_grid");
    using std::abs;
    const Tr t0 = static_cast<Tr>(p.t0()), t1 = static_cast<Tr>(p.t1());
    const Tr slack = 64 * std::numeric_limits<Tr>::epsilon() * (abs(t0) + abs(t1));
    if (times.size() < 2 || abs(times.front() - t0) > slack || abs(times.back() - t1) > slack)
        throw invalid_input("stepcert::run_on_grid: the grid must start at t0 and end at t1 of problem '" + p.name() +
                            "', with at least one step.");
    for (std::size_t k = 1; k < times.size(); ++k)
        if (!(times[k] > times[k - 1]))
            throw invalid_input("stepcert::run_on_grid: the grid times must increase strictly (step " + std::to_string(k) +
                                " at t = " + detail::time_text(times[k - 1]) + " has length <= 0).");
    trajectory<S> out;
    out.times.reserve(times.size());
    out.states.reserve(times.size());
    S y = convert_state<S>(p.y0());
    const typename P::rhs_type local_rhs = p.rhs();  // as in run_uniform
    counted_rhs<typename P::rhs_type> rhs{&local_rhs, &out.stats.evaluations, opt.max_evaluations};
    detail::collecting_observer<S> collect{&out, &p.name()};
    collect(y, times.front());
    auto ignore = [](const S&, const Tr&) {};
    for (std::size_t k = 1; k < times.size(); ++k) {
        m.integrate_uniform(rhs, y, times[k - 1], times[k] - times[k - 1], 1, 1, ignore);
        collect(y, times[k]);
    }
    out.stats.steps = times.size() - 1;
    return out;
}

} // namespace stepcert
