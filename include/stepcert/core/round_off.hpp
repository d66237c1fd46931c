#pragma once
// The round-off level a run's error cannot fall below.
#include <cmath>
#include <cstddef>

namespace stepcert {

/// Round-off floor of a run of N steps: factor * sqrt(N) * eps * |y| (statistical accumulation
/// of rounding errors; common practice, no source). order_study and richardson_global_error
/// both judge "down at round-off" by it.
inline double round_off_floor(double factor, std::size_t steps, double eps, double scale) {
    return factor * std::sqrt(static_cast<double>(steps)) * eps * scale;
}

} // namespace stepcert
