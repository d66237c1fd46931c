#pragma once
// The knobs of a cost–accuracy sweep.
#include <cstddef>
#include <functional>

#include "stepcert/core/norm.hpp"

namespace stepcert {

/// progress(done, total): called after each finished point. The sweep calls it under its own
/// lock, one call at a time and with `done` increasing, so the callback need not be thread-safe;
/// it should be quick (the other workers wait for the lock).
using sweep_progress = std::function<void(std::size_t done, std::size_t total)>;

struct sweep_options {
    /// Errors are taken at t0 + j (t1 - t0) / output_times, j = 1..output_times; every fixed step
    /// count must be a multiple of it.
    std::size_t output_times = 1;
    weighted_norm norm = weighted_norm::absolute_max();  ///< error norm, max over the output grid
    std::size_t repeats = 1;             ///< timed runs per point (median, min and max are kept)
    std::size_t threads = 0;             ///< worker threads; 0 = std::thread::hardware_concurrency()
    std::size_t max_evaluations = 10'000'000;  ///< budget of one run; a point beyond it is recorded as status budget
    /// Digits the multiprecision reference must vouch for when the problem has no exact solution
    /// (17: below anything a double run can resolve).
    int truth_digits = 17;
    sweep_progress progress;             ///< optional; see terminal_progress (sweep/sweep_progress.hpp)
};

} // namespace stepcert
