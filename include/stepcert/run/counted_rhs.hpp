#pragma once
// Wraps a right-hand side so every evaluation is counted and the evaluation budget is enforced.
// The counter lives outside the wrapper because odeint copies systems by value.
#include <cstddef>
#include <string>

#include "stepcert/core/error.hpp"

namespace stepcert {

template <class Rhs>
struct counted_rhs {
    const Rhs* rhs;
    std::size_t* count;
    std::size_t budget;

    template <class S, class T>
    void operator()(const S& y, S& dydt, T t) const {
        if (++*count > budget)
            throw budget_exhausted("stepcert: the run exceeded its budget of " + std::to_string(budget) +
                                   " right-hand-side evaluations; raise run_options::max_evaluations or use a larger step/tolerance.");
        (*rhs)(y, dydt, t);
    }
};

} // namespace stepcert
