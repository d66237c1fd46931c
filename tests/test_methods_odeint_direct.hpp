#pragma once
// Boost.Odeint's own stepper driven by its own integrate_n_steps, n uniform steps over the
// problem's interval from its y0. Against a stepcert wrapper of that very stepper this checks
// stepcert's driver (times, steps, start-up), not the method; against stepcert's own tableau
// stepper (test_methods_tableau.cpp) it is an independent check of the method's arithmetic.
#include <cstddef>
#include <vector>

#include <boost/numeric/odeint/integrate/integrate_n_steps.hpp>

#include "stepcert/core/state.hpp"

namespace methods_test {

template <class T, class P, class Stepper>
std::vector<T> odeint_n_steps(const P& p, Stepper stepper, std::size_t n) {
    auto y = stepcert::convert_state<std::vector<T>>(p.y0());
    boost::numeric::odeint::integrate_n_steps(stepper, p.rhs(), y, T(p.t0()), (T(p.t1()) - T(p.t0())) / static_cast<T>(n), n);
    return y;
}

} // namespace methods_test
