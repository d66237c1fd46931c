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
#include "stepcert/run/detail/non_finite_replay.hpp"
#include "stepcert/run/detail/segments.hpp"
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

/// Called from the handler of a run's non-finite failure: replays the failing stretch from the
/// last finite output (replay(seen, state) advances `state` over it with a probe-wrapped right-hand
/// side) and throws the failure again with its measured site and a message that names it. A
/// failure that already has its site, or that the replay cannot place, is rethrown unchanged.
template <class S, class Y0, class Replay>
[[noreturn]] void rethrow_with_site(const non_finite_value& e, const std::string& problem_name, const trajectory<S>& out,
                                    const Y0& y0, double failing_time, std::size_t evaluations, const std::size_t& replayed,
                                    Replay&& replay) {
    if (e.site() != nullptr || out.states.empty()) throw;
    probe_record seen;
    const double scale = std::max(largest_magnitude(out.states.back()), largest_magnitude(y0));
    if (scale > 0.0) {
        seen.moderate = std::min(seen.moderate, 10.0 * scale);
        seen.near = 2.0 * scale;
    }
    S y = out.states.back();
    bool completed = false;
    try {
        replay(seen, y);
        completed = true;
    } catch (...) {
        // The replay is expected to fail as the run did; what the probe saw is the finding.
    }
    auto site = measured_site(seen, static_cast<double>(out.times.back()), failing_time, completed ? &y : nullptr);
    if (!site) throw;
    site->evaluations = evaluations + replayed;  // the replay is part of what the failed run cost
    throw non_finite_value(non_finite_message(problem_name, *site), std::move(*site));
}

/// A multistep method's history assumes one step size: it cannot restart at breakpoints.
template <class P, class M>
void refuse_breakpoints_for_multistep(const P& p, const M& m, std::string_view who) {
    if constexpr (is_multistep<M>::value) {
        if (!breakpoints_of(p).empty())
            throw unsupported_operation(std::string(who) + ": method '" + std::string(m.name()) + "' is a multistep method; "
                                        "problem '" + p.name() + "' declares breakpoints, where its history would have to "
                                        "restart. Use a one-step method on this problem.");
    } else {
        (void)p;
        (void)m;
        (void)who;
    }
}

/// f held inside the segment [a, b] of a run at its ends that are breakpoints.
template <class F, class T>
segment_rhs<F, T> inside_segment(const F& f, const landing_point<T>& a, const landing_point<T>& b) {
    using std::abs;
    const T length = b.t - a.t;
    const T scale = std::max({abs(a.t), abs(b.t), length});
    return {&f, a.breakpoint ? a.t + inside_by(scale, length) : a.t, b.breakpoint ? b.t - inside_by(scale, length) : b.t};
}

} // namespace detail

/// n uniform steps of h = (t1 - t0)/n in scalar T, output at t0 and every stride steps. On a
/// problem with breakpoints the run lands on each of them: the n / stride output blocks are laid
/// out segment by segment (detail::output_grid: each segment between breakpoints gets its share of
/// evenly spaced output times) and every block takes stride equal steps, so the steps are uniform
/// within each segment and no longer than h, and the run reports at those output times.
/// A NaN or infinity ends the run with non_finite_value, its site measured (detail above).
template <class T = void, problem_like P, fixed_step_method M>
auto run_uniform(const P& p, const M& m, std::size_t n, std::size_t stride = 0, const run_options& opt = {}) {
    using Tr = std::conditional_t<std::is_void_v<T>, typename P::scalar_type, T>;
    using S = rebind_state<typename P::state_type, Tr>;
    detail::require_rhs_in<P, Tr>(p);
    detail::require_separable_if_needed(p, m, "stepcert::run_uniform");
    detail::refuse_breakpoints_for_multistep(p, m, "stepcert::run_uniform");
    if (n == 0) throw invalid_input("stepcert::run_uniform: the number of steps must be at least 1.");
    if (stride == 0) stride = n;
    if (n % stride != 0)
        throw invalid_input("stepcert::run_uniform: the output stride " + std::to_string(stride) +
                            " does not divide the number of steps " + std::to_string(n) + ".");
    const Tr t0 = static_cast<Tr>(p.t0());
    const Tr h = (static_cast<Tr>(p.t1()) - t0) / static_cast<Tr>(n);
    const auto& breaks = detail::breakpoints_of(p);
    std::vector<detail::landing_point<Tr>> grid;
    if (!breaks.empty()) grid = detail::output_grid(t0, static_cast<Tr>(p.t1()), n / stride, breaks);
    const std::size_t blocks = breaks.empty() ? n / stride : grid.size() - 1;
    trajectory<S> out;
    out.times.reserve(blocks + 1);
    out.states.reserve(blocks + 1);
    S y = convert_state<S>(p.y0());
    auto ignore = [](const S&, const Tr&) {};
    // Output block j (from output time j to j + 1) with the right-hand side f; with breakpoints
    // each block is its own call, so a segment starts afresh (no first-same-as-last derivative
    // carried across a breakpoint).
    auto advance = [&](auto& f, S& x, std::size_t j) {
        if (breaks.empty()) {
            m.integrate_uniform(f, x, t0 + static_cast<Tr>(j * stride) * h, h, stride, stride, ignore);
        } else {
            const Tr length = grid[j + 1].t - grid[j].t;
            auto inside = detail::inside_segment(f, grid[j], grid[j + 1]);
            m.integrate_uniform(inside, x, grid[j].t, length / static_cast<Tr>(stride), stride, stride, ignore);
        }
    };
    std::size_t evaluations = 0;
    // A local copy: the compiler then knows the stages' stores cannot change its parameters,
    // which keeps wrapping within 2% of a raw odeint loop (bench/bench_wrapper_overhead.cpp).
    const typename P::rhs_type local_rhs = p.rhs();
    counted_rhs<typename P::rhs_type> rhs{&local_rhs, &evaluations, opt.max_evaluations};
    detail::collecting_observer<S> collect{&out, &p.name()};
    try {
        if (breaks.empty()) {
            m.integrate_uniform(rhs, y, t0, h, n, stride, collect);
        } else {
            collect(y, t0);
            for (std::size_t j = 0; j < blocks; ++j) {
                advance(rhs, y, j);
                collect(y, grid[j + 1].t);
            }
        }
    } catch (const non_finite_value& e) {
        const std::size_t j = out.times.empty() ? 0 : out.times.size() - 1;
        const double failing = static_cast<double>(breaks.empty() ? t0 + static_cast<Tr>((j + 1) * stride) * h : grid[j + 1].t);
        std::size_t replayed = 0;
        detail::rethrow_with_site(e, p.name(), out, p.y0(), failing, evaluations, replayed, [&](detail::probe_record& seen, S& x) {
            counted_rhs<typename P::rhs_type> counted{&local_rhs, &replayed, opt.max_evaluations};
            detail::non_finite_probe<counted_rhs<typename P::rhs_type>> probe{&counted, &seen};
            advance(probe, x, j);
        });
    }
    out.stats.steps = blocks * stride;
    out.stats.evaluations = evaluations;
    return out;
}

/// Adaptive run in scalar T with controller tolerance tol, output at t0 and at each of times.
/// On a problem with breakpoints the run stops at each one and restarts from it.
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
    const auto& breaks = detail::breakpoints_of(p);
    // From `from` (state x) through the output times [first, last), reporting them to obs: one
    // call per stretch between breakpoints, stopping at each (not reported unless an output time).
    auto advance = [&](auto& f, S& x, Tr from, std::size_t first, std::size_t last, auto&& obs, run_stats& stats) {
        std::size_t b = 0;
        while (b < breaks.size() && !(static_cast<Tr>(breaks[b]) > from)) ++b;
        bool from_break = false, reported_start = false;
        for (std::size_t i = first; i < last;) {
            const bool cut = b < breaks.size() && static_cast<Tr>(breaks[b]) < times[last - 1];
            const Tr end = cut ? static_cast<Tr>(breaks[b]) : times[last - 1];
            std::vector<Tr> stretch;
            std::size_t outputs = 0;
            for (std::size_t k = i; k < last && times[k] <= end; ++k, ++outputs) stretch.push_back(times[k]);
            if (stretch.empty() || stretch.back() < end) stretch.push_back(end);
            std::size_t calls = 0;
            auto report = [&](const S& state, const Tr& t) {
                const std::size_t k = calls++;
                if (k == 0 ? !reported_start : k <= outputs) obs(state, t);
                reported_start = true;
            };
            auto inside = detail::inside_segment(f, detail::landing_point<Tr>{from, false, from_break},
                                                 detail::landing_point<Tr>{end, false, cut});
            m.integrate_adaptive(inside, x, from, stretch, tol, report, stats);
            i += outputs;
            from = end;
            from_break = cut;
            if (cut) ++b;
        }
    };
    std::size_t evaluations = 0;
    const typename P::rhs_type local_rhs = p.rhs();  // as in run_uniform
    counted_rhs<typename P::rhs_type> rhs{&local_rhs, &evaluations, opt.max_evaluations};
    detail::collecting_observer<S> collect{&out, &p.name()};
    try {
        if (breaks.empty())
            m.integrate_adaptive(rhs, y, t0, times, tol, collect, out.stats);
        else
            advance(rhs, y, t0, 0, times.size(), collect, out.stats);
    } catch (const non_finite_value& e) {
        const std::size_t j = out.times.empty() ? 0 : out.times.size() - 1;
        const double failing = static_cast<double>(times[std::min(j, times.size() - 1)]);
        std::size_t replayed = 0;
        detail::rethrow_with_site(e, p.name(), out, p.y0(), failing, evaluations, replayed, [&](detail::probe_record& seen, S& x) {
            run_stats ignored;
            counted_rhs<typename P::rhs_type> counted{&local_rhs, &replayed, opt.max_evaluations};
            detail::non_finite_probe<counted_rhs<typename P::rhs_type>> probe{&counted, &seen};
            advance(probe, x, out.times.back(), j, j + 1, [](const S&, const Tr&) {}, ignored);
        });
    }
    out.stats.evaluations = evaluations;
    if (out.times.size() != times.size() + 1)
        throw error("stepcert::run_adaptive: method '" + std::string(m.name()) + "' reported " +
                    std::to_string(out.times.size()) + " output states, expected " + std::to_string(times.size() + 1) + ".");
    return out;
}

/// Fixed-step run of a one-step method on a given, possibly non-uniform, grid t0 = times[0] <
/// times[1] < ... = t1 (the steps a schedule suggests), with the state at every grid time.
/// Multistep methods are refused: their history assumes one step size. A problem's breakpoints
/// must be grid times; each step sees the right-hand side from inside its own segment.
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
    // Which grid times are breakpoints; a breakpoint inside a step is refused.
    const auto& breaks = detail::breakpoints_of(p);
    std::vector<char> is_break(times.size(), 0);
    for (std::size_t b = 0, k = 0; b < breaks.size(); ++b) {
        const Tr tb = static_cast<Tr>(breaks[b]);
        while (k + 1 < times.size() && times[k] < tb - slack) ++k;
        if (abs(times[k] - tb) > slack)
            throw invalid_input("stepcert::run_on_grid: problem '" + p.name() + "' has a breakpoint at t = " +
                                detail::time_text(tb) + " inside the step that ends at t = " + detail::time_text(times[k]) +
                                "; the grid must land on every breakpoint.");
        is_break[k] = 1;
    }
    trajectory<S> out;
    out.times.reserve(times.size());
    out.states.reserve(times.size());
    S y = convert_state<S>(p.y0());
    const typename P::rhs_type local_rhs = p.rhs();  // as in run_uniform
    counted_rhs<typename P::rhs_type> rhs{&local_rhs, &out.stats.evaluations, opt.max_evaluations};
    detail::collecting_observer<S> collect{&out, &p.name()};
    auto ignore = [](const S&, const Tr&) {};
    auto step = [&](auto& f, S& x, std::size_t k) {
        const detail::landing_point<Tr> a{times[k - 1], true, is_break[k - 1] != 0}, b{times[k], true, is_break[k] != 0};
        auto inside = detail::inside_segment(f, a, b);
        m.integrate_uniform(inside, x, times[k - 1], times[k] - times[k - 1], 1, 1, ignore);
    };
    try {
        collect(y, times.front());
        for (std::size_t k = 1; k < times.size(); ++k) {
            step(rhs, y, k);
            collect(y, times[k]);
        }
    } catch (const non_finite_value& e) {
        const std::size_t k = out.times.size();
        std::size_t replayed = 0;
        detail::rethrow_with_site(e, p.name(), out, p.y0(), static_cast<double>(times[std::min(k, times.size() - 1)]),
                                  out.stats.evaluations, replayed, [&](detail::probe_record& seen, S& x) {
                                      counted_rhs<typename P::rhs_type> counted{&local_rhs, &replayed, opt.max_evaluations};
                                      detail::non_finite_probe<counted_rhs<typename P::rhs_type>> probe{&counted, &seen};
                                      step(probe, x, k);
                                  });
    }
    out.stats.steps = times.size() - 1;
    return out;
}

} // namespace stepcert
