#pragma once
// What certify's search ladder saw, level by level (step counts, differences of successive runs,
// observed orders, runs that blew up), and the readings a refusal is built from: every refusal
// quotes the figures it rests on.
#include <cmath>
#include <cstddef>
#include <limits>
#include <optional>
#include <string>
#include <vector>

#include "stepcert/certify/detail/certify_runs.hpp"
#include "stepcert/certify/detail/failure_reading.hpp"
#include "stepcert/core/number_text.hpp"

namespace stepcert::detail {

struct ladder_record {
    std::vector<std::size_t> level;
    std::vector<double> diff;     ///< diff[k]: |run(level[k-1]) - run(level[k])| in tolerance units; inf when unknown
    std::vector<double> reading;  ///< observed order from levels k-2, k-1, k; NaN when not formed
    std::vector<failure_reading> streak;  ///< the runs in a row that blew up, up to the last level
    std::vector<failure_reading> failed;  ///< every run that blew up

    /// "1.00 on 8/16/32 steps, 0.998 on 16/32/64 steps" for the last `last` readings formed.
    std::string readings_text(std::size_t last = 6) const {
        std::vector<std::string> parts;
        for (std::size_t k = 2; k < reading.size(); ++k)
            if (std::isfinite(reading[k]))
                parts.push_back(formatted_number(reading[k], "%.3g") + " on " + std::to_string(level[k - 2]) + "/" +
                                std::to_string(level[k - 1]) + "/" + std::to_string(level[k]) + " steps");
        if (parts.empty()) return "none formed";
        std::string s;
        for (std::size_t i = parts.size() > last ? parts.size() - last : 0; i < parts.size(); ++i)
            s += (s.empty() ? "" : ", ") + parts[i];
        return s;
    }

    /// The last three readings formed, if they are the last three levels'.
    std::optional<std::vector<double>> last_three_readings() const {
        const std::size_t k = reading.size();
        if (k < 5) return std::nullopt;
        std::vector<double> r{reading[k - 3], reading[k - 2], reading[k - 1]};
        for (double x : r)
            if (!std::isfinite(x)) return std::nullopt;
        return r;
    }

    /// Did a run coarser than n blow up from an unstable step?
    bool coarser_blew_up_unstable(std::size_t n) const {
        for (const auto& f : failed)
            if (f.steps < n && f.what == failure_reading::kind::instability) return true;
        return false;
    }
};

/// Two successive readings above the declared order that have stopped approaching it: they
/// fall by at most 0.1 (readings that still approach the declared order from above fall by
/// 0.15 to 0.2 a level: Kepler's problem with RK4 went 4.77, 4.60, 4.42, 4.27, 4.15; measured)
/// and rise by at most the order tolerance.
inline bool steady_above(double q_before, double q, int declared, double tolerance) {
    const double floor = declared + tolerance;
    return q > floor && q_before > floor && q_before - q <= 0.1 && q - q_before <= tolerance;
}

/// Three successive finite runs whose largest value grows by a steady factor (at least 1.5, the
/// factors within 25% of each other) while successive runs differ more, not less: the solution
/// grows without bound as the step shrinks (y' = y^2 at its blow-up time, say). The text names
/// the figures; nullopt when the last levels do not show it.
template <class P, class M>
std::optional<std::string> growth_without_bound(certify_runs<P, M>& runs, const ladder_record& L) {
    const std::size_t k = L.level.size();
    if (k < 4) return std::nullopt;
    double big[4], at[4];
    for (std::size_t i = 0; i < 4; ++i) {
        const std::size_t n = L.level[k - 4 + i];
        if (runs.failure(n) != nullptr) return std::nullopt;
        const auto v = runs.largest_value(n);
        big[i] = v.first;
        at[i] = v.second;
    }
    double factor[3];
    for (std::size_t i = 0; i < 3; ++i) {
        factor[i] = big[i] > 0.0 ? big[i + 1] / big[i] : 0.0;
        if (!(factor[i] >= 1.5)) return std::nullopt;
    }
    for (std::size_t i = 1; i < 3; ++i)
        if (std::abs(factor[i] / factor[0] - 1.0) > 0.25) return std::nullopt;
    const double d1 = L.diff[k - 2], d2 = L.diff[k - 1];
    if (!(std::isfinite(d1) && std::isfinite(d2) && d2 >= d1)) return std::nullopt;
    return "the largest value of the solution grew " + formatted_number(big[0], "%.4g") + " -> " + formatted_number(big[1], "%.4g") +
           " -> " + formatted_number(big[2], "%.4g") + " -> " + formatted_number(big[3], "%.4g") + " (x" +
           formatted_number(factor[2], "%.3g") + " per refinement) on the runs with " + std::to_string(L.level[k - 4]) + ", " +
           std::to_string(L.level[k - 3]) + ", " + std::to_string(L.level[k - 2]) + " and " + std::to_string(L.level[k - 1]) +
           " steps, at t = " + formatted_number(at[3], "%.6g") + ", and successive runs differ more, not less (" +
           formatted_number(d1, "%.3g") + " then " + formatted_number(d2, "%.3g") +
           " of the tolerance): the solution appears to grow without bound near t = " + formatted_number(at[3], "%.6g") +
           " (a blow-up in finite time). End the interval before it, or check the model.";
}

/// The failures of the last three runs, as "t = 0.75 (8 steps), 0.7188 (16), 0.7031 (32)".
inline std::string failure_times_text(const std::vector<failure_reading>& f) {
    std::string s;
    for (std::size_t i = f.size() >= 3 ? f.size() - 3 : 0; i < f.size(); ++i)
        s += (s.empty() ? "t = " : ", ") + formatted_number(f[i].time, "%.7g") + " (" + std::to_string(f[i].steps) + " steps)";
    return s;
}

} // namespace stepcert::detail
