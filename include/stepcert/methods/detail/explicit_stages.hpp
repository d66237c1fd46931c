#pragma once
// The stage arithmetic of an explicit Runge–Kutta method from a tableau, shared by the fixed-step
// tableau_method and the embedded error stepper: coefficients converted once to the run's scalar
// type, only the nonzero entries of A visited (RK4 costs no more than written out), and the
// first-same-as-last property detected so a step can hand its last stage to the next one.
#include <cstddef>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

#include "stepcert/core/error.hpp"
#include "stepcert/core/state.hpp"
#include "stepcert/tableau/tableau.hpp"

namespace stepcert::detail {

/// The checks both tableau factories share: shape, explicit, and (for step control) embedded weights.
template <class C>
void require_explicit_tableau(const tableau<C>& tab, std::string_view who, bool needs_embedded) {
    tab.validate_shape();
    std::string what = "stepcert::";  // appended piecewise: g++ 12 -O3 warns falsely on a + b + c
    what += who;
    what += ": tableau '";
    what += tab.name;
    what += "' ";
    if (!tab.is_explicit())
        throw unsupported_operation(what + "is implicit (a_ij != 0 for some j >= i); step it with implicit_tableau_method (implicit_tableau_method.hpp).");
    if (needs_embedded && !tab.has_embedded())
        throw unsupported_operation(what + "has no embedded weights, so it gives no error estimate to control the step "
                                           "with; add b_embedded, or use it with a fixed step (tableau_method).");
}

/// True when the last stage is f at the new solution: a_sj = b_j for j < s, b_s = 0, c_s = 1
/// (checked exactly in the tableau's own type, so cpp_rational decides without rounding).
template <class C>
bool first_same_as_last(const tableau<C>& tab) {
    const std::size_t s = tab.stages();
    if (s < 2 || tab.b[s - 1] != 0 || tab.c[s - 1] != 1) return false;
    for (std::size_t j = 0; j + 1 < s; ++j)
        if (tab.a[s - 1][j] != tab.b[j]) return false;
    return true;
}

template <class S>
class explicit_stages {
public:
    using scalar = scalar_of<S>;

    /// tab must be explicit and have a valid shape (the public factories check both).
    template <class C>
    explicit_stages(const tableau<C>& tab, std::size_t dim)
        : w_(tab.template as<scalar>()), nz_(tab.stages()), k_(tab.stages(), state_traits<S>::make(dim)),
          stage_(state_traits<S>::make(dim)), dim_(dim), fsal_(first_same_as_last(tab)) {
        for (std::size_t i = 0; i < tab.stages(); ++i)
            for (std::size_t j = 0; j < i; ++j)
                if (tab.a[i][j] != 0) nz_[i].push_back(j);
        if (tab.b_embedded) {
            // b - b_hat formed in the tableau's type (exact for rationals), rounded once.
            difference_.reserve(tab.stages());
            for (std::size_t i = 0; i < tab.stages(); ++i)
                difference_.push_back(static_cast<scalar>(C(tab.b[i] - (*tab.b_embedded)[i])));
        }
    }

    std::size_t stages() const { return w_.stages(); }
    bool fsal() const { return fsal_; }
    const std::vector<scalar>& weights() const { return w_.b; }
    /// b - b_hat (empty without embedded weights).
    const std::vector<scalar>& error_weights() const { return difference_; }

    /// k_0 = f(t, x): the derivative slot the caller may fill (or take from the previous step).
    S& first_derivative() { return k_[0]; }
    const S& last_derivative() const { return k_[stages() - 1]; }

    /// k_i = f(t + c_i dt, x + dt sum_j a_ij k_j) for i >= 1; k_0 must already hold f(t, x).
    template <class Rhs, class T>
    void evaluate_stages(Rhs& rhs, const S& x, const T& t, const T& dt) {
        for (std::size_t i = 1; i < stages(); ++i) {
            for (std::size_t e = 0; e < dim_; ++e) {
                scalar acc = scalar(0);
                for (std::size_t j : nz_[i]) acc += w_.a[i][j] * k_[j][e];
                stage_[e] = x[e] + dt * acc;
            }
            rhs(static_cast<const S&>(stage_), k_[i], t + w_.c[i] * dt);
        }
    }

    /// out = base + dt sum_i weights_i k_i (out may be base). With base absent: out = dt sum ...
    template <class T>
    void combine(const std::vector<scalar>& weights, const S* base, const T& dt, S& out) const {
        for (std::size_t e = 0; e < dim_; ++e) {
            scalar acc = scalar(0);
            for (std::size_t i = 0; i < stages(); ++i) acc += weights[i] * k_[i][e];
            out[e] = base ? scalar((*base)[e] + dt * acc) : scalar(dt * acc);
        }
    }

    /// After a step whose new state is f-evaluated in the last stage: move that derivative into
    /// k_0 for the next step. Only meaningful when fsal().
    void carry_last_to_first() { std::swap(k_[0], k_[stages() - 1]); }

private:
    tableau<scalar> w_;
    std::vector<std::vector<std::size_t>> nz_;
    std::vector<S> k_;
    S stage_;
    std::size_t dim_;
    bool fsal_;
    std::vector<scalar> difference_;
};

} // namespace stepcert::detail
