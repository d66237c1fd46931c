#pragma once
// The truth a sweep measures errors against, in double at t0 + j (t1 - t0) / G, j = 1..G: the
// exact solution when the problem has one (in 50 digits when it is generic), else the
// multiprecision reference with the digits asked. Computed once, before any worker starts.
#include <cstddef>
#include <limits>
#include <string>
#include <vector>

#include "stepcert/core/error.hpp"
#include "stepcert/core/problem.hpp"
#include "stepcert/core/state.hpp"
#include "stepcert/reference/exact_evaluation.hpp"
#include "stepcert/reference/reference_result.hpp"
#include "stepcert/reference/reference_solution.hpp"

namespace stepcert::detail {

template <class S>
struct sweep_truth {
    std::vector<S> states;  ///< at the G output times (t0 excluded)
    double digits = 0.0;
    std::size_t evaluations = 0;
    std::string how;
};

template <problem_like P>
auto sweep_truth_for(const P& p, std::size_t G, int digits) {
    using D = rebind_state<typename P::state_type, double>;
    sweep_truth<D> out;
    if constexpr (P::has_exact) {
        (void)digits;
        using X = exact_real_for<P, double>;
        using SX = rebind_state<typename P::state_type, X>;
        const std::vector<X> times = uniform_times{G}.in<X>(static_cast<X>(p.t0()), static_cast<X>(p.t1()));
        SX exact = state_traits<SX>::make(p.dimension());
        for (const X& t : times) {
            p.exact()(t, exact);
            out.states.push_back(convert_state<D>(exact));
        }
        out.digits = std::numeric_limits<X>::digits10;
        out.how = "exact solution";
    } else {
        std::string who = "stepcert::cost_accuracy_sweep: no truth for problem '";
        who += p.name();
        who += "': ";
        const std::string fix = " Give the problem an exact solution (with_exact), write its right-hand side generic in the "
                                "scalar type, or lower sweep_options::truth_digits.";
        std::string why;
        try {
            const auto ref = reference_solution(p, digits, uniform_times{G});
            if (ref.vouches_requested()) {
                for (const auto& y : ref.states) out.states.push_back(convert_state<D>(y));
                out.digits = ref.vouched_digits;
                out.evaluations = ref.cost.evaluations;
                out.how = ref.how;
                return out;
            }
            why = "the reference vouches for ";
            why += std::to_string(ref.vouched_digits);
            why += " digits, fewer than the ";
            why += std::to_string(digits);
            why += " asked (";
            why += ref.how;
            why += ").";
        } catch (const error& e) {
            why = e.what();
        }
        std::string message = who;
        message += why;
        message += fix;
        throw accuracy_unreachable(message);
    }
    return out;
}

} // namespace stepcert::detail
