#pragma once
// The algebraic order of a tableau from the rooted-tree order conditions: a method has order p
// when sum_i b_i Phi_i(t) = 1/gamma(t) for every tree t with |t| <= p (J. C. Butcher; E. Hairer,
// S. P. Nørsett, G. Wanner, Solving ODEs I, §II.2, Thm 2.13 — from memory). Phi_i(t), the
// elementary weight at stage i, is 1 for the single vertex and prod_k (A Phi(u_k))_i for a root
// with subtrees u_k. With an exact T (cpp_rational) every condition is decided exactly; with a
// floating T a residual counts as zero up to eps_multiple * eps * (sum_i |b_i Phi_i(t)| + 1/gamma).
#include <algorithm>
#include <cmath>
#include <cstddef>
#include <limits>
#include <optional>
#include <string>
#include <vector>

#include "stepcert/tableau/rooted_trees.hpp"
#include "stepcert/tableau/tableau.hpp"

namespace stepcert {

struct order_condition_options {
    /// Orders checked beyond the claimed order (to find a higher true order); capped at 10.
    int beyond_claim = 1;
    /// Floating T only: how many epsilons of the condition's scale a residual may be.
    double eps_multiple = 64.0;
};

/// One failed order condition.
struct failed_condition {
    int order = 0;
    std::string tree;         ///< bracket notation of the tree
    double residual = 0.0;    ///< sum b_i Phi_i(t) - 1/gamma(t), rounded to double
    std::uint64_t density = 1;
};

/// The outcome for one weight vector.
struct weight_order {
    int algebraic_order = 0;  ///< largest p with every condition of order <= p satisfied
    int checked_up_to = 0;    ///< highest order examined
    std::size_t conditions_checked = 0;
    std::optional<failed_condition> first_failure;  ///< the first condition of order algebraic_order + 1 that fails
    std::vector<failed_condition> failures;         ///< every failed condition up to checked_up_to
};

struct order_report {
    std::string name;
    bool exact = false;  ///< decided in exact arithmetic
    int claimed_order = 0;
    weight_order main;   ///< the weights b
    int claimed_embedded_order = 0;
    std::optional<weight_order> embedded;  ///< the embedded weights, if any
    std::vector<std::size_t> row_sum_mismatches;  ///< rows i (0-based) with c_i != sum_j a_ij

    bool meets_claim() const {
        return main.algebraic_order >= claimed_order && (!embedded || embedded->algebraic_order >= claimed_embedded_order);
    }
};

namespace detail {

template <class T>
weight_order check_weights(const std::vector<T>& b, const rooted_tree_table& trees, const std::vector<std::vector<T>>& phi,
                           int max_order, double eps_multiple) {
    constexpr bool exact = std::numeric_limits<T>::is_exact;
    weight_order w;
    w.checked_up_to = max_order;
    w.algebraic_order = max_order;
    const std::size_t s = b.size();
    for (int q = 1; q <= max_order; ++q) {
        for (std::size_t ti = trees.first_of_order(q); ti < trees.end_of_order(q); ++ti) {
            const rooted_tree& t = trees[ti];
            T sum = 0, scale = 0;
            for (std::size_t i = 0; i < s; ++i) {
                sum += b[i] * phi[ti][i];
                if constexpr (!exact) scale += abs_value(T(b[i] * phi[ti][i]));
            }
            const T target = T(1) / T(t.density);
            const T residual = sum - target;
            bool ok;
            if constexpr (exact)
                ok = residual == 0;
            else
                ok = abs_value(residual) <= T(eps_multiple) * std::numeric_limits<T>::epsilon() * (scale + target);
            ++w.conditions_checked;
            if (!ok) {
                failed_condition f{q, t.notation, static_cast<double>(residual), t.density};
                if (!w.first_failure) {
                    w.first_failure = f;
                    w.algebraic_order = q - 1;
                }
                w.failures.push_back(std::move(f));
            }
        }
    }
    return w;
}

} // namespace detail

/// Elementary weights Phi_i(t) for every tree of `trees`: phi[tree][stage].
template <class T>
std::vector<std::vector<T>> elementary_weights(const tableau<T>& tab, const rooted_tree_table& trees) {
    tab.validate_shape();
    const std::size_t s = tab.stages();
    std::vector<std::vector<T>> phi(trees.size(), std::vector<T>(s, T(1)));
    std::vector<std::vector<T>> a_phi(trees.size(), std::vector<T>(s, T(0)));  // (A Phi(t))_i
    for (std::size_t ti = 0; ti < trees.size(); ++ti) {
        for (std::size_t u : trees[ti].subtrees)
            for (std::size_t i = 0; i < s; ++i) phi[ti][i] *= a_phi[u][i];
        for (std::size_t i = 0; i < s; ++i) {
            T acc = 0;
            for (std::size_t j = 0; j < s; ++j) acc += tab.a[i][j] * phi[ti][j];
            a_phi[ti][i] = acc;
        }
    }
    return phi;
}

/// Checks every order condition up to claimed order + options.beyond_claim (at most 10) for b
/// and, if present, the embedded weights; reports the algebraic orders and the first failures.
template <class T>
order_report check_order_conditions(const tableau<T>& tab, const order_condition_options& opt = {}) {
    static_assert(std::numeric_limits<T>::is_specialized,
                  "stepcert::check_order_conditions: T needs std::numeric_limits (double, a Boost.Multiprecision float, cpp_rational).");
    tab.validate_shape();
    if (opt.beyond_claim < 0 || !(opt.eps_multiple > 0))
        throw invalid_input("stepcert::check_order_conditions: beyond_claim must be >= 0 and eps_multiple > 0.");
    const int max_order = std::min(10, std::max(tab.claimed_order, tab.claimed_embedded_order) + opt.beyond_claim);
    const rooted_tree_table trees(max_order);
    const auto phi = elementary_weights(tab, trees);
    order_report r;
    r.name = tab.name;
    r.exact = std::numeric_limits<T>::is_exact;
    r.claimed_order = tab.claimed_order;
    r.claimed_embedded_order = tab.claimed_embedded_order;
    r.main = detail::check_weights(tab.b, trees, phi, max_order, opt.eps_multiple);
    if (tab.b_embedded) r.embedded = detail::check_weights(*tab.b_embedded, trees, phi, max_order, opt.eps_multiple);
    T row_tol = 0;
    if constexpr (!std::numeric_limits<T>::is_exact) row_tol = T(opt.eps_multiple) * std::numeric_limits<T>::epsilon();
    r.row_sum_mismatches = tab.check_row_sums(row_tol);
    return r;
}

} // namespace stepcert
