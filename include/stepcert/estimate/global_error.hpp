#pragma once
// What a global error estimate (or the true global error) of a fixed-step run reports, and the
// options of the functions that make one: richardson_global_error, true_global_error.
#include <algorithm>
#include <cmath>
#include <cstddef>
#include <limits>
#include <string>
#include <vector>

#include "stepcert/core/norm.hpp"
#include "stepcert/core/round_off.hpp"
#include "stepcert/methods/method.hpp"

namespace stepcert {

struct global_error_options {
    weighted_norm norm;               ///< how an error vector is measured (scaled by the run's state)
    std::size_t grid_points = 1;      ///< G evenly spaced output times (t1 among them); G must divide n
    bool observe_order = false;       ///< run 4n steps too and use the observed order instead of the declared one
    double order_tolerance = 0.5;     ///< observed order this close to the declared one counts as asymptotic
    double round_off_factor = 1.0;    ///< floor factor * sqrt(N) * eps * |y| below which a difference is round-off
    bool keep_vectors = false;        ///< also keep the estimated error vector at each grid time
    std::size_t max_evaluations = 50'000'000;  ///< budget over all runs
};

/// Estimated global error of the run with n steps at G grid times.
struct global_error_estimate {
    std::string problem;
    std::string method;
    std::size_t steps = 0;     ///< n: the run whose error is estimated
    int declared_order = 0;
    double order_used = 0.0;   ///< the p in 2^p / (2^p - 1): the observed one when it is positive, else declared
    bool order_observed = false;
    double observed_order = std::numeric_limits<double>::quiet_NaN();  ///< from n, 2n, 4n (NaN if not observed)
    /// Observed order within order_tolerance of the declared one (true when none was asked for).
    bool order_consistent = true;
    /// The difference between the two finest runs at t1 is within their round-off (factor *
    /// sqrt(N) * eps * max_t |y|, N the finer run's steps, as order_study's floor): the estimate
    /// then measures rounding, not discretization, and must not be trusted.
    bool round_off_limited = false;
    weighted_norm norm;
    std::vector<double> times;      ///< the grid times (t0 excluded)
    std::vector<double> estimate;   ///< weighted norm of the estimated error at each grid time
    std::vector<std::vector<double>> vectors;  ///< the estimated error vectors (keep_vectors)
    run_stats cost;                 ///< all runs together

    double largest() const {
        double m = 0.0;
        for (double e : estimate) m = std::max(m, e);
        return m;
    }
};

} // namespace stepcert
