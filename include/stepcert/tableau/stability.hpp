#pragma once
// Linear stability of a tableau: applied to y' = lambda y with z = h lambda, one step multiplies
// y by the stability function R(z) = P(z) / Q(z), with P(z) = det(I - zA + z 1 b^T) and
// Q(z) = det(I - zA) (E. Hairer, G. Wanner, Solving ODEs II, §IV.3, Prop. 3.2 — from memory).
// For an explicit tableau Q = 1 and P(z) = 1 + sum_k (b^T A^(k-1) 1) z^k. Both polynomials are
// computed in the tableau's own type (exactly for cpp_rational) by evaluating the determinants at
// z = 0..s and interpolating. The stability intervals and A-stability are then decided from them:
//  * real interval [-beta, 0]: the largest beta with |R(-x)| <= 1 for all 0 <= x <= beta;
//  * imaginary interval [-i eta, i eta]: the largest eta with |R(iy)| <= 1 for 0 <= y <= eta,
//    from E(y) = |P(iy)|^2 - |Q(iy)|^2, a polynomial with exact coefficients;
//  * A-stable: E(y) <= 0 for every real y and every pole (root of Q) in the right half-plane,
//    the latter by the Routh–Hurwitz criterion applied to Q(-z), in exact arithmetic.
// Boundaries are located by sampling (4000 points over the search range) and bisection in Real;
// an excursion of |R| above 1 narrower than the sampling step could be missed, but the exact
// low-order behaviour at 0 (the usual place of tangency) is decided from the coefficients.
#include <algorithm>
#include <cmath>
#include <complex>
#include <cstddef>
#include <initializer_list>
#include <limits>
#include <optional>
#include <string>
#include <vector>

#include "stepcert/tableau/tableau.hpp"

namespace stepcert {

/// Coefficients in ascending powers: c[0] + c[1] z + ...
template <class T>
struct polynomial {
    std::vector<T> c;

    int degree() const {
        for (std::size_t k = c.size(); k-- > 0;)
            if (c[k] != 0) return static_cast<int>(k);
        return -1;  // the zero polynomial
    }
    template <class U>
    U operator()(const U& z) const {
        U acc = U(0);
        for (std::size_t k = c.size(); k-- > 0;) acc = acc * z + static_cast<U>(c[k]);
        return acc;
    }
    /// Complex evaluation with the coefficients rounded to Real.
    template <class Real>
    std::complex<Real> at(const std::complex<Real>& z) const {
        std::complex<Real> acc(0);
        for (std::size_t k = c.size(); k-- > 0;) acc = acc * z + std::complex<Real>(static_cast<Real>(c[k]));
        return acc;
    }
};

namespace detail {

/// det(M) by Gaussian elimination with partial pivoting (exact for cpp_rational).
template <class T>
T determinant(std::vector<std::vector<T>> m) {
    const std::size_t n = m.size();
    T det = 1;
    for (std::size_t k = 0; k < n; ++k) {
        std::size_t piv = k;
        for (std::size_t i = k + 1; i < n; ++i)
            if (abs_value(m[i][k]) > abs_value(m[piv][k])) piv = i;
        if (m[piv][k] == 0) return T(0);
        if (piv != k) {
            std::swap(m[piv], m[k]);
            det = -det;
        }
        det *= m[k][k];
        for (std::size_t i = k + 1; i < n; ++i) {
            const T f = m[i][k] / m[k][k];
            for (std::size_t j = k; j < n; ++j) m[i][j] -= f * m[k][j];
        }
    }
    return det;
}

/// Monomial coefficients of the polynomial of degree <= n through (x_k, y_k), x_k = k, k = 0..n
/// (Newton's divided differences, then expansion; exact for cpp_rational).
template <class T>
polynomial<T> interpolate_at_integers(const std::vector<T>& y) {
    const std::size_t n = y.size();
    std::vector<T> d = y;  // divided differences in place
    for (std::size_t j = 1; j < n; ++j)
        for (std::size_t i = n - 1; i >= j; --i) {
            d[i] = (d[i] - d[i - 1]) / T(static_cast<long>(j));
            if (i == j) break;
        }
    // p(z) = d0 + (z - 0)(d1 + (z - 1)(d2 + ...)), expanded from the inside out.
    std::vector<T> p{d[n - 1]};
    for (std::size_t k = n - 1; k-- > 0;) {
        std::vector<T> q(p.size() + 1, T(0));
        for (std::size_t i = 0; i < p.size(); ++i) {
            q[i + 1] += p[i];
            q[i] -= T(static_cast<long>(k)) * p[i];
        }
        q[0] += d[k];
        p = std::move(q);
    }
    return polynomial<T>{p};
}

template <class T>
polynomial<T> multiply(const polynomial<T>& a, const polynomial<T>& b) {
    if (a.c.empty() || b.c.empty()) return {};
    std::vector<T> r(a.c.size() + b.c.size() - 1, T(0));
    for (std::size_t i = 0; i < a.c.size(); ++i)
        for (std::size_t j = 0; j < b.c.size(); ++j) r[i + j] += a.c[i] * b.c[j];
    return polynomial<T>{r};
}

/// |p(iy)|^2 as a polynomial in y (real coefficients).
template <class T>
polynomial<T> modulus_squared_on_imaginary_axis(const polynomial<T>& p) {
    polynomial<T> re{std::vector<T>(p.c.size(), T(0))}, im{std::vector<T>(p.c.size(), T(0))};
    for (std::size_t k = 0; k < p.c.size(); ++k) {
        const T sign = (k / 2) % 2 == 0 ? T(1) : T(-1);  // i^k = sign * (1 or i)
        (k % 2 == 0 ? re : im).c[k] = sign * p.c[k];
    }
    auto r2 = multiply(re, re), i2 = multiply(im, im);
    for (std::size_t k = 0; k < r2.c.size(); ++k) r2.c[k] += i2.c[k];
    return r2;
}

/// The level below which a coefficient computed from these polynomials is round-off: 64 eps of
/// their largest coefficient in a floating type, 0 in an exact one.
template <class T>
T round_off_cut(std::initializer_list<const polynomial<T>*> from) {
    T cut = 0;
    if constexpr (!std::numeric_limits<T>::is_exact) {
        for (const polynomial<T>* p : from)
            for (const T& x : p->c) cut = std::max(cut, abs_value(x));
        cut *= T(64) * std::numeric_limits<T>::epsilon();
    }
    return cut;
}

/// Drops top coefficients at round-off level (fewer effective powers than stages, e.g. an
/// L-stable method's P); exact zeros only in an exact type.
template <class T>
void trim_round_off(polynomial<T>& p) {
    const T cut = round_off_cut<T>({&p});
    while (p.c.size() > 1 && abs_value(p.c.back()) <= cut) p.c.pop_back();
}

/// a - b with coefficients at the round-off level of a and b set to 0, so that |P|^2 - |Q|^2 of
/// a Gauss method is recognised as identically 0 (|R(iy)| = 1) in a floating type.
template <class T>
polynomial<T> difference_without_round_off(polynomial<T> a, const polynomial<T>& b) {
    const T cut = round_off_cut<T>({&a, &b});
    if (a.c.size() < b.c.size()) a.c.resize(b.c.size(), T(0));
    for (std::size_t k = 0; k < b.c.size(); ++k) a.c[k] -= b.c[k];
    for (T& x : a.c)
        if (abs_value(x) <= cut) x = 0;
    return a;
}

/// Routh–Hurwitz: true when every root of q has negative real part; nullopt when the table
/// meets a zero pivot (undecided by this simple form of the test).
template <class T>
std::optional<bool> all_roots_in_left_half_plane(const polynomial<T>& q) {
    const int n = q.degree();
    if (n <= 0) return true;  // no roots
    // Rows from the highest power: a_n, a_(n-2), ... and a_(n-1), a_(n-3), ...
    std::vector<T> r0, r1;
    for (int k = n; k >= 0; k -= 2) r0.push_back(q.c[static_cast<std::size_t>(k)]);
    for (int k = n - 1; k >= 0; k -= 2) r1.push_back(q.c[static_cast<std::size_t>(k)]);
    const bool positive = q.c[static_cast<std::size_t>(n)] > 0;
    auto same_sign = [&](const T& x) { return positive ? x > 0 : x < 0; };
    if (!same_sign(r0[0])) return false;
    for (int row = 1; row <= n; ++row) {
        if (r1.empty() || r1[0] == 0) return std::nullopt;
        if (!same_sign(r1[0])) return false;
        std::vector<T> r2;
        for (std::size_t j = 0; j + 1 < r0.size(); ++j) {
            const T next = j + 1 < r1.size() ? r1[j + 1] : T(0);
            r2.push_back((r1[0] * r0[j + 1] - r0[0] * next) / r1[0]);
        }
        r0 = std::move(r1);
        r1 = std::move(r2);
    }
    return true;
}

} // namespace detail

template <class T>
struct stability_function {
    polynomial<T> numerator;    ///< P(z)
    polynomial<T> denominator;  ///< Q(z); 1 for explicit tableaus

    template <class Real>
    std::complex<Real> operator()(const std::complex<Real>& z) const {
        return numerator.at(z) / denominator.at(z);
    }
    bool is_polynomial() const { return denominator.degree() == 0; }
};

/// R(z) = P(z)/Q(z) of a tableau, in its own type.
template <class T>
stability_function<T> stability_function_of(const tableau<T>& tab) {
    tab.validate_shape();
    const std::size_t s = tab.stages();
    std::vector<T> pv, qv;
    for (std::size_t k = 0; k <= s; ++k) {
        const T z = T(static_cast<long>(k));
        std::vector<std::vector<T>> mq(s, std::vector<T>(s, T(0))), mp(s, std::vector<T>(s, T(0)));
        for (std::size_t i = 0; i < s; ++i)
            for (std::size_t j = 0; j < s; ++j) {
                mq[i][j] = (i == j ? T(1) : T(0)) - z * tab.a[i][j];
                mp[i][j] = mq[i][j] + z * tab.b[j];
            }
        pv.push_back(detail::determinant(mp));
        qv.push_back(detail::determinant(mq));
    }
    stability_function<T> r{detail::interpolate_at_integers(pv), detail::interpolate_at_integers(qv)};
    detail::trim_round_off(r.numerator);
    detail::trim_round_off(r.denominator);
    return r;
}

/// Stability intervals and A-stability; intervals in double (searched in Real).
struct stability_summary {
    double real_interval = 0.0;       ///< beta: [-beta, 0] is stable; +inf: the whole negative axis
    double imaginary_interval = 0.0;  ///< eta: [-i eta, i eta] is stable; 0: no part of it; +inf: all of it
    bool a_stable = false;
    std::string a_stability_note;  ///< why (not) A-stable, or why undecided
};

namespace detail {

/// Largest x0 in (0, x_max] with f(x) <= 0 on [0, x0], f continuous and f(0) <= 0 "from the
/// right" (checked by the caller); +inf when f <= 0 on the whole sampled range and `unbounded_ok`.
template <class Real, class F>
double first_upcrossing(F&& f, Real x_max, bool unbounded_ok) {
    const int n = 4000;
    Real prev = 0;
    for (int k = 1; k <= n; ++k) {
        const Real x = x_max * Real(k) / Real(n);
        if (f(x) > 0) {
            Real lo = prev, hi = x;
            for (int it = 0; it < 400 && hi - lo > std::numeric_limits<Real>::epsilon() * 4 * hi; ++it) {
                const Real mid = (lo + hi) / 2;
                (f(mid) > 0 ? hi : lo) = mid;
            }
            return static_cast<double>((lo + hi) / 2);
        }
        prev = x;
    }
    return unbounded_ok ? std::numeric_limits<double>::infinity() : static_cast<double>(x_max);
}

/// Sign of a polynomial just to the right of 0: the sign of its lowest nonzero coefficient.
template <class T>
int sign_near_zero(const polynomial<T>& p) {
    for (const T& x : p.c)
        if (x != 0) return x > 0 ? 1 : -1;
    return 0;
}

} // namespace detail

/// Real and imaginary stability intervals and A-stability of R. Real is the type the boundary
/// search runs in (double gives about 15 digits; a Boost.Multiprecision type gives more).
template <class Real = double, class T>
stability_summary stability_summary_of(const stability_function<T>& r) {
    stability_summary out;
    const polynomial<T>& P = r.numerator;
    const polynomial<T>& Q = r.denominator;
    const int s_eff = std::max(P.degree(), Q.degree());
    const bool rational = Q.degree() > 0;
    // Search range: a polynomial bounded by 1 on [-beta, 0] with R(0) = 1, R'(0) = 1 has
    // beta <= 2 deg^2 (Chebyshev/Markov; common practice, no source); rational ones are searched
    // far out and judged by their limit.
    const Real x_max = rational ? Real(1e6) : Real(2.0 * s_eff * s_eff + 1.0);

    // Real axis: g(x) = P(-x)^2 - Q(-x)^2 > 0 means |R(-x)| > 1.
    polynomial<T> pm = P, qm = Q;  // P(-x), Q(-x)
    for (std::size_t k = 1; k < pm.c.size(); k += 2) pm.c[k] = -pm.c[k];
    for (std::size_t k = 1; k < qm.c.size(); k += 2) qm.c[k] = -qm.c[k];
    const polynomial<T> g = detail::difference_without_round_off(detail::multiply(pm, pm), detail::multiply(qm, qm));
    const bool real_bounded_at_infinity = rational && P.degree() <= Q.degree();
    if (detail::sign_near_zero(g) > 0)
        out.real_interval = 0.0;
    else
        out.real_interval = detail::first_upcrossing<Real>([&](const Real& x) { return g(x); }, x_max, real_bounded_at_infinity);

    // Imaginary axis: E(y) = |P(iy)|^2 - |Q(iy)|^2.
    const polynomial<T> e = detail::difference_without_round_off(detail::modulus_squared_on_imaginary_axis(P),
                                                                 detail::modulus_squared_on_imaginary_axis(Q));
    const int e_sign = detail::sign_near_zero(e);
    if (e.degree() < 0)
        out.imaginary_interval = std::numeric_limits<double>::infinity();  // |R(iy)| = 1 exactly
    else if (e_sign > 0)
        out.imaginary_interval = 0.0;
    else
        out.imaginary_interval = detail::first_upcrossing<Real>([&](const Real& y) { return e(y); }, x_max, real_bounded_at_infinity);

    // A-stability: |R| <= 1 on the imaginary axis and no pole in the left half-plane.
    if (!rational) {
        out.a_stable = false;
        out.a_stability_note = "explicit: R is a polynomial, unbounded in the left half-plane";
    } else {
        const bool axis_ok = e.degree() < 0 || (e_sign <= 0 && std::isinf(out.imaginary_interval) &&
                                                 (e.c[static_cast<std::size_t>(e.degree())] < 0 || e.degree() == 0));
        polynomial<T> q_minus = Q;  // roots of Q(-z) are the negated poles
        for (std::size_t k = 1; k < q_minus.c.size(); k += 2) q_minus.c[k] = -q_minus.c[k];
        const auto poles_right = detail::all_roots_in_left_half_plane(q_minus);
        if (!poles_right) {
            out.a_stability_note = "undecided: the Routh-Hurwitz table of the denominator met a zero pivot";
        } else {
            out.a_stable = axis_ok && *poles_right;
            out.a_stability_note = std::string(axis_ok ? "|R(iy)| <= 1 on the imaginary axis" : "|R(iy)| > 1 somewhere on the imaginary axis") +
                                   (*poles_right ? "; all poles in the right half-plane" : "; a pole in the closed left half-plane");
        }
    }
    return out;
}

} // namespace stepcert
