#pragma once
// A constant-coefficient linear system y' = A y in R³ whose exact solution is written through
// an eigen-decomposition with exactly representable data, so it is exact in any scalar type:
//
//   A = V B V⁻¹,  V = [1 1 0; 0 1 1; 1 1 1] (det V = 1, so V⁻¹ = [0 -1 1; 1 1 -1; -1 0 1] is integer),
//   B = [-1 0 0; 0 -1/4 3/2; 0 -3/2 -1/4]   (eigenvalues -1 and -1/4 ± 3i/2),
//   A = (1/4) [-7 3 3; -12 -7 12; -12 -3 8] (entries are multiples of 1/4: exact in binary).
//
// y(0) = (2, -1, 1), so w = V⁻¹ y(0) = (2, 0, -1) and
//   y(t) = V ( e^{-t} w1,  e^{-t/4}( cos(3t/2) w2 + sin(3t/2) w3),  e^{-t/4}(-sin(3t/2) w2 + cos(3t/2) w3) ).
// One decaying mode and one decaying oscillation: a non-normal A, unlike the scalar test equation.
#include <array>
#include <cmath>
#include <type_traits>

#include "stepcert/core/problem.hpp"
#include "stepcert/problems/detail/real.hpp"

namespace stepcert::problems {

/// The system matrix A of linear_system(), entry by entry (exact in T).
template <class T = double>
std::array<std::array<T, 3>, 3> linear_system_matrix() {
    detail::require_real<T>();
    constexpr long long four_a[3][3] = {{-7, 3, 3}, {-12, -7, 12}, {-12, -3, 8}};
    std::array<std::array<T, 3>, 3> a{};
    for (int i = 0; i < 3; ++i)
        for (int j = 0; j < 3; ++j) a[i][j] = detail::ratio<T>(four_a[i][j], 4);
    return a;
}

struct linear_system_rhs {
    template <state S, class Time>
    void operator()(const S& y, S& dydt, const Time&) const {
        using U = scalar_of<S>;
        // A = (1/4) * integer matrix; the division by 4 is exact.
        const U s0 = -7 * y[0] + 3 * y[1] + 3 * y[2];
        const U s1 = -12 * y[0] - 7 * y[1] + 12 * y[2];
        const U s2 = -12 * y[0] - 3 * y[1] + 8 * y[2];
        dydt[0] = s0 / 4;
        dydt[1] = s1 / 4;
        dydt[2] = s2 / 4;
    }
};

struct linear_system_exact {
    template <class Time, state S>
    void operator()(const Time& time, S& y) const {
        using U = scalar_of<S>;
        using std::cos;
        using std::exp;
        using std::sin;
        const U t = static_cast<U>(time);
        const U w1 = 2, w2 = 0, w3 = -1;  // V⁻¹ y(0)
        const U decay = exp(-t / 4);
        const U c = cos(3 * t / 2), s = sin(3 * t / 2);
        const U z1 = exp(-t) * w1;
        const U z2 = decay * (c * w2 + s * w3);
        const U z3 = decay * (-s * w2 + c * w3);
        y[0] = z1 + z2;  // y = V z
        y[1] = z2 + z3;
        y[2] = z1 + z2 + z3;
    }
};

struct linear_system_jacobian {
    template <state S, class Time, matrix_sink M>
    void operator()(const S&, const Time&, M& J) const {
        const auto a = linear_system_matrix<scalar_of<S>>();
        for (std::size_t i = 0; i < 3; ++i)
            for (std::size_t j = 0; j < 3; ++j) detail::set_entry(J, i, j, a[i][j]);
    }
};

/// y' = A y on [0, t1], y(0) = (2, -1, 1) (A above). State: std::array<T, 3>.
/// Exact solution and Jacobian attached.
template <class T = double>
auto linear_system(std::type_identity_t<T> t1 = T(4)) {
    detail::require_real<T>();
    return make_problem("linear_system", linear_system_rhs{}, std::array<T, 3>{T(2), T(-1), T(1)}, T(0), t1)
        .with_exact(linear_system_exact{})
        .with_jacobian(linear_system_jacobian{});
}

} // namespace stepcert::problems
