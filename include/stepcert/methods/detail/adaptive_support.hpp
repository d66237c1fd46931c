#pragma once
// What every adaptive loop in stepcert shares: argument checks, the starting step, the guard
// that stops a step size from shrinking below the resolution of the time variable, and the
// check that an accepted step is finite (odeint's controllers accept a NaN error estimate).
#include <algorithm>
#include <cmath>
#include <cstddef>
#include <limits>
#include <sstream>
#include <string>
#include <string_view>
#include <vector>

#include <boost/math/special_functions/fpclassify.hpp>

#include "stepcert/core/error.hpp"
#include "stepcert/core/state.hpp"
#include "stepcert/methods/method.hpp"

namespace stepcert::detail {

/// What every adaptive wrapper carries besides its loop: a name, a declared order and an
/// optional fixed first trial step. Derived is the wrapper (CRTP, so with_initial_step returns it).
template <class Derived>
struct adaptive_method_identity {
    static constexpr step_control control = step_control::adaptive;
    std::string_view label;
    int declared_order;
    double initial_step = 0.0;  ///< first trial step; 0 = automatic (Hairer–Nørsett–Wanner rule)

    std::string_view name() const { return label; }
    int order() const { return declared_order; }

    /// A copy with a fixed first trial step (to reproduce a run of odeint's own integrate functions).
    Derived with_initial_step(double h) const {
        Derived m = static_cast<const Derived&>(*this);
        m.initial_step = h;
        return m;
    }
};

template <class T>
std::string number_text(const T& t) {
    std::ostringstream os;
    os.precision(17);
    os << static_cast<long double>(t);
    return os.str();
}

inline std::string adaptive_who(std::string_view method) {
    return "stepcert: adaptive method '" + std::string(method) + "': ";
}

/// Rejects what odeint would take silently: bad tolerances, output times not after t0 or not increasing.
template <class T>
void check_adaptive_arguments(std::string_view method, const T& t0, const std::vector<T>& times,
                              const controller_tolerance& tol, double initial_step) {
    const std::string who = adaptive_who(method);
    if (!std::isfinite(tol.atol) || !std::isfinite(tol.rtol) || !(tol.atol >= 0.0) || !(tol.rtol >= 0.0) ||
        (tol.atol == 0.0 && tol.rtol == 0.0))
        throw invalid_input(who + "controller tolerances must be finite, >= 0 and not both zero.");
    if (!std::isfinite(initial_step) || initial_step < 0.0)
        throw invalid_input(who + "initial_step must be finite and >= 0 (0 picks the starting step automatically).");
    if (!(boost::math::isfinite)(t0)) throw non_finite_value(who + "the start time t0 is not finite.");
    if (times.empty()) throw invalid_input(who + "give at least one output time after t0.");
    for (std::size_t i = 0; i < times.size(); ++i) {
        const T& before = i == 0 ? t0 : times[i - 1];
        if (!(boost::math::isfinite)(times[i]) || !(times[i] > before))
            throw invalid_input(who + "output times must be finite and increase strictly from t0 (time " +
                                std::to_string(i) + " is " + number_text(times[i]) + ").");
    }
}

/// A tolerance below the rounding of the initial values cannot be met: the error estimates of
/// an embedded pair can still fall below it (they are formed from stage differences, not from
/// rounded solutions), so the run would not fail by itself but creep on with needless tiny steps.
template <class S>
void check_tolerance_reachable(std::string_view method, const S& y0, const controller_tolerance& tol) {
    using T = scalar_of<S>;
    using std::abs;
    const T floor = T(4) * std::numeric_limits<T>::epsilon();
    for (std::size_t i = 0; i < state_size(y0); ++i) {
        const T magnitude = abs(y0[i]);
        if (magnitude > T(0) && static_cast<T>(tol.atol) + static_cast<T>(tol.rtol) * magnitude < floor * magnitude)
            throw accuracy_unreachable(adaptive_who(method) + "the tolerance (atol " + number_text(tol.atol) + ", rtol " +
                                       number_text(tol.rtol) + ") asks for less than the round-off of component " +
                                       std::to_string(i) + " of the initial state in this scalar type (relative " +
                                       number_text(floor) + "); loosen it or run in a wider scalar type.");
    }
}

/// Smallest meaningful step on [t0, t_end]: a few units in the last place of the largest |t|.
template <class T>
T time_resolution(const T& t0, const T& t_end) {
    using std::abs;
    using std::max;
    const T scale = max(abs(t0), abs(t_end));
    return T(16) * std::numeric_limits<T>::epsilon() * (scale > T(0) ? scale : T(1));
}

/// Called after every rejected step: a NaN step or one below the time resolution ends the run.
template <class T>
void guard_step_size(std::string_view method, const T& dt, const T& t, const T& resolution) {
    if (!(boost::math::isfinite)(dt))
        throw non_finite_value(adaptive_who(method) + "the step size became NaN or infinite at t = " + number_text(t) +
                               " (the right-hand side probably returned a non-finite value there); check it near that time.");
    if (!(dt > resolution))
        throw accuracy_unreachable(adaptive_who(method) + "the step size fell to " + number_text(dt) + " at t = " +
                                   number_text(t) +
                                   ", below what the time variable resolves in this scalar type; the tolerance is below "
                                   "round-off for this type, or the solution is singular or very stiff there. Loosen the "
                                   "tolerance, use a wider scalar type, or shorten the interval.");
}

/// A trial step that the controller accepted although its state is not finite: odeint's error
/// checkers let a NaN error estimate through (NaN > 1 is false). The step was too long (an
/// overflow in a stage) or the right-hand side is broken there: it counts as rejected and is
/// retried at a quarter of the length; only a step shrunk below the time resolution ends the
/// run, as a non-finite value with the time.
template <class T>
void reject_non_finite_step(std::string_view method, T& dt, const T& t, const T& resolution, run_stats& stats) {
    ++stats.rejected;
    dt = dt / T(4);
    if (!(dt > resolution))
        throw non_finite_value(adaptive_who(method) + "every trial step from t = " + number_text(t) +
                               " down to the time resolution gave a NaN or infinite state (the right-hand side returns a "
                               "non-finite value there, or the solution blows up); check the right-hand side near that time.");
}

/// f(t0, y0) must be finite before any step size is chosen from it.
template <class S, class T>
void require_finite_derivative(std::string_view method, const S& f0, const T& t0) {
    if (!all_finite(f0))
        throw non_finite_value(adaptive_who(method) + "the right-hand side returned a NaN or infinite value at t0 = " +
                               number_text(t0) + "; check it at the initial state.");
}

/// Starting step of E. Hairer, S. P. Nørsett, G. Wanner, Solving ODEs I, 2nd ed. (1993), §II.4
/// ("Starting step size"): one extra evaluation. f0 = f(t0, y0) is given; the result is at most span.
template <class Rhs, class S, class T>
T starting_step(Rhs& rhs, const S& y0, const S& f0, const T& t0, const T& span, int order,
                const controller_tolerance& tol) {
    using std::abs;
    using std::max;
    using std::min;
    using std::pow;
    using std::sqrt;
    const std::size_t n = state_size(y0);
    const T atol = static_cast<T>(tol.atol), rtol = static_cast<T>(tol.rtol);
    auto rms = [&](const S& v, const S& ref) {
        T acc(0);
        for (std::size_t i = 0; i < n; ++i) {
            const T s = v[i] / (atol + rtol * abs(ref[i]));
            acc += s * s;
        }
        return sqrt(acc / static_cast<T>(n));
    };
    const T d0 = rms(y0, y0), d1 = rms(f0, y0);
    T h0 = (d0 < T(1e-5) || d1 < T(1e-5)) ? T(1e-6) : T(0.01) * d0 / d1;
    h0 = min(h0, span);
    S y1 = state_traits<S>::make(n), f1 = state_traits<S>::make(n);
    for (std::size_t i = 0; i < n; ++i) y1[i] = y0[i] + h0 * f0[i];
    rhs(static_cast<const S&>(y1), f1, t0 + h0);
    for (std::size_t i = 0; i < n; ++i) f1[i] = f1[i] - f0[i];
    const T d2 = rms(f1, y0) / h0;
    const T dmax = max(d1, d2);
    const T h1 = dmax <= T(1e-15) ? max(T(1e-6), h0 * T(1e-3)) : pow(T(0.01) / dmax, T(1) / T(order + 1));
    T h = min(T(100) * h0, h1);
    if (!(boost::math::isfinite)(h) || !(h > T(0))) h = h0;  // non-finite f1: let the controller find out
    return min(h, span);
}

} // namespace stepcert::detail
