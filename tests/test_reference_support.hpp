#pragma once
// Helpers shared by the reference tests: the true relative error of a reference against an
// exact solution, measured the way vouched_digits is defined (reference/agreement.hpp).
#include <algorithm>
#include <cmath>
#include <cstddef>
#include <string>
#include <vector>

#include "stepcert/reference/reference_solution.hpp"

namespace reference_test {

using stepcert::cpp_bin_float_50;

/// max over output times of ||ref(t) - exact(t)||_inf / ||ref(t)||_inf, in cpp_bin_float_50.
/// exact(t, y) writes the exact state into y (a std::array or std::vector of cpp_bin_float_50).
template <class Result, class ExactState, class Exact>
double true_relative_error(const Result& r, ExactState y, const Exact& exact) {
    double worst = 0.0;
    for (std::size_t i = 0; i < r.times.size(); ++i) {
        exact(static_cast<cpp_bin_float_50>(r.times[i]), y);
        cpp_bin_float_50 diff = 0, scale = 0;
        for (std::size_t k = 0; k < y.size(); ++k) {
            const cpp_bin_float_50 v = static_cast<cpp_bin_float_50>(r.states[i][k]);
            diff = std::max<cpp_bin_float_50>(diff, abs(v - y[k]));
            scale = std::max<cpp_bin_float_50>(scale, abs(v));
        }
        worst = std::max(worst, static_cast<double>(diff / scale));
    }
    return worst;
}

/// Exact solution of the Kepler problem r'' = -r/|r|^3 started at pericenter (x0, 0, 0, v0),
/// for initial data given in any type (e.g. a double-rounded sqrt(3)): eccentricity
/// e = x0 v0^2 - 1, semi-major axis a = x0 / (1 - e), mean motion n = a^(-3/2), and
/// E - e sin E = n t; x = a (cos E - e), y = a sqrt(1 - e^2) sin E, velocities by
/// differentiation (textbook two-body formulas, derived from the same Kepler equation as
/// Hull et al. 1972 class D, which is the case x0 = 1 - e, v0 = sqrt((1+e)/(1-e)), a = 1).
struct kepler_from_pericenter {
    cpp_bin_float_50 x0, v0;
    template <class S>
    void operator()(const cpp_bin_float_50& t, S& y) const {
        using R = cpp_bin_float_50;
        const R e = x0 * v0 * v0 - 1;
        const R a = x0 / (1 - e);
        const R n = 1 / (a * sqrt(a));
        R E = n * t;  // Newton on E - e sin E = n t, quadratic convergence from this start for e < 0.9
        for (int k = 0; k < 200; ++k) {
            const R step = (E - e * sin(E) - n * t) / (1 - e * cos(E));
            E -= step;
            if (abs(step) < R("1e-48") * (1 + abs(E))) break;
        }
        const R b = a * sqrt(1 - e * e);
        const R dE = n / (1 - e * cos(E));
        y[0] = a * (cos(E) - e);
        y[1] = b * sin(E);
        y[2] = -a * sin(E) * dE;
        y[3] = b * cos(E) * dE;
    }
};

/// The digits the true error supports, -log10(error).
inline double true_digits(double relative_error) {
    return relative_error > 0 ? -std::log10(relative_error) : 1e9;
}

} // namespace reference_test
