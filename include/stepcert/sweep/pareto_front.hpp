#pragma once
// The Pareto front of a sweep: the points no other point beats in both cost (right-hand-side
// evaluations) and error. Only points with status ok take part; a failed point is never "cheap
// and accurate".
#include <algorithm>
#include <cstddef>
#include <limits>
#include <vector>

#include "stepcert/sweep/sweep_point.hpp"

namespace stepcert {

/// Indices into `points` of the front, by increasing evaluations (so by decreasing error).
/// A point is dropped when another has evaluations <= and error <=, one of them strictly; of
/// points equal in both, the first keeps its place.
inline std::vector<std::size_t> pareto_front(const std::vector<sweep_point>& points) {
    std::vector<std::size_t> ok;
    for (std::size_t i = 0; i < points.size(); ++i)
        if (points[i].ok() && points[i].error <= std::numeric_limits<double>::max()) ok.push_back(i);
    // Cheapest first; among equal cost the smallest error first, then the earliest.
    std::stable_sort(ok.begin(), ok.end(), [&](std::size_t a, std::size_t b) {
        if (points[a].evaluations != points[b].evaluations) return points[a].evaluations < points[b].evaluations;
        return points[a].error < points[b].error;
    });
    std::vector<std::size_t> front;
    for (std::size_t i : ok)  // kept iff strictly more accurate than every cheaper-or-equal point kept
        if (front.empty() || points[i].error < points[front.back()].error) front.push_back(i);
    return front;
}

inline std::vector<std::size_t> pareto_front(const sweep_result& r) { return pareto_front(r.points); }

} // namespace stepcert
