#pragma once
// The coefficient set of stepcert's Rosenbrock 4 (odeint's rosenbrock4 stepper).
//
// odeint's default coefficient set (Boost 1.81, default_rosenbrock_coefficients) is the RODAS set
// of Hairer & Wanner with the wrong sign on d4, the weight of ∂f/∂t in the fourth stage: it has
// +0.0362. In the transformed form odeint steps, d_i = γ_i = Σ_j γ_ij, the row sums of
// Γ = (diag(1/γ) − C)^(-1) (Hairer & Wanner, Solving ODEs II, §IV.7, the transformation of
// Rosenbrock methods; from memory); odeint's own γ and C give d = (0.25, −0.1043, 0.1035, −0.0362,
// 0, 0) (derived, 30 digits). With +0.0362 the method drops to first order on every problem whose
// right-hand side depends on t (tests/test_stiff_rosenbrock.cpp shows it). stepcert fixes it
// through the stepper's Coefficients parameter; Boost is not patched, and odeint's set stays
// reachable (rosenbrock4_fixed_odeint_coefficients) for comparison.
//
// The method's coefficients are 16-digit decimals (as published), so in a multiprecision type the
// order conditions hold to about 1e-16 only.
#include <boost/numeric/odeint/stepper/rosenbrock4.hpp>

namespace stepcert {

/// odeint's RODAS coefficients with d4 = −0.0362 (see above). The member hides the base's d4;
/// odeint's stepper reads every coefficient from this type.
template <class Value>
struct rodas_coefficients : boost::numeric::odeint::default_rosenbrock_coefficients<Value> {
    const Value d4 = static_cast<Value>(-0.3620000000000023e-01);
};

} // namespace stepcert
