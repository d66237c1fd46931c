#pragma once
// Where a run's NaN or infinity came from. A run only sees a non-finite state at an output time;
// checking every evaluation would tax every healthy run. So the failing stretch (from the last
// finite output) is replayed once with a probe around the right-hand side that watches its input
// and output. The probe tells a model that returns NaN for a finite state (its time and component)
// from a state that grew past the scalar type's range, and keeps a state to judge the growth by.
#include <algorithm>
#include <cmath>
#include <cstddef>
#include <limits>
#include <optional>
#include <string>
#include <utility>
#include <vector>

#include <boost/math/special_functions/fpclassify.hpp>

#include "stepcert/core/error.hpp"
#include "stepcert/core/number_text.hpp"
#include "stepcert/core/state.hpp"

namespace stepcert::detail {

/// What the probe saw over the replay: the earliest failure of each kind.
struct probe_record {
    /// A state with |y| up to this counts as sane for the model: 10x the run's size at the last
    /// finite output, and never past 1e150 (beyond the square root of double's range, any model of
    /// degree two or more overflows on the state itself: that is growth, not a model failure).
    double moderate = 1e150;
    /// States up to this (2x that size) are kept as the state to judge a growth by.
    double near = std::numeric_limits<double>::infinity();
    bool model_failed = false, state_failed = false;
    non_finite_site model, growth;
    double largest_finite = 0.0;
    /// States within `near`: the first `kept` and the last `kept` of them (a blow-up from an
    /// unstable step shows in the early ones, before the growth has made the state meaningless).
    static constexpr std::size_t kept = 4;
    std::vector<std::vector<double>> first_near, last_near;
    std::vector<double> first_near_times, last_near_times;

    void keep_near(std::vector<double> y, double t) {
        if (first_near.size() < kept) {
            first_near.push_back(std::move(y));
            first_near_times.push_back(t);
            return;
        }
        if (last_near.size() == kept) {
            last_near.erase(last_near.begin());
            last_near_times.erase(last_near_times.begin());
        }
        last_near.push_back(std::move(y));
        last_near_times.push_back(t);
    }
};

template <class S>
double largest_magnitude(const S& y) {
    double big = 0.0;
    for (std::size_t i = 0; i < state_size(y); ++i) big = std::max(big, std::abs(static_cast<double>(y[i])));
    return big;
}

template <class S>
std::size_t first_non_finite(const S& y) {
    for (std::size_t i = 0; i < state_size(y); ++i)
        if (!(boost::math::isfinite)(y[i])) return i;
    return state_size(y);
}

template <class S>
std::vector<double> as_doubles(const S& y) {
    std::vector<double> v(state_size(y));
    for (std::size_t i = 0; i < v.size(); ++i) v[i] = static_cast<double>(y[i]);
    return v;
}

/// Wraps the right-hand side for the replay; records, never throws, so the replay fails the way
/// the run did (and an adaptive controller's shrinking trial steps narrow the time down).
template <class Rhs>
struct non_finite_probe {
    const Rhs* rhs;
    probe_record* seen;

    template <class S, class T>
        requires requires(const Rhs& f, const S& y, S& d, T t) { f(y, d, t); }
    void operator()(const S& y, S& dydt, T t) const {
        const double time = static_cast<double>(t);
        const std::size_t n = state_size(y);
        if (const std::size_t bad = first_non_finite(y); bad < n) {
            note(seen->state_failed, seen->growth, non_finite_site::cause::state_growth, time, bad,
                 !(boost::math::isinf)(y[bad]));
            (*rhs)(y, dydt, t);
            return;
        }
        const double big = largest_magnitude(y);
        const bool moderate = big <= seen->moderate;
        seen->largest_finite = std::max(seen->largest_finite, big);
        if (big <= seen->near) seen->keep_near(as_doubles(y), time);
        (*rhs)(y, dydt, t);
        if (const std::size_t bad = first_non_finite(dydt); bad < n) {
            // On a moderate state the model itself failed; on a state that had grown far past the
            // run's size, its overflow is the growth showing.
            if (moderate) {
                if (note(seen->model_failed, seen->model, non_finite_site::cause::right_hand_side, time, bad,
                         !(boost::math::isinf)(dydt[bad]))) {
                    seen->model.states = {as_doubles(y)};
                    seen->model.state_times = {time};
                    seen->model.largest_finite = big;
                }
            } else {
                note(seen->state_failed, seen->growth, non_finite_site::cause::state_growth, time, bad,
                     !(boost::math::isinf)(dydt[bad]));
            }
        }
    }

private:
    /// Keeps the earliest event of a kind; true when this one was kept.
    static bool note(bool& any, non_finite_site& site, non_finite_site::cause what, double time, std::size_t component,
                     bool nan) {
        if (any && !(time < site.time)) return false;
        any = true;
        site.what = what;
        site.time = time;
        site.component = component;
        site.nan = nan;
        return true;
    }
};

/// The site a replay measured, or none when it saw nothing (e.g. only the final combination of a
/// step overflowed): then the growth is placed at the failing output time, from the replayed state.
template <class S>
std::optional<non_finite_site> measured_site(probe_record& seen, double last_finite_time, double failing_time,
                                             const S* replayed) {
    non_finite_site site;
    if (seen.model_failed) {
        site = std::move(seen.model);
    } else if (seen.state_failed) {
        site = std::move(seen.growth);
    } else if (replayed != nullptr && first_non_finite(*replayed) < state_size(*replayed)) {
        site.what = non_finite_site::cause::state_growth;
        site.time = failing_time;
        site.component = first_non_finite(*replayed);
        site.nan = !(boost::math::isinf)((*replayed)[site.component]);
    } else {
        return std::nullopt;
    }
    site.last_finite_time = last_finite_time;
    if (site.what == non_finite_site::cause::state_growth) {
        site.largest_finite = seen.largest_finite;
        site.states = std::move(seen.first_near);
        site.state_times = std::move(seen.first_near_times);
        for (std::size_t i = 0; i < seen.last_near.size(); ++i) {
            site.states.push_back(std::move(seen.last_near[i]));
            site.state_times.push_back(seen.last_near_times[i]);
        }
    }
    return site;
}

/// The message of a measured failure: what happened, where, and what to do.
inline std::string non_finite_message(const std::string& problem_name, const non_finite_site& s) {
    const std::string what = s.nan ? "NaN" : "an infinite value";
    const std::string at = formatted_number(s.time, "%.10g");
    if (s.what == non_finite_site::cause::right_hand_side)
        return "stepcert: problem '" + problem_name + "': the right-hand side returned " + what + " in component " +
               std::to_string(s.component) + " at t = " + at + " for a finite state (largest component " +
               formatted_number(s.largest_finite, "%.4g") +
               "); the model itself fails there. Check it near that time (a division by zero, a square root or "
               "logarithm of a negative value, a table read outside its range), or end the interval before it.";
    return "stepcert: problem '" + problem_name + "': the solution grew past the range of its scalar type: component " +
           std::to_string(s.component) + " became " + what + " at t = " + at + " (largest finite value before it " +
           formatted_number(s.largest_finite, "%.4g") + "; last finite output at t = " +
           formatted_number(s.last_finite_time, "%.10g") +
           "). Either the step is unstable there (reduce it) or the solution itself grows without bound.";
}

} // namespace stepcert::detail
