#pragma once
// Typed checks of the odeint fix (reference/odeint_multiprecision.hpp), instantiated per
// multiprecision type in test_reference_odeint_fix_*.cpp (one TU per group keeps compile times
// modest). They call odeint directly, not stepcert's wrappers: the fix itself is under test.
#include "stepcert/reference/multiprecision_types.hpp"  // includes the fix before odeint

#include <array>
#include <limits>
#include <vector>

#include <boost/numeric/odeint/integrate/integrate_adaptive.hpp>
#include <boost/numeric/odeint/stepper/bulirsch_stoer.hpp>
#include <boost/numeric/odeint/stepper/generation.hpp>
#include <boost/numeric/odeint/stepper/runge_kutta_dopri5.hpp>
#include <gtest/gtest.h>

template <class T>
class OdeintMultiprecisionFix : public ::testing::Test {};
TYPED_TEST_SUITE_P(OdeintMultiprecisionFix);

namespace odeint_fix_checks {
struct decay {
    template <class S, class T>
    void operator()(const S& y, S& dydt, const T&) const {
        dydt[0] = -y[0];
    }
};
} // namespace odeint_fix_checks

// Controlled Dormand–Prince 5(4) on a std::vector state at tolerance 1e-20: the error must be
// below 1e-19, out of reach in double (epsilon 2.2e-16), so the multiprecision arithmetic is
// really used. Exact value e^-1 from Boost.Multiprecision's exp (A1 of Hull et al. 1972,
// SIAM J. Numer. Anal. 9, from memory; solution derived: y = e^-t).
TYPED_TEST_P(OdeintMultiprecisionFix, ControlledDormandPrinceIntegratesDecay) {
    namespace odeint = boost::numeric::odeint;
    using T = TypeParam;
    using S = std::vector<T>;
    S y{T(1)};
    auto stepper = odeint::make_controlled(T("1e-20"), T("1e-20"), odeint::runge_kutta_dopri5<S, T, S, T>());
    const std::size_t steps = odeint::integrate_adaptive(stepper, odeint_fix_checks::decay{}, y, T(0), T(1), T(1) / 100);
    const T error = abs(y[0] - exp(T(-1)));
    EXPECT_GT(steps, 100u);
    EXPECT_LT(error, T("1e-19")) << stepcert::real_type_name<T>() << ": error " << error.str(3);
}

// Bulirsch–Stoer on a std::array state at tolerance 10^-(digits10 - 3), near the type's
// epsilon: the error must stay within 1000x the tolerance (its error runs 10-300x above the
// tolerance, reference-values §12, measured).
TYPED_TEST_P(OdeintMultiprecisionFix, BulirschStoerIntegratesDecayToTheTypesAccuracy) {
    namespace odeint = boost::numeric::odeint;
    using T = TypeParam;
    using S = std::array<T, 1>;
    const T tol = pow(T(10), -(std::numeric_limits<T>::digits10 - 3));
    S y{T(1)};
    odeint::bulirsch_stoer<S, T, S, T> stepper(tol, tol);
    odeint::integrate_adaptive(stepper, odeint_fix_checks::decay{}, y, T(0), T(1), T(1) / 100);
    const T error = abs(y[0] - exp(T(-1)));
    EXPECT_LE(error, 1000 * tol) << stepcert::real_type_name<T>() << ": error " << error.str(3) << " at tolerance "
                                 << tol.str(3);
}

REGISTER_TYPED_TEST_SUITE_P(OdeintMultiprecisionFix, ControlledDormandPrinceIntegratesDecay,
                            BulirschStoerIntegratesDecayToTheTypesAccuracy);
