#pragma once
// The Jacobian's action J v at one state, without forming J (needs Eigen, for the small-system
// variant): a forward difference of the right-hand side along v,
//   J v ~ (f(y + e v) - f(y)) / e,  e = sqrt(eps) max(1, |y|_2) / |v|_2,
// one evaluation per product after f(y) (common practice: the step balances the O(e) truncation
// against the O(eps / e) rounding; D. A. Knoll, D. E. Keyes, Jacobian-free Newton-Krylov methods,
// J. Comput. Phys. 193, 2004 — from memory). Memory: three states of n components, never n x n.
// A problem with its own Jacobian may instead have it formed once (dense, so for small systems
// only) and multiplied exactly. Eigenvalue estimators (transport/extreme_eigenvalues.hpp) ask
// only for products.
#include <algorithm>
#include <cmath>
#include <cstddef>
#include <limits>
#include <string>
#include <vector>

#include <Eigen/Core>

#include "stepcert/core/concepts.hpp"
#include "stepcert/core/error.hpp"
#include "stepcert/core/state.hpp"
#include "stepcert/run/run.hpp"
#include "stepcert/transport/jacobian.hpp"

namespace stepcert {

/// How a Jacobian product is formed.
enum class jacobian_product_source {
    forward_difference,  ///< (f(y + e v) - f(y)) / e: one right-hand-side evaluation per product
    problem_jacobian,    ///< the problem's own Jacobian, formed once (n x n: small systems only)
};

/// J v for the Jacobian of p at (y, t), counted against a budget of products.
template <problem_like P>
class jacobian_product {
public:
    using state_type = rebind_state<typename P::state_type, double>;

    /// Forward differences; max_products bounds the products (budget_exhausted beyond it).
    template <class S>
    jacobian_product(const P& p, const S& y, double t, std::size_t max_products)
        : jacobian_product(p, y, t, max_products, jacobian_product_source::forward_difference) {}

    /// With source problem_jacobian the problem's own Jacobian is formed once (it must have one).
    template <class S>
    jacobian_product(const P& p, const S& y, double t, std::size_t max_products, jacobian_product_source source)
        : p_(&p), y_(convert_state<state_type>(y)), t_(t), n_(state_size(y_)), max_products_(max_products), source_(source) {
        if (!all_finite(y_))
            throw non_finite_value("stepcert::jacobian_product: problem '" + p.name() + "': the state at t = " +
                                   detail::time_text(t) + " has a NaN or infinite component.");
        if (source_ == jacobian_product_source::problem_jacobian) {
            if constexpr (P::has_jacobian) {
                dense_ = jacobian_at(p, y_, t);
            } else {
                throw invalid_input("stepcert::jacobian_product: problem '" + p.name() + "' has no Jacobian of its own; "
                                    "use forward differences, or attach one with problem.with_jacobian(jac).");
            }
        } else if constexpr (!P::template rhs_accepts<double>) {
            throw invalid_input("stepcert::jacobian_product: problem '" + p.name() + "': its right-hand side does not "
                                "accept double states, so it cannot be differenced in double; make it accept them, or use "
                                "its own Jacobian (jacobian_product_source::problem_jacobian) on a small system.");
        } else {
            f0_ = state_traits<state_type>::make(n_);
            shifted_ = y_;
            f_shifted_ = state_traits<state_type>::make(n_);
            p.rhs()(static_cast<const state_type&>(y_), f0_, t_);
            ++evaluations_;
            if (!all_finite(f0_))
                throw non_finite_value("stepcert::jacobian_product: problem '" + p.name() + "': the right-hand side at t = " +
                                       detail::time_text(t) + " is NaN or infinite.");
            double norm = 0.0;
            for (std::size_t i = 0; i < n_; ++i) norm += y_[i] * y_[i];
            y_norm_ = std::sqrt(norm);
        }
    }

    std::size_t size() const { return n_; }
    std::size_t products() const { return products_; }
    std::size_t evaluations() const { return evaluations_; }  ///< right-hand-side evaluations so far
    jacobian_product_source source() const { return source_; }

    /// In words, for reports.
    std::string description() const {
        return source_ == jacobian_product_source::problem_jacobian
                   ? "products with the problem's own Jacobian"
                   : "Jacobian-vector products by forward differences of the right-hand side (e = sqrt(eps) max(1, |y|) / |v|)";
    }

    /// out = J v (both of size(), not aliased).
    void apply(const double* v, double* out) {
        if (++products_ > max_products_)
            throw budget_exhausted("stepcert::jacobian_product: problem '" + p_->name() + "': more than " +
                                   std::to_string(max_products_) + " Jacobian products at t = " + detail::time_text(t_) +
                                   "; raise the product budget.");
        if (source_ == jacobian_product_source::problem_jacobian) {
            const auto N = static_cast<Eigen::Index>(n_);
            Eigen::Map<Eigen::VectorXd>(out, N).noalias() = dense_ * Eigen::Map<const Eigen::VectorXd>(v, N);
            return;
        }
        if constexpr (P::template rhs_accepts<double>) forward_difference(v, out);
    }

private:
    void forward_difference(const double* v, double* out) {
        double v_norm = 0.0;
        for (std::size_t i = 0; i < n_; ++i) v_norm += v[i] * v[i];
        v_norm = std::sqrt(v_norm);
        if (!(v_norm > 0.0)) {
            std::fill(out, out + n_, 0.0);
            return;
        }
        const double e = std::sqrt(std::numeric_limits<double>::epsilon()) * std::max(1.0, y_norm_) / v_norm;
        for (std::size_t i = 0; i < n_; ++i) shifted_[i] = y_[i] + e * v[i];
        p_->rhs()(static_cast<const state_type&>(shifted_), f_shifted_, t_);
        ++evaluations_;
        for (std::size_t i = 0; i < n_; ++i) out[i] = (f_shifted_[i] - f0_[i]) / e;
        for (std::size_t i = 0; i < n_; ++i)
            if (!std::isfinite(out[i]))
                throw non_finite_value("stepcert::jacobian_product: problem '" + p_->name() + "': a Jacobian product at t = " +
                                       detail::time_text(t_) + " is NaN or infinite; check the right-hand side near that state.");
    }

private:
    const P* p_;
    state_type y_;
    double t_;
    std::size_t n_;
    std::size_t max_products_;
    jacobian_product_source source_;
    std::size_t products_ = 0, evaluations_ = 0;
    double y_norm_ = 0.0;
    state_type f0_{}, shifted_{}, f_shifted_{};
    Eigen::MatrixXd dense_;
};

} // namespace stepcert
