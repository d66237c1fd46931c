#pragma once
// The Jacobian of a problem's right-hand side at one state, in double (needs Eigen): the
// problem's own (with_jacobian: jac(y, t, J) writing an n x n matrix), checked for size and
// finiteness, or central differences of the right-hand side with step
// delta_j = eps^(1/3) max(1, |y_j|) (common practice, no source: it balances the O(delta^2)
// truncation against the O(eps / delta) rounding of a central difference). Used by the log norm
// along a run (bound/) and by the error transport and ledger (transport/).
#include <algorithm>
#include <cmath>
#include <cstddef>
#include <limits>
#include <string>

#include <Eigen/Dense>

#include "stepcert/core/concepts.hpp"
#include "stepcert/core/error.hpp"
#include "stepcert/core/state.hpp"
#include "stepcert/run/run.hpp"

namespace stepcert {

/// Right-hand side evaluations one Jacobian costs: 0 with the problem's own, else 2n.
template <problem_like P>
constexpr std::size_t jacobian_evaluations(const P&, std::size_t dimension) {
    return P::has_jacobian ? 0 : 2 * dimension;
}

/// How the Jacobian of P is formed, in words (for reports).
template <problem_like P>
std::string jacobian_source(const P&) {
    return P::has_jacobian ? "the problem's own Jacobian"
                           : "a central-difference Jacobian (delta_j = eps^(1/3) max(1, |y_j|))";
}

/// The Jacobian of p at (y, t) in double: the problem's own, checked for size and finiteness,
/// or central differences of its right-hand side.
template <problem_like P, class S>
Eigen::MatrixXd jacobian_at(const P& p, const S& state, double t) {
    using D = rebind_state<typename P::state_type, double>;
    const D y = convert_state<D>(state);
    const std::size_t n = state_size(y);
    const auto N = static_cast<Eigen::Index>(n);
    Eigen::MatrixXd J = Eigen::MatrixXd::Zero(N, N);
    if constexpr (P::has_jacobian) {
        p.jacobian()(y, t, J);
        if (J.rows() != N || J.cols() != N)
            throw invalid_input("stepcert::jacobian_at: the Jacobian of problem '" + p.name() + "' came back " +
                                std::to_string(J.rows()) + " x " + std::to_string(J.cols()) + "; the state has " +
                                std::to_string(n) + " components, so it must be " + std::to_string(n) + " x " +
                                std::to_string(n) + ".");
    } else {
        static_assert(P::template rhs_accepts<double>,
                      "stepcert::jacobian_at: without a Jacobian the right-hand side is differenced in double; "
                      "make it accept double states, or attach a Jacobian with problem.with_jacobian(jac).");
        D plus = y, minus = y, fp = state_traits<D>::make(n), fm = state_traits<D>::make(n);
        const double root3_eps = std::cbrt(std::numeric_limits<double>::epsilon());
        for (std::size_t j = 0; j < n; ++j) {
            const double delta = root3_eps * std::max(1.0, std::abs(y[j]));
            plus[j] = y[j] + delta;
            minus[j] = y[j] - delta;
            p.rhs()(static_cast<const D&>(plus), fp, t);
            p.rhs()(static_cast<const D&>(minus), fm, t);
            for (std::size_t i = 0; i < n; ++i)
                J(static_cast<Eigen::Index>(i), static_cast<Eigen::Index>(j)) = (fp[i] - fm[i]) / (plus[j] - minus[j]);
            plus[j] = y[j];
            minus[j] = y[j];
        }
    }
    if (!J.allFinite())
        throw non_finite_value("stepcert::jacobian_at: the Jacobian of problem '" + p.name() + "' at t = " +
                               detail::time_text(t) + " has a NaN or infinite entry; check it (or the right-hand side) there.");
    return J;
}

} // namespace stepcert
