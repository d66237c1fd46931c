#pragma once
// Shared checks for the problem catalogue's tests (header only, included by test_problems_*.cpp).
// Derivatives by the eighth-order central difference
//   f'(x) ≈ Σ_k c_k (f(x + k h) - f(x - k h)) / h,  c = (4/5, -1/5, 4/105, -1/280)
// (common practice, no source; the weights follow from Taylor expansion, derived). Its error is
// O(h⁸) plus round-off O(eps/h); with h = eps^(1/9) τ (τ the problem's time scale) both are
// about eps^(8/9) relative, which sets the tolerances (derived).
#include <algorithm>
#include <array>
#include <cmath>
#include <cstddef>
#include <limits>

#include <boost/multiprecision/cpp_bin_float.hpp>

#include "stepcert/core/state.hpp"

namespace problems_test {

using mp = boost::multiprecision::cpp_bin_float_50;

template <class U>
U eps() {
    return std::numeric_limits<U>::epsilon();
}

/// The step of the eighth-order central difference for time scale tau: about eps^(1/9) tau,
/// rounded down to a power of two so that x ± k h carries no rounding when x has few bits
/// (otherwise rounding x + k h at large x costs |x| eps / h in the derivative).
template <class U>
U difference_step(const U& tau) {
    using std::frexp;
    using std::ldexp;
    using std::pow;
    int exponent = 0;
    (void)frexp(U(pow(eps<U>(), U(1) / 9) * tau), &exponent);
    return U(ldexp(U(1), exponent - 1));
}

/// Eighth-order central difference of f: U -> std::array<U, N> at x with step h.
template <class U, class F>
auto central_derivative(F f, const U& x, const U& h) {
    const U c[4] = {U(4) / 5, U(-1) / 5, U(4) / 105, U(-1) / 280};
    auto d = f(x);
    for (auto& v : d) v = 0;
    for (int k = 1; k <= 4; ++k) {
        const auto plus = f(U(x + k * h));
        const auto minus = f(U(x - k * h));
        for (std::size_t i = 0; i < d.size(); ++i) d[i] += c[k - 1] * (plus[i] - minus[i]);
    }
    for (auto& v : d) v /= h;
    return d;
}

/// max_i |(d/dt exact)_i - f_i(exact, t)| / scale, scale = max_i |f_i| + max_i |y_i| / tau:
/// how far the exact solution of P is from satisfying its ODE at t, in scalar U, relative.
template <class U, class P>
U ode_residual(const P& p, const U& t, const U& tau) {
    using S = stepcert::rebind_state<typename P::state_type, U>;
    auto exact_at = [&](const U& s) {
        S y = stepcert::state_traits<S>::make(p.dimension());
        p.exact()(s, y);
        return y;
    };
    const S d = central_derivative<U>(exact_at, t, difference_step(tau));
    const S y = exact_at(t);
    S f = y;
    auto rhs = p.rhs();
    rhs(y, f, t);
    U ymax = 0, fmax = 0, worst = 0;
    using std::abs;
    for (std::size_t i = 0; i < y.size(); ++i) {
        ymax = std::max(ymax, U(abs(y[i])));
        fmax = std::max(fmax, U(abs(f[i])));
        worst = std::max(worst, U(abs(d[i] - f[i])));
    }
    return worst / (fmax + ymax / tau);
}

/// Tolerance for ode_residual: 100 eps^(8/9) (derived above; the factor covers the
/// difference weights and the size of the ninth derivative in units of tau).
template <class U>
U residual_tolerance() {
    using std::pow;
    return U(100 * pow(eps<U>(), U(8) / 9));
}

/// A dense N x N matrix with J(i, j), the smallest type a Jacobian can write into.
template <class U, std::size_t N>
struct small_matrix {
    std::array<std::array<U, N>, N> a{};
    U& operator()(std::size_t i, std::size_t j) { return a[i][j]; }
    const U& operator()(std::size_t i, std::size_t j) const { return a[i][j]; }
};

/// max_ij |J_ij - ∂f_i/∂y_j| / (1 + max |J|) with the derivatives by central differences in U
/// with step eps^(1/9) * yscale.
template <class U, std::size_t N, class P>
U jacobian_mismatch(const P& p, const std::array<U, N>& y, const U& t, const U& yscale) {
    small_matrix<U, N> J;
    p.jacobian()(y, t, J);
    auto rhs = p.rhs();
    U worst = 0, jmax = 0;
    using std::abs;
    for (std::size_t j = 0; j < N; ++j) {
        auto f_of_yj = [&](const U& v) {
            std::array<U, N> z = y, f{};
            z[j] = v;
            rhs(z, f, t);
            return f;
        };
        const auto col = central_derivative<U>(f_of_yj, y[j], difference_step(yscale));
        for (std::size_t i = 0; i < N; ++i) {
            worst = std::max(worst, U(abs(J(i, j) - col[i])));
            jmax = std::max(jmax, U(abs(J(i, j))));
        }
    }
    return worst / (1 + jmax);
}

} // namespace problems_test
