#pragma once
// Finding the states of a shared reference on a uniform grid: order studies and local error
// profiles take one reference computed once (reference_solution(p, digits, uniform_times{G0}))
// and look up the grid they need in it.
#include <algorithm>
#include <cmath>
#include <cstddef>
#include <limits>
#include <string>
#include <string_view>
#include <vector>

#include "stepcert/core/error.hpp"
#include "stepcert/core/state.hpp"
#include "stepcert/reference/reference_result.hpp"
#include "stepcert/reference/reference_solution.hpp"
#include "stepcert/run/run.hpp"

namespace stepcert::detail {

/// Index in shared.times of each grid time t0 + j (t1 - t0) / G, j = 1..G, compared in the wider
/// of Tr and the reference's type. A time that differs by more than the rounding of Tr or the
/// reference's own uncertainty would put that difference into every error, so it is refused.
template <class Tr, class P, class Ref>
std::vector<std::size_t> reference_grid_indices(const P& p, const Ref& shared, std::size_t G, std::string_view who) {
    using W = wider_scalar_t<Tr, typename Ref::scalar_type>;
    const W t0 = static_cast<W>(p.t0()), t1 = static_cast<W>(p.t1());
    const double rel = 4 * std::max(static_cast<double>(std::numeric_limits<Tr>::epsilon()), std::pow(10.0, -shared.vouched_digits));
    using std::abs;  // and Boost.Multiprecision's abs by argument-dependent lookup
    const W tol = static_cast<W>(rel) * abs(t1 - t0);
    const auto wanted = uniform_times{G}.in<W>(t0, t1);
    std::vector<std::size_t> idx;
    std::size_t i = 0;
    for (const W& t : wanted) {
        while (i < shared.times.size() && static_cast<W>(shared.times[i]) < t - tol) ++i;
        if (i == shared.times.size() || abs(static_cast<W>(shared.times[i]) - t) > tol || shared.states.size() != shared.times.size())
            throw invalid_input(std::string(who) + ": the shared reference of problem '" + p.name() + "' has no state at grid time " +
                                time_text(t) + " (" + std::to_string(G) + " evenly spaced times); compute it with "
                                "reference_solution(problem, digits, uniform_times{G0}) where G0 is a multiple of " +
                                std::to_string(G) + " (for several studies, of every study's grid size).");
        idx.push_back(i);
    }
    return idx;
}

/// The reference on the uniform grid of G points with `digits` vouched digits, in Real; throws
/// accuracy_unreachable, saying why, when it cannot vouch for them.
template <class Real, class P>
auto vouched_uniform_reference(const P& p, int digits, std::size_t G, std::string_view who) {
    auto reference = reference_solution<Real>(p, digits, uniform_times{G});
    if (!reference.vouches_requested())
        throw accuracy_unreachable(std::string(who) + ": the reference of problem '" + p.name() + "' vouches for " +
                                   std::to_string(reference.vouched_digits) + " digits, fewer than the " +
                                   std::to_string(digits) + " asked: " + reference.how);
    return reference;
}

} // namespace stepcert::detail
