#pragma once
// A step schedule suggested by the ledger: the steps that make every step's contribution to the
// final error the same size. Step j contributes |c_j| ~ g(t_j) h_j^(p+1), with g the transported
// principal error function; for a fixed number of steps the sum of the |c_j| is smallest when
// g h^(p+1) is the same on every step, i.e. h(t) proportional to g(t)^(-1/(p+1)) (the
// equidistribution principle; common practice, no source). g is taken piecewise constant on the
// ledger's steps; where it is below 1/1000 of its largest value^(p+1) it is held there, so that no
// suggested step grows without limit. A suggestion, not a certificate: the predicted sum is the
// first-order model's (it ignores cancellation between steps), and the longer steps have not been
// checked against the method's stability region. Run it (run_on_grid) and measure it.
#include <algorithm>
#include <cmath>
#include <cstddef>
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
    std::string how;
};

/// The equidistributing grid with `steps` steps (0: as many as the ledger's run).
inline step_schedule equidistributing_schedule(const error_ledger& ledger, std::size_t steps = 0) {
    const std::string who = "stepcert::equidistributing_schedule: ";
    if (ledger.steps.empty() || ledger.contributions.size() != ledger.steps.size())
        throw invalid_input(who + "the ledger has no contributions; build it with build_error_ledger.");
    if (ledger.power <= 1) throw invalid_input(who + "the ledger declares no method order (power <= 1).");
    if (steps == 0) steps = ledger.steps.size();
    const double q = static_cast<double>(ledger.power);
    // density_j = g_j^(1/(p+1)), held at 1/1000 of its largest value.
    std::vector<double> density(ledger.steps.size());
    double top = 0.0;
    step_schedule out;
    for (std::size_t j = 0; j < density.size(); ++j) {
        const auto& s = ledger.steps[j];
        density[j] = std::pow(s.contribution / std::pow(s.h, q), 1.0 / q);
        if (!std::isfinite(density[j])) throw non_finite_value(who + "step " + std::to_string(j) + " has a non-finite contribution.");
        top = std::max(top, density[j]);
        out.current_sum += s.contribution;
    }
    if (!(top > 0.0)) throw invalid_input(who + "every contribution is zero: there is no error to distribute.");
    double mass = 0.0;  // integral of the density over [t0, t1]
    for (std::size_t j = 0; j < density.size(); ++j) {
        density[j] = std::max(density[j], 1e-3 * top);
        mass += density[j] * ledger.steps[j].h;
    }
    // Steps of the new grid on old step j have length H_j = mass / (steps * density_j); each
    // contributes g_j H_j^(p+1), h_j / H_j of them fit there.
    const double n_new = static_cast<double>(steps);
    out.times.reserve(steps + 1);
    out.times.push_back(ledger.t0());
    double filled = 0.0;  // new steps that fit before the current old step, as a real number
    double next = 1.0;    // the count of the next grid point to place
    for (std::size_t j = 0; j < density.size(); ++j) {
        const auto& s = ledger.steps[j];
        const double g = std::pow(density[j], q);
        const double H = mass / (n_new * density[j]);
        out.predicted_sum += g * std::pow(H, q - 1.0) * s.h;
        const double here = s.h / H;  // new steps on this old step
        // Grid points numbered up to filled + here fall inside this old step (t1 itself is added last).
        for (; next <= filled + here && next < n_new; next += 1.0) out.times.push_back(s.t + (next - filled) * H);
        filled += here;
    }
    out.times.push_back(ledger.t1());
    double smallest = out.times[1] - out.times[0], largest = smallest;
    for (std::size_t k = 1; k < out.times.size(); ++k) {
        smallest = std::min(smallest, out.times[k] - out.times[k - 1]);
        largest = std::max(largest, out.times[k] - out.times[k - 1]);
    }
    out.smallest_step = smallest;
    out.largest_step = largest;
    out.how = std::to_string(steps) + " steps with h ~ g^(-1/" + std::to_string(ledger.power) +
              ") (g = transported principal error function from " + ledger.local_source +
              "); predicted sum of |contributions| " + std::to_string(out.predicted_sum) + " against " +
              std::to_string(out.current_sum) + " now; suggestion only: not checked for stability, run and measure it";
    return out;
}

} // namespace stepcert
