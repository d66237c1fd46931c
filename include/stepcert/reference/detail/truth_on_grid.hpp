#pragma once
// The true solution at t0 + j (t1 - t0) / G, j = 1..G (with breakpoints: at the output times of
// run_uniform's layout, run/detail/segments.hpp), rounded to double: the exact solution when
// the problem has one (evaluated in 50 digits when it is generic), else the multiprecision
// reference, accepted only if it vouches for the digits asked. One recipe for every part of
// stepcert that judges runs against the truth (certification, sweeps). Rounded to double it stays
// about 1e-16 relative from the truth, far below any tolerance the round-off checks let through.
#include <cstddef>
#include <limits>
#include <optional>
#include <string>
#include <vector>

#include "stepcert/core/error.hpp"
#include "stepcert/core/number_text.hpp"
#include "stepcert/core/problem.hpp"
#include "stepcert/core/state.hpp"
#include "stepcert/reference/exact_evaluation.hpp"
#include "stepcert/reference/reference_result.hpp"
#include "stepcert/reference/reference_solution.hpp"
#include "stepcert/run/detail/segments.hpp"

namespace stepcert::detail {

template <class S>
struct grid_truth {
    std::vector<S> states;        ///< at the G output times (t0 excluded)
    double digits = 0.0;          ///< vouched digits (an exact solution: those of its type)
    std::size_t evaluations = 0;  ///< of the reference; 0 for an exact solution
    std::string how;
};

/// The truth on the grid of G points, or nullopt with the reason in `why` (the reference failed,
/// or vouches for fewer than `digits` digits). `digits` is ignored when the problem is exact.
/// A NaN or infinity in the reference is no mere absence of a truth: non_finite_value passes through.
template <problem_like P>
auto truth_on_grid(const P& p, std::size_t G, int digits, std::string& why)
    -> std::optional<grid_truth<rebind_state<typename P::state_type, double>>> {
    using D = rebind_state<typename P::state_type, double>;
    grid_truth<D> out;
    const auto& breaks = breakpoints_of(p);
    if constexpr (P::has_exact) {
        using X = exact_real_for<P, double>;
        using SX = rebind_state<typename P::state_type, X>;
        const auto grid = output_grid(static_cast<X>(p.t0()), static_cast<X>(p.t1()), G, breaks);
        SX exact = state_traits<SX>::make(p.dimension());
        for (std::size_t j = 1; j < grid.size(); ++j) {
            p.exact()(grid[j].t, exact);
            out.states.push_back(convert_state<D>(exact));
        }
        out.digits = std::numeric_limits<X>::digits10;
        out.how = "exact solution";
        return out;
    } else {
        try {
            output_times times{uniform_times{G}};
            if (!breaks.empty()) {
                std::vector<double> list;
                const auto grid = output_grid(static_cast<double>(p.t0()), static_cast<double>(p.t1()), G, breaks);
                for (std::size_t j = 1; j < grid.size(); ++j) list.push_back(grid[j].t);
                times = output_times(std::move(list));
            }
            const auto ref = reference_solution(p, digits, times);
            if (!ref.vouches_requested()) {
                why = "the reference vouches for " + formatted_number(ref.vouched_digits, "%.1f") + " digits, fewer than the " +
                      std::to_string(digits) + " needed (" + ref.how + ")";
                return std::nullopt;
            }
            for (const auto& y : ref.states) out.states.push_back(convert_state<D>(y));
            out.digits = ref.vouched_digits;
            out.evaluations = ref.cost.evaluations;
            out.how = ref.how;
            return out;
        } catch (const non_finite_value&) {
            throw;
        } catch (const error& e) {
            why = e.what();
            return std::nullopt;
        }
    }
}

} // namespace stepcert::detail
