#pragma once
// Wraps a right-hand side so every evaluation is counted and the evaluation budget is enforced.
// The counter lives outside the wrapper because odeint copies systems by value.
#include <cstddef>
#include <string>

#include "stepcert/core/error.hpp"

namespace stepcert {
namespace detail {
// Out of line and cold, so the counted call stays small enough to inline into every stage.
[[noreturn, gnu::noinline, gnu::cold]] inline void throw_budget_exhausted(std::size_t budget) {
    throw budget_exhausted("stepcert: the run exceeded its budget of " + std::to_string(budget) +
                           " right-hand-side evaluations; raise run_options::max_evaluations or use a larger step/tolerance.");
}
} // namespace detail

template <class Rhs>
struct counted_rhs {
    const Rhs* rhs;
    std::size_t* count;
    std::size_t budget;

    // Constrained, so a problem built on a counted right-hand side still knows which scalar
    // types the user's function accepts (a double-only one stays double-only).
    template <class S, class T>
        requires requires(const Rhs& f, const S& y, S& d, T t) { f(y, d, t); }
    void operator()(const S& y, S& dydt, T t) const {
        if (++*count > budget) [[unlikely]]
            detail::throw_budget_exhausted(budget);
        (*rhs)(y, dydt, t);
    }
};

} // namespace stepcert
