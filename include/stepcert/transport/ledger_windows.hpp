#pragma once
// The ledger summed over time windows: which phase of the run makes the final error. The
// contributions of the steps starting in a window are added as vectors (so errors that cancel
// inside a window cancel in its total) and measured in the ledger's norm at the final state.
#include <algorithm>
#include <cmath>
#include <cstddef>
#include <string>
#include <vector>

#include "stepcert/core/error.hpp"
#include "stepcert/transport/error_ledger.hpp"

namespace stepcert {

struct ledger_window {
    double t_begin = 0.0, t_end = 0.0;
    std::size_t first_step = 0, step_count = 0;
    double contribution = 0.0;  ///< |sum of the window's c_j| at t1
    double share = 0.0;         ///< sum of the window's shares (all windows add up to 1)
    double fresh = 0.0;         ///< sum of the window's |tau_j| (local error made there, before transport)
};

/// `count` windows of equal length over [t0, t1]; a step belongs to the window its midpoint lies in.
inline std::vector<ledger_window> ledger_windows(const error_ledger& ledger, std::size_t count) {
    if (count == 0) throw invalid_input("stepcert::ledger_windows: ask for at least one window.");
    if (ledger.contributions.size() != ledger.steps.size() || ledger.steps.empty())
        throw invalid_input("stepcert::ledger_windows: the ledger has no contributions; build it with build_error_ledger.");
    const double t0 = ledger.t0(), t1 = ledger.t1(), width = (t1 - t0) / static_cast<double>(count);
    std::vector<ledger_window> out(count);
    std::vector<std::vector<double>> sums(count, std::vector<double>(ledger.final_error.size(), 0.0));
    for (std::size_t w = 0; w < count; ++w) {
        out[w].t_begin = t0 + static_cast<double>(w) * width;
        out[w].t_end = w + 1 == count ? t1 : t0 + static_cast<double>(w + 1) * width;
        out[w].first_step = ledger.steps.size();
    }
    for (std::size_t j = 0; j < ledger.steps.size(); ++j) {
        const auto& s = ledger.steps[j];
        // By the step's midpoint: a step starting on a window's edge is not sent across it by rounding.
        const double mid = s.t + 0.5 * s.h - t0;
        const auto w = std::min(count - 1, static_cast<std::size_t>(std::max(0.0, std::floor(mid / width))));
        out[w].first_step = std::min(out[w].first_step, j);
        ++out[w].step_count;
        out[w].share += s.share;
        out[w].fresh += s.fresh;
        for (std::size_t i = 0; i < sums[w].size(); ++i) sums[w][i] += ledger.contributions[j][i];
    }
    for (std::size_t w = 0; w < count; ++w) out[w].contribution = ledger.norm.of_difference(sums[w], ledger.final_state);
    return out;
}

} // namespace stepcert
