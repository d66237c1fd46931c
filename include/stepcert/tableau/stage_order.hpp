#pragma once
// The stage order of a Runge–Kutta tableau: the largest q for which the simplifying assumption
// C(q) holds, sum_j a_ij c_j^(k-1) = c_i^k / k for k = 1..q and every stage i (each stage is then
// itself accurate to order q). On stiff problems an implicit method's order can fall from its
// classical order p towards q or q + 1 (order reduction; A. Prothero, A. Robinson, Math. Comp. 28
// (1974) 145–162, and E. Hairer, G. Wanner, Solving ODEs II, §IV.15 — both from memory).
// Exact for cpp_rational tableaus; tolerance for floating ones (square-root coefficients).
#include <cstddef>

#include "stepcert/tableau/tableau.hpp"

namespace stepcert {

/// True when C(k) holds for this one k (every stage): sum_j a_ij c_j^(k-1) = c_i^k / k.
template <class T>
bool simplifying_assumption_c(const tableau<T>& tab, int k, const T& tolerance = T(0)) {
    tab.validate_shape();
    const std::size_t s = tab.stages();
    auto power = [](const T& x, int e) {
        T r = T(1);
        for (int m = 0; m < e; ++m) r *= x;
        return r;
    };
    for (std::size_t i = 0; i < s; ++i) {
        T sum = T(0);
        for (std::size_t j = 0; j < s; ++j) sum += tab.a[i][j] * power(tab.c[j], k - 1);
        const T d = sum - power(tab.c[i], k) / T(k);
        if (detail::abs_value(d) > tolerance) return false;
    }
    return true;
}

/// The largest q <= stages with C(1), ..., C(q) all holding (0 when even the row sums fail).
template <class T>
int stage_order(const tableau<T>& tab, const T& tolerance = T(0)) {
    int q = 0;
    while (q < static_cast<int>(tab.stages()) && simplifying_assumption_c(tab, q + 1, tolerance)) ++q;
    return q;
}

/// True when b equals the last row of A (the last stage is the new solution): with an invertible
/// A this makes R(infinity) = 0 for an A-stable method, and the stiff order bound q + 1.
template <class T>
bool stiffly_accurate(const tableau<T>& tab, const T& tolerance = T(0)) {
    tab.validate_shape();
    const std::size_t s = tab.stages();
    for (std::size_t j = 0; j < s; ++j)
        if (detail::abs_value(T(tab.a[s - 1][j] - tab.b[j])) > tolerance) return false;
    return true;
}

} // namespace stepcert
