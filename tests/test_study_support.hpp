#pragma once
// Kepler e = 0.5 on [0, 20] for the study tests (Hull, Enright, Fellen, Sedgwick, SIAM J. Numer.
// Anal. 9 (1972), class D; partly from memory), with an exact solution written for double only,
// on purpose: a study must then evaluate it in double and say so, and these files instantiate no
// multiprecision exact solution.
#include <array>
#include <cmath>

#include "stepcert/core/problem.hpp"
#include "stepcert/problems/kepler.hpp"

namespace study_test {

using stepcert::problems::kepler_rhs;

/// Exact solution from Kepler's equation E - e sin E = t, in double.
inline void kepler_exact_double(double t, std::array<double, 4>& y) {
    const double e = 0.5;
    double E = t;
    for (int i = 0; i < 50; ++i) {
        const double dE = (E - e * std::sin(E) - t) / (1 - e * std::cos(E));
        E -= dE;
        if (std::abs(dE) < 1e-15) break;
    }
    const double b = std::sqrt(1 - e * e), Ed = 1 / (1 - e * std::cos(E));
    y = {std::cos(E) - e, b * std::sin(E), -std::sin(E) * Ed, b * std::cos(E) * Ed};
}

/// The problem as a user without a closed form would state it.
inline auto kepler_without_exact() {
    return stepcert::make_problem("kepler e=0.5", kepler_rhs{}, std::array<double, 4>{0.5, 0.0, 0.0, std::sqrt(3.0)}, 0.0, 20.0);
}

/// The same problem with the double-only exact solution attached.
inline auto kepler_with_double_exact() { return kepler_without_exact().with_exact(kepler_exact_double); }

} // namespace study_test
