#pragma once
// A Butcher tableau in any scalar type T: double, a Boost.Multiprecision float, or the exact
// boost::multiprecision::cpp_rational. Stages y_i = y + h sum_j a_ij k_j, k_i = f(t + c_i h, y_i),
// y_new = y + h sum_i b_i k_i; an optional second weight vector (embedded method) gives the error
// estimate. Shape errors throw; a row-sum mismatch c_i != sum_j a_ij is reported by
// check_row_sums(), never silently fixed (some published methods break it on purpose).
#include <cstddef>
#include <optional>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

#include "stepcert/core/error.hpp"
#include "stepcert/tableau/exact_number.hpp"

namespace stepcert {

namespace detail {
/// |x| for any ordered scalar, cpp_rational included.
template <class T>
T abs_value(const T& x) { return x < 0 ? T(-x) : x; }
} // namespace detail

template <class T>
struct tableau {
    using value_type = T;

    std::string name;
    int claimed_order = 0;                ///< the order the source states for b
    std::vector<std::vector<T>> a;        ///< s x s (explicit: zero on and above the diagonal)
    std::vector<T> b;                     ///< s weights
    std::vector<T> c;                     ///< s nodes
    std::optional<std::vector<T>> b_embedded;  ///< s weights of the embedded method, if any
    int claimed_embedded_order = 0;       ///< the order the source states for b_embedded

    std::size_t stages() const { return b.size(); }
    bool has_embedded() const { return b_embedded.has_value(); }

    /// True when a_ij = 0 for j >= i (every stage uses only earlier ones).
    bool is_explicit() const {
        for (std::size_t i = 0; i < a.size(); ++i)
            for (std::size_t j = i; j < a[i].size(); ++j)
                if (a[i][j] != 0) return false;
        return true;
    }

    /// Throws invalid_input when the shape is wrong: no stages, A not s x s, c or a weight vector
    /// not of length s, a claimed order below 1.
    void validate_shape() const {
        const std::string who = "stepcert: tableau '" + name + "': ";
        const std::size_t s = b.size();
        if (s == 0) throw invalid_input(who + "it has no stages (b is empty).");
        if (a.size() != s)
            throw invalid_input(who + "A has " + std::to_string(a.size()) + " rows but b has " + std::to_string(s) + " weights.");
        for (std::size_t i = 0; i < s; ++i)
            if (a[i].size() != s)
                throw invalid_input(who + "row " + std::to_string(i + 1) + " of A has " + std::to_string(a[i].size()) +
                                    " entries; every row needs " + std::to_string(s) + ".");
        if (c.size() != s)
            throw invalid_input(who + "c has " + std::to_string(c.size()) + " nodes but b has " + std::to_string(s) + " weights.");
        if (b_embedded && b_embedded->size() != s)
            throw invalid_input(who + "the embedded weights have " + std::to_string(b_embedded->size()) + " entries; " +
                                std::to_string(s) + " are needed.");
        if (claimed_order < 1) throw invalid_input(who + "the claimed order must be at least 1.");
        if (b_embedded && claimed_embedded_order < 1)
            throw invalid_input(who + "an embedded method needs a claimed embedded order of at least 1.");
    }

    /// Rows i (0-based) where c_i differs from sum_j a_ij (exactly, or by more than
    /// tolerance when T is not exact).
    std::vector<std::size_t> check_row_sums(const T& tolerance = T(0)) const {
        validate_shape();
        std::vector<std::size_t> bad;
        for (std::size_t i = 0; i < stages(); ++i) {
            T sum = 0;
            for (const T& x : a[i]) sum += x;
            const T d = sum - c[i];
            if (d > tolerance || -d > tolerance) bad.push_back(i);
        }
        return bad;
    }

    /// The same tableau in another scalar type (e.g. exact rationals to double for a stepper).
    template <class U>
    tableau<U> as() const {
        tableau<U> out;
        out.name = name;
        out.claimed_order = claimed_order;
        out.claimed_embedded_order = claimed_embedded_order;
        auto conv = [](const std::vector<T>& v) {
            std::vector<U> w;
            w.reserve(v.size());
            for (const T& x : v) w.push_back(static_cast<U>(x));
            return w;
        };
        for (const auto& row : a) out.a.push_back(conv(row));
        out.b = conv(b);
        out.c = conv(c);
        if (b_embedded) out.b_embedded = conv(*b_embedded);
        return out;
    }
};

/// Builds a tableau from published coefficients written as text ("1/3", "0.25"), converted to T
/// exactly where T allows: rows of A (lower-triangular rows may be short: missing entries are 0),
/// b, c, and optionally the embedded weights (empty: none).
template <class T>
tableau<T> tableau_from_text(std::string name, int order, const std::vector<std::vector<std::string_view>>& a_rows,
                             const std::vector<std::string_view>& b, const std::vector<std::string_view>& c,
                             const std::vector<std::string_view>& b_embedded = {}, int embedded_order = 0) {
    tableau<T> t;
    t.name = std::move(name);
    t.claimed_order = order;
    const std::size_t s = b.size();
    for (const auto& row : a_rows) {
        if (row.size() > s)
            throw invalid_input("stepcert: tableau '" + t.name + "': a row of A has more entries than there are stages.");
        std::vector<T> r(s, T(0));
        for (std::size_t j = 0; j < row.size(); ++j) r[j] = exact_number<T>(row[j]);
        t.a.push_back(std::move(r));
    }
    for (auto x : b) t.b.push_back(exact_number<T>(x));
    for (auto x : c) t.c.push_back(exact_number<T>(x));
    if (!b_embedded.empty()) {
        std::vector<T> e;
        for (auto x : b_embedded) e.push_back(exact_number<T>(x));
        t.b_embedded = std::move(e);
        t.claimed_embedded_order = embedded_order;
    }
    t.validate_shape();
    return t;
}

} // namespace stepcert
