// arenstorf_orbit(): one period integrated with odeint's Bulirsch-Stoer in cpp_bin_float_50
// returns to the initial state (E. Hairer, S. P. Nørsett, G. Wanner, Solving Ordinary
// Differential Equations I, 2nd ed., Springer 1993, §II.0; recomputed constants derived, see
// reference-values §1).
#include "stepcert/reference/odeint_multiprecision.hpp"  // before odeint (Boost 1.81 fix)

#include <algorithm>
#include <array>
#include <cstddef>

#include <boost/numeric/odeint/integrate/integrate_adaptive.hpp>
#include <boost/numeric/odeint/stepper/bulirsch_stoer.hpp>
#include <gtest/gtest.h>

#include "stepcert/problems/arenstorf.hpp"
#include "test_problems_support.hpp"

namespace {

namespace pr = stepcert::problems;
namespace odeint = boost::numeric::odeint;
using problems_test::mp;
using state = std::array<mp, 4>;

struct closure_run {
    mp closure;         ///< max-norm distance of y(T) from y(0)
    std::size_t evaluations;
};

/// Integrates problem p over [t0, t1] with Bulirsch-Stoer at tolerance tol (absolute and relative)
/// from y0 and measures the distance of the end state from target.
template <class P>
closure_run integrate_period(const P& p, const state& y0, const state& target, const char* tol) {
    state y = y0;
    std::size_t evaluations = 0;
    auto rhs = p.rhs();
    auto counted = [&](const state& x, state& dxdt, const mp& t) {
        ++evaluations;
        rhs(x, dxdt, t);
    };
    odeint::bulirsch_stoer<state, mp> stepper{mp(tol), mp(tol)};
    odeint::integrate_adaptive(stepper, counted, y, mp(p.t0()), mp(p.t1()), mp(1) / 100);
    mp closure = 0;
    for (std::size_t i = 0; i < 4; ++i) closure = std::max(closure, mp(abs(y[i] - target[i])));
    return {closure, evaluations};
}

// Published constants: the orbit returns to y0 after the published period, but only to
// 4.564e-27 (max norm, in y2'; measured: 100-digit MPFR Bulirsch-Stoer at 1e-45 and this type at
// 1e-33 and 1e-36 all give 4.5639e-27, reference-values §1). The run here, at tolerance 1e-30,
// is 3.2e-28 (max norm) from the run at 1e-33 and closes to 4.462e-27; the closure can differ
// from the constants' own by no more than the run's error, so 5e-28 (reference-values §12:
// Bulirsch-Stoer's error runs up to about 300x its tolerance, 3e-28 here).
TEST(ArenstorfOrbit, PublishedPeriodClosesTheOrbit) {
    const auto p = pr::arenstorf_orbit<mp>(pr::arenstorf_constants::published);
    const auto run = integrate_period(p, p.y0(), pr::arenstorf_period_end_state<mp>(), "1e-30");
    EXPECT_LT(abs(run.closure - mp("4.5639e-27")), mp("5e-28")) << "closure " << run.closure.str(4);
    EXPECT_GT(run.evaluations, 1000u);
}

// Recomputed 40-digit constants (derived, reference-values §1): they close the orbit to 3.6e-37
// (problems/arenstorf.hpp), so here the integration alone limits the closure: at most about
// 300x the tolerance 1e-33 (reference-values §12), 3e-31; measured 1.66e-32.
TEST(ArenstorfOrbit, RecomputedPeriodClosesTheOrbitFurther) {
    const auto which = pr::arenstorf_constants::recomputed;
    const auto p = pr::arenstorf_orbit<mp>(which);
    const auto run = integrate_period(p, p.y0(), pr::arenstorf_period_end_state<mp>(which), "1e-33");
    EXPECT_LT(run.closure, mp("3e-31")) << "closure " << run.closure.str(4);
}

// Pitfall of reference-values §12: the same problem built in double carries y2'(0) and T rounded
// to 16 digits, and no multiprecision integration can close it better than about 1e-11. This is
// why the problem is offered in the caller's scalar type.
TEST(ArenstorfOrbit, DoubleRoundedConstantsCannotClose) {
    const auto pd = pr::arenstorf_orbit<double>();
    const auto& yd = pd.y0();
    const state y0{mp(yd[0]), mp(yd[1]), mp(yd[2]), mp(yd[3])};
    const auto run = integrate_period(pd, y0, y0, "1e-20");
    EXPECT_GT(run.closure, mp("1e-14")) << "closure " << run.closure.str(4);
}

// The double-built problem's right-hand side, evaluated in cpp_bin_float_50, rebuilds μ in
// that type (from 12277471/10⁹, not from a double): it equals the multiprecision problem's.
TEST(ArenstorfOrbit, RhsRebuildsTheMassRatioInTheCallersType) {
    const state y = pr::arenstorf_initial_state<mp>();
    state from_double_problem{}, from_mp_problem{};
    auto rd = pr::arenstorf_orbit<double>().rhs();
    auto rm = pr::arenstorf_orbit<mp>().rhs();
    rd(y, from_double_problem, mp(0));
    rm(y, from_mp_problem, mp(0));
    EXPECT_EQ(from_double_problem, from_mp_problem);
    EXPECT_EQ(pr::arenstorf_mass_ratio<mp>(), mp("0.012277471"));
    EXPECT_EQ(pr::arenstorf_period<mp>(), mp("17.0652165601579625588917206249"));
    EXPECT_EQ(pr::arenstorf_initial_state<mp>()[3], mp("-2.00158510637908252240537862224"));
}

} // namespace
