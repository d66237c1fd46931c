#pragma once
// A ready-made progress callback for long sweeps: one line on the terminal, rewritten in place
// ("\r"), ended with a newline when the last point is done.
#include <cstddef>
#include <iostream>
#include <memory>
#include <ostream>
#include <string>

#include "stepcert/sweep/sweep_options.hpp"

namespace stepcert {

/// Writes "<label>: done/total points (pct%)" to `out` (default std::cerr). The sweep serializes
/// the calls, so the stream is written by one thread at a time.
inline sweep_progress terminal_progress(std::string label = "stepcert sweep", std::ostream* out = &std::cerr) {
    // Shared state so copies of the callback (std::function copies) print one line, not two.
    auto last_percent = std::make_shared<int>(-1);
    return [label = std::move(label), out, last_percent](std::size_t done, std::size_t total) {
        const int percent = total == 0 ? 100 : static_cast<int>((100 * done) / total);
        // Rewrite only when the figure changes: thousands of points need not mean thousands of writes.
        if (percent == *last_percent && done != total) return;
        *last_percent = percent;
        *out << '\r' << label << ": " << done << '/' << total << " points (" << percent << "%)";
        if (done == total) *out << '\n';
        out->flush();
    };
}

} // namespace stepcert
