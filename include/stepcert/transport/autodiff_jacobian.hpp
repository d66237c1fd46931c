#pragma once
// A Jacobian by forward-mode automatic differentiation of the problem's own right-hand side
// (Boost.Math's autodiff, first order): column j is the derivative of f along y_j, one
// evaluation of f in dual numbers per column, exact to rounding — no difference step to choose.
// Opt in by attaching it: problem.with_jacobian(stepcert::autodiff_jacobian(problem.rhs())).
// The right-hand side must be generic in its scalar (take the state's element type U and use
// unqualified exp, sin, ... so the dual-number overloads are found), as it must be anyway to run
// in multiprecision; a right-hand side hard-wired to double does not compile with it.
#include <cstddef>
#include <utility>

#include <boost/math/differentiation/autodiff.hpp>

#include "stepcert/core/state.hpp"
#include "stepcert/problems/detail/real.hpp"

namespace stepcert {

template <class Rhs>
struct autodiff_jacobian_of {
    Rhs rhs;

    template <state S, class Time, class M>
    void operator()(const S& y, const Time& t, M& J) const {
        using U = scalar_of<S>;
        using dual = boost::math::differentiation::autodiff_fvar<U, 1>;
        using SD = rebind_state<S, dual>;
        const std::size_t n = state_size(y);
        SD x = state_traits<SD>::make(n), dxdt = state_traits<SD>::make(n);
        for (std::size_t j = 0; j < n; ++j) {
            // y_j is the variable of this pass, every other component a constant.
            for (std::size_t i = 0; i < n; ++i) x[i] = i == j ? boost::math::differentiation::make_fvar<U, 1>(y[i]) : dual(y[i]);
            rhs(std::as_const(x), dxdt, t);
            for (std::size_t i = 0; i < n; ++i) problems::detail::set_entry(J, i, j, dxdt[i].derivative(1));
        }
    }
};

/// The Jacobian of `rhs` by automatic differentiation, to attach with problem.with_jacobian(...).
template <class Rhs>
autodiff_jacobian_of<Rhs> autodiff_jacobian(Rhs rhs) {
    return {std::move(rhs)};
}

} // namespace stepcert
