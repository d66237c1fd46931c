#pragma once
// Rooted trees up to a given order, generated (not typed in): the index set of the Runge–Kutta
// order conditions (J. C. Butcher's theory; counts per order are OEIS A000081). A tree is its
// root plus a multiset of subtrees; storing the subtrees as nondecreasing indices into the
// table makes every tree appear exactly once.
//   order |t|   number of vertices
//   gamma(t)    density: |t| * prod gamma(subtrees)             (the condition is Phi(t) = 1/gamma(t))
//   sigma(t)    symmetry: prod over distinct subtrees u of sigma(u)^m * m!, m its multiplicity
#include <algorithm>
#include <cstddef>
#include <cstdint>
#include <string>
#include <vector>

#include "stepcert/core/error.hpp"

namespace stepcert {

struct rooted_tree {
    int order = 1;
    std::vector<std::size_t> subtrees;  ///< indices into the table, nondecreasing
    std::uint64_t density = 1;          ///< gamma(t)
    std::uint64_t symmetry = 1;         ///< sigma(t)
    std::string notation;               ///< "t" for the single vertex, "[t^2,[t]]" for a root with subtrees
};

/// Every rooted tree of order 1..max_order, ordered by order (then by generation order).
class rooted_tree_table {
public:
    /// Largest order this table generates (10 gives 1205 trees; order conditions beyond order
    /// 10 are not needed by any method stepcert checks).
    static constexpr int max_supported_order = 12;

    explicit rooted_tree_table(int max_order) : max_order_(max_order) {
        if (max_order < 1 || max_order > max_supported_order)
            throw invalid_input("stepcert: rooted trees are generated for orders 1.." + std::to_string(max_supported_order) +
                                " (asked for " + std::to_string(max_order) + ").");
        first_of_order_.assign(static_cast<std::size_t>(max_order) + 2, 0);
        trees_.push_back(rooted_tree{1, {}, 1, 1, "t"});
        first_of_order_[1] = 0;
        first_of_order_[2] = 1;
        for (int n = 2; n <= max_order; ++n) {
            std::vector<std::size_t> children;
            add_forests(n, n - 1, 0, children);
            first_of_order_[static_cast<std::size_t>(n) + 1] = trees_.size();
        }
    }

    int max_order() const { return max_order_; }
    const std::vector<rooted_tree>& trees() const { return trees_; }
    const rooted_tree& operator[](std::size_t i) const { return trees_[i]; }
    std::size_t size() const { return trees_.size(); }

    /// Index range [first, last) of the trees of order n.
    std::size_t first_of_order(int n) const { return first_of_order_[static_cast<std::size_t>(n)]; }
    std::size_t end_of_order(int n) const { return first_of_order_[static_cast<std::size_t>(n) + 1]; }
    std::size_t count_of_order(int n) const { return end_of_order(n) - first_of_order(n); }

private:
    // Every multiset of existing trees (indices >= min_index, nondecreasing) whose orders sum to
    // `remaining` becomes the subtrees of a new tree of order n.
    void add_forests(int n, int remaining, std::size_t min_index, std::vector<std::size_t>& children) {
        if (remaining == 0) {
            add_tree(n, children);
            return;
        }
        const std::size_t limit = first_of_order_[static_cast<std::size_t>(std::min(remaining, n - 1)) + 1];
        for (std::size_t i = min_index; i < limit; ++i) {
            children.push_back(i);
            add_forests(n, remaining - trees_[i].order, i, children);
            children.pop_back();
        }
    }

    void add_tree(int n, const std::vector<std::size_t>& children) {
        rooted_tree t;
        t.order = n;
        t.subtrees = children;
        t.density = static_cast<std::uint64_t>(n);
        t.symmetry = 1;
        std::string inner;
        for (std::size_t k = 0; k < children.size();) {
            std::size_t m = 1;
            while (k + m < children.size() && children[k + m] == children[k]) ++m;
            const rooted_tree& u = trees_[children[k]];
            for (std::size_t r = 0; r < m; ++r) {
                t.density *= u.density;
                t.symmetry *= u.symmetry * (r + 1);  // sigma(u)^m * m!
            }
            // Appended piece by piece: GCC 12 at -O3 warns falsely (-Wrestrict) on a + b + c here.
            if (!inner.empty()) inner += ',';
            inner += u.notation;
            if (m > 1) {
                inner += '^';
                inner += std::to_string(m);
            }
            k += m;
        }
        t.notation = '[';
        t.notation += inner;
        t.notation += ']';
        trees_.push_back(std::move(t));
    }

    int max_order_;
    std::vector<rooted_tree> trees_;
    std::vector<std::size_t> first_of_order_;  // first_of_order_[n]: first index of order n
};

} // namespace stepcert
