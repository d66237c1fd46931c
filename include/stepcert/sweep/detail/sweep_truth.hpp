#pragma once
// The truth a sweep measures errors against (reference/detail/truth_on_grid.hpp), computed once
// before any worker starts; without it the sweep cannot measure anything, so it throws.
#include <cstddef>
#include <string>
#include <utility>

#include "stepcert/core/error.hpp"
#include "stepcert/core/problem.hpp"
#include "stepcert/reference/detail/truth_on_grid.hpp"

namespace stepcert::detail {

template <problem_like P>
auto sweep_truth_for(const P& p, std::size_t G, int digits) {
    std::string why;
    auto truth = truth_on_grid(p, G, digits, why);
    if (!truth) {
        std::string message = "stepcert::cost_accuracy_sweep: no truth for problem '";
        message += p.name();
        message += "': ";
        message += why;
        message += ". Give the problem an exact solution (with_exact), write its right-hand side generic in the scalar "
                   "type, or lower sweep_options::truth_digits.";
        throw accuracy_unreachable(message);
    }
    return *std::move(truth);
}

} // namespace stepcert::detail
