#pragma once
// Helpers for the adaptive-method tests: output grids and Boost.Odeint's own integrate_times run
// with an evaluation counter. Against a wrapper of the same odeint stepper this checks stepcert's
// driver (step control loop, output times, counts), not the method; against stepcert's own
// tableau steppers (test_methods_tableau.cpp) it checks the method independently.
#include <cstddef>
#include <vector>

#include <boost/numeric/odeint/integrate/integrate_times.hpp>

#include "stepcert/core/state.hpp"

namespace methods_test {
namespace odeint = boost::numeric::odeint;

template <class T>
std::vector<T> output_times(int count, double t1) {
    std::vector<T> times;
    for (int i = 1; i <= count; ++i) times.push_back(T(t1) * i / count);
    return times;
}

template <class T>
struct odeint_result {
    std::vector<std::vector<T>> states;
    std::size_t steps = 0;
    std::size_t evaluations = 0;
};

/// Boost.Odeint's integrate_times with the given stepper, counting right-hand-side calls.
template <class T, class P, class Stepper>
odeint_result<T> odeint_run(const P& p, Stepper stepper, const std::vector<T>& times, double dt0) {
    using S = std::vector<T>;
    odeint_result<T> r;
    std::size_t* count = &r.evaluations;
    auto rhs = [&p, count](const S& y, S& dydt, T t) {
        ++*count;
        p.rhs()(y, dydt, t);
    };
    std::vector<T> all{T(p.t0())};
    all.insert(all.end(), times.begin(), times.end());
    S y = stepcert::convert_state<S>(p.y0());
    r.steps = odeint::integrate_times(stepper, rhs, y, all.begin(), all.end(), T(dt0),
                                      [&r](const S& x, T) { r.states.push_back(x); });
    return r;
}

} // namespace methods_test
