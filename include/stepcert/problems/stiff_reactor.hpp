#pragma once
// Scenario of our own (invented rate constants, no closed form): a three-species reactor with a
// fast intermediate. A -> B slowly (k1 = 0.05), B + B -> C + B fast (k2 = 2e7), B + C -> A + C
// moderately (k3 = 2e4); y = (A, B, C), y(0) = (1, 0, 0). Stiff once B forms: the Jacobian's
// fast eigenvalue is about -2 k2 B. Concentrations sum to 1 at all times (A + B + C is conserved).
// A negative B grows without bound in the model itself (B' = -k2 B^2 < 0 there), so a method
// that overshoots B below zero blows up.
#include <cstddef>
#include <type_traits>
#include <vector>

#include "stepcert/core/problem.hpp"
#include "stepcert/problems/detail/real.hpp"

namespace stepcert::problems {

struct stiff_reactor_rhs {
    template <class S, class T>
    void operator()(const S& y, S& dydt, T) const {
        using U = std::decay_t<decltype(y[0])>;
        const U k1 = U(5) / U(100), k2 = U(20000000), k3 = U(20000);
        dydt[0] = -k1 * y[0] + k3 * y[1] * y[2];
        dydt[1] = k1 * y[0] - k3 * y[1] * y[2] - k2 * y[1] * y[1];
        dydt[2] = k2 * y[1] * y[1];
    }
};

/// Its Jacobian (derived), to attach with with_jacobian when wanted.
struct stiff_reactor_jacobian {
    template <class S, class T, class M>
    void operator()(const S& y, const T&, M& J) const {
        using U = std::decay_t<decltype(y[0])>;
        const U k1 = U(5) / U(100), k2 = U(20000000), k3 = U(20000);
        detail::set_entry(J, 0, 0, -k1);
        detail::set_entry(J, 0, 1, k3 * y[2]);
        detail::set_entry(J, 0, 2, k3 * y[1]);
        detail::set_entry(J, 1, 0, k1);
        detail::set_entry(J, 1, 1, -k3 * y[2] - 2 * k2 * y[1]);
        detail::set_entry(J, 1, 2, -k3 * y[1]);
        detail::set_entry(J, 2, 0, U(0));
        detail::set_entry(J, 2, 1, 2 * k2 * y[1]);
        detail::set_entry(J, 2, 2, U(0));
    }
};

/// The reactor on [0, t1] (state std::vector<T>), without a Jacobian attached.
template <class T = double>
auto stiff_reactor(std::type_identity_t<T> t1 = T(1)) {
    detail::require_real<T>();
    return make_problem("reactor kinetics", stiff_reactor_rhs{}, std::vector<T>{T(1), T(0), T(0)}, T(0), t1);
}

} // namespace stepcert::problems
