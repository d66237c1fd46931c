#pragma once
// Principal truncation error coefficients of a tableau: for each tree t of order q (q = p + 1
// for a method of order p), tau(t) = (sum_i b_i Phi_i(t) - 1/gamma(t)) / sigma(t), and their
// norms A^(q) = ||tau^(q)||_2 and max |tau(t)|. This is the normalization of J. R. Dormand,
// P. J. Prince, J. Comput. Appl. Math. 6 (1980) 19–26, who report A^(6) = 3.99e-4 for their
// 5(4) pair. With it the leading local error is h^q sum_{|t| = q} tau(t) F(t), F(t) the
// elementary differentials (B-series of the exact and numerical solutions; Hairer, Nørsett,
// Wanner I, §II.2, from memory), so two methods of the same order compare by these numbers.
#include <algorithm>
#include <cmath>
#include <cstddef>
#include <string>
#include <vector>

#include "stepcert/tableau/order_conditions.hpp"

namespace stepcert {

struct tree_error_coefficient {
    std::string tree;    ///< bracket notation
    double value = 0.0;  ///< tau(t), rounded to double (computed in the tableau's type)
};

struct error_coefficients {
    int order = 0;  ///< q, the order of the trees
    std::vector<tree_error_coefficient> per_tree;
    double norm2 = 0.0;    ///< A^(q) = sqrt(sum tau^2)
    double norm_max = 0.0; ///< max |tau|
};

/// tau(t) for every tree of order q, with weights b (default) or the embedded weights.
template <class T>
error_coefficients error_coefficients_of_order(const tableau<T>& tab, int q, bool embedded_weights = false) {
    tab.validate_shape();
    if (q < 1 || q > 10) throw invalid_input("stepcert::error_coefficients_of_order: the order of the trees must be 1..10.");
    if (embedded_weights && !tab.has_embedded())
        throw invalid_input("stepcert::error_coefficients_of_order: tableau '" + tab.name + "' has no embedded weights.");
    const std::vector<T>& b = embedded_weights ? *tab.b_embedded : tab.b;
    const rooted_tree_table trees(q);
    const auto phi = elementary_weights(tab, trees);
    error_coefficients out;
    out.order = q;
    double sum2 = 0.0;
    for (std::size_t ti = trees.first_of_order(q); ti < trees.end_of_order(q); ++ti) {
        const rooted_tree& t = trees[ti];
        T s = 0;
        for (std::size_t i = 0; i < b.size(); ++i) s += b[i] * phi[ti][i];
        const T tau = (s - T(1) / T(t.density)) / T(t.symmetry);
        const double v = static_cast<double>(tau);
        out.per_tree.push_back({t.notation, v});
        sum2 += v * v;
        out.norm_max = std::max(out.norm_max, std::abs(v));
    }
    out.norm2 = std::sqrt(sum2);
    return out;
}

/// The principal coefficients: trees of order claimed_order + 1 (of claimed_embedded_order + 1
/// for the embedded weights).
template <class T>
error_coefficients principal_error_coefficients(const tableau<T>& tab, bool embedded_weights = false) {
    return error_coefficients_of_order(tab, (embedded_weights ? tab.claimed_embedded_order : tab.claimed_order) + 1, embedded_weights);
}

} // namespace stepcert
