#pragma once
// Where a Rosenbrock step takes ∂f/∂y and ∂f/∂t from, and the adapter that hands the user's
// right-hand side (on the run's state type) to odeint's rosenbrock4 (on ublas vectors).
#include <algorithm>
#include <cmath>
#include <cstddef>
#include <limits>
#include <sstream>
#include <string>
#include <string_view>
#include <type_traits>
#include <utility>

#include <boost/math/special_functions/fpclassify.hpp>
#include <boost/numeric/ublas/lu.hpp>
#include <boost/numeric/ublas/matrix.hpp>
#include <boost/numeric/ublas/vector.hpp>

#include "stepcert/core/error.hpp"
#include "stepcert/core/state.hpp"
#include "stepcert/methods/derivative_sources.hpp"

namespace stepcert {

namespace detail {

template <class U>
bool all_finite_entries(const boost::numeric::ublas::vector<U>& v) {
    for (std::size_t i = 0; i < v.size(); ++i)
        if (!(boost::math::isfinite)(v[i])) return false;
    return true;
}

/// odeint's rosenbrock4 steps boost::numeric::ublas::vector states; the user's right-hand side
/// takes the run's state type S. Copies in and out only when the two differ.
template <class Rhs, class S, class Jacobian, class TimeDerivative, class T>
struct rosenbrock_system {
    using U = scalar_of<S>;
    using vector = boost::numeric::ublas::vector<U>;
    using matrix = boost::numeric::ublas::matrix<U>;
    static constexpr bool same_state = std::is_same_v<S, vector>;

    Rhs* rhs;
    const Jacobian* jacobian;
    const TimeDerivative* time_derivative;
    S y_scratch, f_scratch;
    std::string_view method;
    vector plus{}, minus{}, f_plus{}, f_minus{};  // differencing scratch, sized on first use

    template <class V>
    static std::string text(const V& v) {
        std::ostringstream os;
        os.precision(6);
        os << static_cast<long double>(v);
        return os.str();
    }

    static void to_state(const vector& from, S& to) {
        for (std::size_t i = 0; i < from.size(); ++i) to[i] = from[i];
    }
    static void from_state(const S& from, vector& to) {
        for (std::size_t i = 0; i < to.size(); ++i) to[i] = from[i];
    }

    void f(const vector& x, vector& dxdt, const U& t) {
        if constexpr (same_state) {
            (*rhs)(x, dxdt, static_cast<T>(t));
        } else {
            to_state(x, y_scratch);
            (*rhs)(std::as_const(y_scratch), f_scratch, static_cast<T>(t));
            from_state(f_scratch, dxdt);
        }
    }

    void jacobian_and_time_derivative(const vector& x, matrix& J, const U& t, vector& dfdt) {
        const std::size_t n = x.size();
        using std::abs;
        using std::cbrt;
        const U root3_eps = cbrt(std::numeric_limits<U>::epsilon());
        if (f_plus.size() != n) {
            f_plus.resize(n, false);
            f_minus.resize(n, false);
        }
        if constexpr (std::is_same_v<Jacobian, jacobian_by_differences>) {
            plus = x;
            minus = x;
            for (std::size_t j = 0; j < n; ++j) {
                const U delta = root3_eps * std::max(U(1), U(abs(x[j])));
                plus[j] = x[j] + delta;
                minus[j] = x[j] - delta;
                f(plus, f_plus, t);
                f(minus, f_minus, t);
                for (std::size_t i = 0; i < n; ++i) J(i, j) = (f_plus[i] - f_minus[i]) / (plus[j] - minus[j]);
                plus[j] = x[j];
                minus[j] = x[j];
            }
        } else {
            // A Jacobian may write only its nonzero entries.
            for (std::size_t i = 0; i < n; ++i)
                for (std::size_t j = 0; j < n; ++j) J(i, j) = U(0);
            if constexpr (same_state) {
                (*jacobian)(x, static_cast<T>(t), J);
            } else {
                to_state(x, y_scratch);
                (*jacobian)(std::as_const(y_scratch), static_cast<T>(t), J);
            }
            if (J.size1() != n || J.size2() != n)
                throw invalid_input("stepcert: method '" + std::string(method) + "': the Jacobian given with the problem resized its " +
                                    std::to_string(n) + " x " + std::to_string(n) + " matrix to " + std::to_string(J.size1()) +
                                    " x " + std::to_string(J.size2()) + "; write the n x n entries J(i, j) = df_i/dy_j only.");
            // A sum of the entries is finite unless one is NaN or infinite (or they overflow it, for
            // which the exact check below finds nothing): one pass of additions, no branch per entry.
            U sum = U(0);
            for (std::size_t i = 0; i < n; ++i)
                for (std::size_t j = 0; j < n; ++j) sum += J(i, j);
            if (!(boost::math::isfinite)(sum)) [[unlikely]]
                check_given_derivatives(x, t, &J, nullptr);
        }
        if constexpr (std::is_same_v<TimeDerivative, time_derivative_by_differences>) {
            const U delta = root3_eps * std::max(U(1), U(abs(t)));
            const U up = t + delta, down = t - delta;
            f(x, f_plus, up);
            f(x, f_minus, down);
            for (std::size_t i = 0; i < n; ++i) dfdt[i] = (f_plus[i] - f_minus[i]) / (up - down);
        } else {
            to_state(x, y_scratch);
            (*time_derivative)(std::as_const(y_scratch), static_cast<T>(t), f_scratch);
            from_state(f_scratch, dfdt);
            U sum = U(0);
            for (std::size_t i = 0; i < n; ++i) sum += dfdt[i];
            if (!(boost::math::isfinite)(sum)) [[unlikely]]
                check_given_derivatives(x, t, nullptr, &dfdt);
        }
    }

    /// After a failed step from a finite x: a NaN or infinite entry of a given Jacobian or df/dt
    /// there is named (non_finite_value); a differenced one means the right-hand side failed near
    /// x, which the run driver locates.
    /// With J or dfdt given, checks those (already evaluated at x, t) instead of evaluating anew.
    void check_given_derivatives(const vector& x, const U& t, const matrix* J_given = nullptr, const vector* dfdt_given = nullptr) {
        if (!all_finite_entries(x)) return;
        const std::size_t n = x.size();
        matrix J_own;
        vector dfdt_own;
        if (J_given == nullptr && dfdt_given == nullptr) {
            J_own.resize(n, n);
            dfdt_own.resize(n);
            jacobian_and_time_derivative(x, J_own, t, dfdt_own);
        }
        const matrix& J = J_given != nullptr ? *J_given : J_own;
        const vector& dfdt = dfdt_given != nullptr ? *dfdt_given : dfdt_own;
        if constexpr (!std::is_same_v<Jacobian, jacobian_by_differences>) {
            for (std::size_t i = 0; i < J.size1(); ++i)
                for (std::size_t j = 0; j < J.size2(); ++j)
                    if (!(boost::math::isfinite)(J(i, j)))
                        throw non_finite_value("stepcert: method '" + std::string(method) +
                                               "': the Jacobian given with the problem has a NaN or infinite entry (" +
                                               std::to_string(i) + ", " + std::to_string(j) + ") at t = " + text(t) +
                                               " for a finite state; check it there (it must be df_" + std::to_string(i) +
                                               "/dy_" + std::to_string(j) + ").");
        }
        if constexpr (!std::is_same_v<TimeDerivative, time_derivative_by_differences>) {
            if (dfdt.size() == n && !all_finite_entries(dfdt))
                throw non_finite_value("stepcert: method '" + std::string(method) +
                                       "': the given df/dt has a NaN or infinite component at t = " + text(t) +
                                       " for a finite state; check it there.");
        }
    }

    /// The iteration matrix I/(γ dt) − J at (x, t), LU-factorized: 0 if regular, else the zero
    /// pivot's row + 1. Returns 0 where x or the Jacobian is not finite (nothing to say about it
    /// here: the run driver locates a failing right-hand side). Only called after a failed step.
    std::size_t singular_pivot(const vector& x, const U& t, const U& dt, const U& gamma) {
        if (!all_finite_entries(x)) return 0;
        const std::size_t n = x.size();
        matrix J(n, n), M(n, n);
        vector dfdt(n);
        jacobian_and_time_derivative(x, J, t, dfdt);
        if (!all_finite_entries_of(J)) return 0;
        M = -J;
        for (std::size_t i = 0; i < n; ++i) M(i, i) += U(1) / (gamma * dt);
        boost::numeric::ublas::permutation_matrix<std::size_t> pivots(n);
        return boost::numeric::ublas::lu_factorize(M, pivots);
    }

    /// Called when a fixed step from x at t failed (a non-finite result, or an exception from the
    /// linear algebra): throws non_finite_value for a non-finite given Jacobian or df/dt, and
    /// method_failure if the iteration matrix is singular there; returns otherwise.
    void diagnose_failed_step(const vector& x, const U& t, const U& dt, const U& gamma) {
        check_given_derivatives(x, t);
        const std::size_t row = singular_pivot(x, t, dt, gamma);
        if (row == 0) return;
        throw method_failure("stepcert: method '" + std::string(method) + "': the iteration matrix I/(gamma h) - J is singular at t = " +
                             text(t) + " with h = " + text(dt) + " (gamma = " + text(gamma) + ", 1/(gamma h) = " +
                             text(U(1) / (gamma * dt)) + "; LU pivot " + std::to_string(row - 1) +
                             " is zero): 1/(gamma h) is an eigenvalue of the Jacobian there, so the step cannot be taken. "
                             "Take another step size (a different number of steps), or check the Jacobian.");
    }

    static bool all_finite_entries_of(const matrix& J) {
        for (std::size_t i = 0; i < J.size1(); ++i)
            for (std::size_t j = 0; j < J.size2(); ++j)
                if (!(boost::math::isfinite)(J(i, j))) return false;
        return true;
    }
};

/// How ∂f/∂y and ∂f/∂t are formed, in words (for reports).
template <class Jacobian, class TimeDerivative>
constexpr const char* rosenbrock_derivatives_source() {
    constexpr bool dj = std::is_same_v<Jacobian, jacobian_by_differences>;
    constexpr bool dt = std::is_same_v<TimeDerivative, time_derivative_by_differences>;
    if constexpr (dj && dt) return "Jacobian and df/dt by central differences of the right-hand side";
    else if constexpr (dj) return "Jacobian by central differences, the given df/dt";
    else if constexpr (dt) return "the given Jacobian, df/dt by a central difference in t";
    else return "the given Jacobian and df/dt";
}

} // namespace detail

} // namespace stepcert
