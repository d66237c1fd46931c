#pragma once
// Breakpoints in the runs. A run lands on every breakpoint and steps each segment between them on
// its own; the right-hand side is evaluated with the time held just inside the segment being
// stepped, so a model that switches at a breakpoint tb (written `t > tb` or `t >= tb` alike) is
// seen from the segment's own side at its ends: a stage at tb itself would otherwise take the
// other side's value, an O(h) local error that caps every method at first order.
#include <algorithm>
#include <cmath>
#include <cstddef>
#include <limits>
#include <vector>

namespace stepcert::detail {

/// f(y, dydt, t) with t held in [lo, hi].
template <class Rhs, class T>
struct segment_rhs {
    const Rhs* rhs;
    T lo, hi;

    template <class S, class U>
        requires requires(const Rhs& f, const S& y, S& d, U t) { f(y, d, t); }
    void operator()(const S& y, S& dydt, U t) const {
        const U a = static_cast<U>(lo), b = static_cast<U>(hi);
        (*rhs)(y, dydt, t < a ? a : (t > b ? b : t));
    }
};

/// The time just inside a segment end that is a breakpoint: a few units of T's rounding away
/// (far below any step), never more than a quarter of the segment.
template <class T>
T inside_by(const T& scale, const T& segment_length) {
    using std::abs;
    const T delta = T(8) * std::numeric_limits<T>::epsilon() * scale;
    return delta < segment_length / 4 ? delta : segment_length / 4;
}

/// One end of a stretch a run steps across, and whether that end is a breakpoint.
template <class T>
struct landing_point {
    T t;
    bool output = false;
    bool breakpoint = false;
};

/// The output times of a fixed-step run with `blocks` output blocks on [t0, t1]: t0 + j (t1 - t0) /
/// blocks without breakpoints. With breakpoints, each segment between them gets its own evenly
/// spaced output times, ceil(blocks x its share of [t0, t1]) of them, its end among them; every
/// block is then stepped with the same number of equal steps. Refining a run (more steps per
/// block) so refines every segment by the same ratio, and the steps stay uniform within each
/// segment and no longer than (t1 - t0) / (blocks x steps per block). t0 is the first point.
template <class T, class B>
std::vector<landing_point<T>> output_grid(const T& t0, const T& t1, std::size_t blocks, const std::vector<B>& breakpoints) {
    std::vector<landing_point<T>> out;
    out.push_back({t0, true, false});
    const T span = t1 - t0;
    if (breakpoints.empty()) {
        out.reserve(blocks + 1);
        for (std::size_t j = 1; j <= blocks; ++j) out.push_back({j == blocks ? t1 : t0 + static_cast<T>(j) * span / static_cast<T>(blocks), true, false});
        return out;
    }
    T from = t0;
    for (std::size_t s = 0; s <= breakpoints.size(); ++s) {
        const bool last = s == breakpoints.size();
        const T to = last ? t1 : static_cast<T>(breakpoints[s]);
        const T length = to - from;
        const double share = static_cast<double>(blocks) * static_cast<double>(length / span);
        const std::size_t parts = std::max<std::size_t>(1, static_cast<std::size_t>(std::ceil(share * (1.0 - 1e-12))));
        for (std::size_t q = 1; q <= parts; ++q)
            out.push_back({q == parts ? to : from + static_cast<T>(q) * length / static_cast<T>(parts), true, q == parts && !last});
        from = to;
    }
    return out;
}

} // namespace stepcert::detail
