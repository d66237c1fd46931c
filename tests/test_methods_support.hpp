#pragma once
// Problems with exact solutions and small helpers shared by the tests of methods/.
// Each problem names where its exact solution comes from.
#include <algorithm>
#include <array>
#include <cmath>
#include <cstddef>
#include <limits>
#include <type_traits>
#include <vector>

#include <boost/math/special_functions/ellint_1.hpp>
#include <boost/math/special_functions/jacobi_elliptic.hpp>
#include <boost/multiprecision/cpp_bin_float.hpp>

#include "stepcert/core/problem.hpp"
#include "stepcert/core/state.hpp"
#include "stepcert/problems/kepler.hpp"
#include "stepcert/run/run.hpp"

namespace methods_test {

using mp50 = boost::multiprecision::cpp_bin_float_50;

template <class T>
double to_double(const T& x) {
    return static_cast<double>(x);
}

/// Max-norm distance between two states of possibly different scalar types (computed in A's type).
template <class A, class B>
double max_distance(const A& a, const B& b) {
    double d = 0.0;
    for (std::size_t i = 0; i < a.size(); ++i) {
        using T = std::decay_t<decltype(a[i])>;
        using std::abs;
        d = std::max(d, to_double(abs(a[i] - static_cast<T>(b[i]))));
    }
    return d;
}

template <class T>
double eps() {
    return to_double(std::numeric_limits<T>::epsilon());
}

// y' = -y, y(0) = 1 on [0, 1]; exact solution e^{-t}.
inline auto decay_problem() {
    auto rhs = [](const auto& y, auto& dydt, auto) { dydt[0] = -y[0]; };
    return stepcert::make_problem("decay", rhs, std::vector<double>{1.0}, 0.0, 1.0).with_exact([](auto t, auto& y) {
        using std::exp;
        y[0] = exp(-t);
    });
}

// Rotation q' = p, p' = -q, (q, p)(0) = (1, 0) on [0, 2]; exact solution (cos t, -sin t).
// Separable (q' depends on p only, p' on q only).
template <class State = std::vector<double>>
auto rotation_problem(double t1 = 2.0) {
    auto rhs = [](const auto& y, auto& dydt, auto) {
        dydt[0] = y[1];
        dydt[1] = -y[0];
    };
    State y0{};
    if constexpr (!stepcert::state_traits<State>::fixed_size) y0.resize(2);
    y0[0] = 1.0;
    y0[1] = 0.0;
    return stepcert::make_problem("rotation", rhs, y0, 0.0, t1).with_exact([](auto t, auto& y) {
        using std::cos;
        using std::sin;
        y[0] = cos(t);
        y[1] = -sin(t);
    });
}

// Euler's rigid body y1' = y2 y3, y2' = -y1 y3, y3' = -0.51 y1 y2, y(0) = (0, 1, 1) on [0, 4]
// (T. E. Hull et al., SIAM J. Numer. Anal. 9 (1972), problem B5; definition from memory).
// Exact solution (sn, cn, dn)(t | m = 0.51): derived by differentiating the Jacobi elliptic
// functions; values from Boost.Math jacobi_elliptic. Nonlinear and a system, so it tests
// Runge–Kutta order conditions a scalar or linear problem would miss.
inline auto rigid_body_problem(double t1 = 4.0) {
    auto rhs = [](const auto& y, auto& dydt, auto) {
        using T = std::decay_t<decltype(y[0])>;
        const T m = T(51) / T(100);
        dydt[0] = y[1] * y[2];
        dydt[1] = -y[0] * y[2];
        dydt[2] = -m * y[0] * y[1];
    };
    return stepcert::make_problem("rigid body", rhs, std::vector<double>{0.0, 1.0, 1.0}, 0.0, t1)
        .with_exact([](auto t, auto& y) {
            using T = decltype(t);
            using std::sqrt;
            const T k = sqrt(T(51) / T(100));
            T cn, dn;
            y[0] = boost::math::jacobi_elliptic(k, t, &cn, &dn);
            y[1] = cn;
            y[2] = dn;
        });
}

// Kepler's two-body problem, eccentricity 1/2: q = (x, y), p = (x', y'), q' = p, p' = -q/|q|^3,
// q(0) = (1 - e, 0), p(0) = (0, sqrt((1+e)/(1-e))) on [0, t1]. Separable.
// Exact solution from Kepler's equation E - e sin E = t: x = cos E - e, y = sqrt(1-e^2) sin E
// (Hull et al. 1972, class D; the formula as in ../shared/reference-values.md §2), velocities
// derived by differentiation; E by Newton's method in the run's scalar type.
// For double runs only: y0 holds sqrt(3) rounded to double.
inline auto kepler_problem(double t1 = 3.0) {
    const stepcert::problems::kepler_rhs rhs{};
    auto exact = [](auto t, auto& y) {
        using T = decltype(t);
        using std::abs;
        using std::cos;
        using std::sin;
        using std::sqrt;
        const T e = T(1) / T(2);
        T E = t;
        for (int i = 0; i < 100; ++i) {
            const T dE = (E - e * sin(E) - t) / (T(1) - e * cos(E));
            E -= dE;
            if (abs(dE) <= 4 * std::numeric_limits<T>::epsilon()) break;
        }
        const T s = sqrt(T(1) - e * e), den = T(1) - e * cos(E);
        y[0] = cos(E) - e;
        y[1] = s * sin(E);
        y[2] = -sin(E) / den;
        y[3] = s * cos(E) / den;
    };
    std::vector<double> y0{0.5, 0.0, 0.0, std::sqrt(3.0)};
    auto p = stepcert::make_problem("Kepler e=0.5", rhs, y0, 0.0, t1).with_exact(exact);
    return p;
}

// Pendulum q' = p, p' = -sin q, q(0) = 3/2, p(0) = 0 on [0, t1]. Separable and nonlinear.
// Exact solution derived from energy conservation: sin(q/2) = k sn(K - t | k), p = -2k cn(K - t | k),
// k = sin(q0/2), K the complete elliptic integral of the first kind (Boost.Math ellint_1 and
// jacobi_elliptic); exact in every scalar type because q0 is a binary fraction.
inline auto pendulum_problem(double t1 = 3.0) {
    auto rhs = [](const auto& y, auto& dydt, auto) {
        using std::sin;
        dydt[0] = y[1];
        dydt[1] = -sin(y[0]);
    };
    auto exact = [](auto t, auto& y) {
        using T = decltype(t);
        using std::asin;
        using std::sin;
        const T k = sin(T(3) / T(4));
        const T u = boost::math::ellint_1(k) - t;
        T cn, dn;
        const T sn = boost::math::jacobi_elliptic(k, u, &cn, &dn);
        y[0] = 2 * asin(k * sn);
        y[1] = -2 * k * cn;
    };
    return stepcert::make_problem("pendulum", rhs, std::vector<double>{1.5, 0.0}, 0.0, t1).with_exact(exact);
}

/// Max-norm global error at t1 of a uniform run with n steps, in scalar T.
template <class T, class P, class M>
double final_error(const P& p, const M& m, std::size_t n) {
    auto run = stepcert::run_uniform<T>(p, m, n);
    using S = stepcert::rebind_state<typename P::state_type, T>;
    S exact = stepcert::convert_state<S>(p.y0());
    p.exact()(static_cast<T>(p.t1()), exact);
    return max_distance(run.final_state(), exact);
}

/// log2 of the error ratios of `levels` successive halvings starting from n0 steps.
template <class T, class P, class M>
std::vector<double> observed_orders(const P& p, const M& m, std::size_t n0, int levels) {
    std::vector<double> orders;
    double previous = final_error<T>(p, m, n0);
    for (int k = 1; k < levels; ++k) {
        n0 *= 2;
        const double e = final_error<T>(p, m, n0);
        orders.push_back(std::log2(previous / e));
        previous = e;
    }
    return orders;
}

} // namespace methods_test
