#pragma once
// A step schedule suggested by the ledger: the steps that make every step's contribution to the
// final error the same size. Step j contributes |c_j| ~ g(t_j) h_j^(p+1), with g the transported
// principal error function; for a fixed number of steps the sum of the |c_j| is smallest when
// g h^(p+1) is the same on every step, i.e. h(t) proportional to g(t)^(-1/(p+1)) (the
// equidistribution principle; common practice, no source). g is taken piecewise constant on the
// ledger's steps. No suggested step is longer than max_step, by default 4 times the longest step
// of the ledger's run (a heuristic, common practice, no source: far beyond the run's steps it is
// stability, not accuracy, that limits the step, and the stability region is not consulted here).
// Where g is small the steps stay at max_step and the budget goes where g is large. A suggestion,
// not a certificate: the predicted sum is the first-order
// model's (it ignores cancellation between steps). Run it (run_on_grid) and measure it.
#include <algorithm>
#include <cmath>
#include <cstddef>
#include <cstdio>
#include <string>
#include <vector>

#include "stepcert/core/error.hpp"
#include "stepcert/transport/error_ledger.hpp"

namespace stepcert {

struct step_schedule {
    std::vector<double> times;     ///< t0, t_1, ..., t1: the suggested grid
    double current_sum = 0.0;      ///< sum of |c_j| of the ledger's run
    double predicted_sum = 0.0;    ///< the same sum predicted for the suggested grid
    double smallest_step = 0.0, largest_step = 0.0;
    double run_longest_step = 0.0;  ///< the ledger's run's longest step, for comparison
    std::string how;
};

/// The equidistributing grid with `steps` steps (0: as many as the ledger's run) and no step
/// longer than max_step (0: 4 times the longest step of the ledger's run).
inline step_schedule equidistributing_schedule(const error_ledger& ledger, std::size_t steps = 0, double max_step = 0.0) {
    const std::string who = "stepcert::equidistributing_schedule: ";
    if (ledger.steps.empty() || ledger.contributions.size() != ledger.steps.size())
        throw invalid_input(who + "the ledger has no contributions; build it with build_error_ledger.");
    if (ledger.power <= 1) throw invalid_input(who + "the ledger declares no method order (power <= 1).");
    if (steps == 0) steps = ledger.steps.size();
    step_schedule out;
    for (const auto& s : ledger.steps) out.run_longest_step = std::max(out.run_longest_step, s.h);
    if (max_step == 0.0) max_step = 4.0 * out.run_longest_step;
    const double span = ledger.t1() - ledger.t0();
    const double n_new = static_cast<double>(steps);
    if (!(max_step > 0.0) || !std::isfinite(max_step))
        throw invalid_input(who + "max_step must be finite and > 0.");
    if (span / max_step > n_new * (1.0 + 1e-12))
        throw invalid_input(who + std::to_string(steps) + " steps of at most " + detail::time_text(max_step) +
                            " cannot cover the run's interval; allow more steps or a longer max_step.");
    const double q = static_cast<double>(ledger.power);
    // d_j = g_j^(1/(p+1)); the new step density is rho_j = max(c d_j, 1 / max_step).
    std::vector<double> d(ledger.steps.size());
    double weighted = 0.0;
    for (std::size_t j = 0; j < d.size(); ++j) {
        const auto& s = ledger.steps[j];
        d[j] = std::pow(s.contribution / std::pow(s.h, q), 1.0 / q);
        if (!std::isfinite(d[j])) throw non_finite_value(who + "step " + std::to_string(j) + " has a non-finite contribution.");
        weighted += d[j] * s.h;
        out.current_sum += s.contribution;
    }
    if (!(weighted > 0.0)) throw invalid_input(who + "every contribution is zero: there is no error to distribute.");
    auto count = [&](double c) {
        double total = 0.0;
        for (std::size_t j = 0; j < d.size(); ++j) total += ledger.steps[j].h * std::max(c * d[j], 1.0 / max_step);
        return total;
    };
    // count(0) <= steps <= count(steps / weighted): bisect for c (count is monotone in c).
    double lo = 0.0, hi = n_new / weighted;
    for (int it = 0; it < 200 && hi - lo > 1e-15 * hi; ++it) {
        const double mid = 0.5 * (lo + hi);
        (count(mid) < n_new ? lo : hi) = mid;
    }
    const double c = hi * n_new / count(hi);  // removes the bisection's last relative error
    out.times.reserve(steps + 1);
    out.times.push_back(ledger.t0());
    double filled = 0.0;  // new steps that fit before the current old step, as a real number
    double next = 1.0;    // the count of the next grid point to place
    for (std::size_t j = 0; j < d.size(); ++j) {
        const auto& s = ledger.steps[j];
        const double rho = std::max(c * d[j], 1.0 / max_step);
        const double H = 1.0 / rho;
        // h_j / H new steps of length H fit on this old step, each contributing g_j H^(p+1).
        out.predicted_sum += std::pow(d[j], q) * std::pow(H, q - 1.0) * s.h;
        const double here = s.h * rho;
        // Grid points numbered up to filled + here fall inside this old step (t1 itself is added last).
        for (; next <= filled + here && next < n_new; next += 1.0) out.times.push_back(s.t + (next - filled) * H);
        filled += here;
    }
    out.times.push_back(ledger.t1());
    out.smallest_step = out.largest_step = out.times[1] - out.times[0];
    for (std::size_t k = 1; k < out.times.size(); ++k) {
        out.smallest_step = std::min(out.smallest_step, out.times[k] - out.times[k - 1]);
        out.largest_step = std::max(out.largest_step, out.times[k] - out.times[k - 1]);
    }
    char text[320];
    std::snprintf(text, sizeof text,
                  "%zu steps, h ~ g^(-1/%d) capped at %.4g (g: transported principal error function from %s); predicted "
                  "sum of |contributions| %.3e against %.3e now; steps up to %.3g times the run's longest, not checked "
                  "against the stability region: run it and measure",
                  steps, ledger.power, max_step, ledger.local_source.c_str(), out.predicted_sum, out.current_sum,
                  out.largest_step / out.run_longest_step);
    out.how = text;
    return out;
}

} // namespace stepcert
