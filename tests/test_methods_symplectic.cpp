// Symplectic RKN (McLachlan sb3a) through run_uniform, double and cpp_bin_float_50: separable
// problems only, splitting of the full right-hand side, evaluation counts, the driver and the
// splitting against Boost.Odeint called directly, observed order 4, bounded energy over long runs.
#include <array>
#include <cmath>
#include <string>
#include <utility>
#include <vector>

#include <gtest/gtest.h>

#include "stepcert/methods/classic_rk4.hpp"
#include "stepcert/methods/symplectic_rkn.hpp"
#include "stepcert/run/run.hpp"

#include "test_methods_support.hpp"

namespace {
using namespace methods_test;
namespace odeint = boost::numeric::odeint;

using rkn_type = decltype(stepcert::symplectic_rkn);
static_assert(stepcert::fixed_step_method<rkn_type>);
static_assert(stepcert::requires_separable_v<rkn_type>);
static_assert(!stepcert::has_variable_order_v<rkn_type>);

TEST(SymplecticRkn, RefusesProblemsNotDeclaredSeparable) {
    // The rotation is separable in fact but not declared so; the rigid body is not separable.
    try {
        (void)stepcert::run_uniform(rotation_problem(), stepcert::symplectic_rkn, 10);
        FAIL() << "expected unsupported_operation";
    } catch (const stepcert::unsupported_operation& e) {
        EXPECT_NE(std::string(e.what()).find("as_separable"), std::string::npos) << e.what();
        EXPECT_NE(std::string(e.what()).find("rotation"), std::string::npos) << e.what();
    }
    EXPECT_THROW((void)stepcert::run_uniform(rigid_body_problem(), stepcert::symplectic_rkn, 10), stepcert::unsupported_operation);
    // An odd-sized state cannot even be declared separable.
    EXPECT_THROW((void)rigid_body_problem().as_separable(), stepcert::invalid_input);
    EXPECT_NO_THROW((void)stepcert::run_uniform(rotation_problem().as_separable(), stepcert::symplectic_rkn, 10));
}

TEST(SymplecticRkn, DirectCallRejectsOddState) {
    std::vector<double> y{1.0, 2.0, 3.0};
    auto rhs = [](const std::vector<double>&, std::vector<double>& d, double) { d.assign(3, 0.0); };
    auto obs = [](const std::vector<double>&, double) {};
    EXPECT_THROW(stepcert::symplectic_rkn.integrate_uniform(rhs, y, 0.0, 0.1, 4, 4, obs), stepcert::invalid_input);
}

template <class T>
class SymplecticRknTyped : public ::testing::Test {};
using Scalars = ::testing::Types<double, mp50>;
TYPED_TEST_SUITE(SymplecticRknTyped, Scalars);

TYPED_TEST(SymplecticRknTyped, CountsTwelveHalfEvaluationsPerStep) {
    // McLachlan's sb3a has 6 stages (R. I. McLachlan, SIAM J. Sci. Comput. 16 (1995), from
    // memory); odeint evaluates q' = g(p) and p' = h(q) once each per stage, and each is one call
    // of the full right-hand side here.
    using T = TypeParam;
    const auto p = pendulum_problem().as_separable();
    for (std::size_t n : {3u, 25u}) {
        const auto run = stepcert::run_uniform<T>(p, stepcert::symplectic_rkn, n);
        EXPECT_EQ(run.stats.evaluations, 12 * n);
        EXPECT_EQ(run.stats.steps, n);
    }
    EXPECT_EQ(rkn_type::evaluations_per_step, 12u);
}

TYPED_TEST(SymplecticRknTyped, AgreesWithOdeintCalledDirectly) {
    // Driver and splitting check, not a check of the method: symplectic_rkn wraps odeint's
    // symplectic_rkn_sb3a_mclachlan, compared here with the same stepper given the pendulum's two
    // halves written by hand (q' = p, p' = -sin q) and stepped with do_step. The method is checked
    // by its observed order 4 and bounded energy below.
    using T = TypeParam;
    using H = std::vector<T>;
    const std::size_t n = 30;
    const T h = T(3) / n;
    H q{T(3) / T(2)}, mom{T(0)};
    auto position_rate = [](const H& pp, H& dq) { dq[0] = pp[0]; };
    auto momentum_rate = [](const H& qq, H& dp) {
        using std::sin;
        dp[0] = -sin(qq[0]);
    };
    odeint::symplectic_rkn_sb3a_mclachlan<H, H, T, H, H, T> stepper;
    for (std::size_t k = 0; k < n; ++k) stepper.do_step(std::make_pair(position_rate, momentum_rate), q, mom, static_cast<T>(k) * h, h);
    const auto run = stepcert::run_uniform<T>(pendulum_problem().as_separable(), stepcert::symplectic_rkn, n);
    EXPECT_LE(max_distance(run.final_state(), std::vector<T>{q[0], mom[0]}), 8 * eps<T>());
}

TYPED_TEST(SymplecticRknTyped, ArrayAndVectorStatesAgree) {
    using T = TypeParam;
    const auto pv = rotation_problem<std::vector<double>>().as_separable();
    const auto pa = rotation_problem<std::array<double, 2>>().as_separable();
    const auto v = stepcert::run_uniform<T>(pv, stepcert::symplectic_rkn, 16, 4);
    const auto a = stepcert::run_uniform<T>(pa, stepcert::symplectic_rkn, 16, 4);
    ASSERT_EQ(a.states.size(), 5u);
    for (std::size_t i = 0; i < a.states.size(); ++i) EXPECT_LE(max_distance(v.states[i], a.states[i]), 4 * eps<T>());
}

TYPED_TEST(SymplecticRknTyped, ObservedOrderIsFour) {
    // Order 4: global error O(h^4) (common practice, no source). Exact solutions: (cos t, -sin t)
    // and the pendulum's Jacobi elliptic solution (Boost.Math). In 50 digits the two coefficients
    // odeint stores as double literals limit the order conditions to about 1e-17, far below
    // these errors.
    using T = TypeParam;
    auto expect_order = [](const auto& p, std::size_t n0) {
        const auto orders = observed_orders<T>(p, stepcert::symplectic_rkn, n0, 4);
        for (std::size_t i = 1; i < orders.size(); ++i) EXPECT_NEAR(orders[i], 4.0, 0.1) << p.name() << ", halving " << i + 1;
    };
    expect_order(rotation_problem().as_separable(), 10);
    expect_order(pendulum_problem().as_separable(), 20);
}

TEST(SymplecticRkn, ObservedOrderIsFourOnKepler) {
    // Kepler e = 0.5, exact solution from Kepler's equation (Hull et al. 1972, class D).
    const auto orders = observed_orders<double>(kepler_problem(3.0).as_separable(), stepcert::symplectic_rkn, 40, 4);
    for (std::size_t i = 1; i < orders.size(); ++i) EXPECT_NEAR(orders[i], 4.0, 0.1) << "halving " << i + 1;
}

/// Largest |H - H0| over outputs [from, to) of a run, H = (q^2 + p^2)/2.
template <class Run>
double energy_drift(const Run& run, std::size_t from, std::size_t to) {
    const double h0 = 0.5;  // (1^2 + 0^2)/2
    double worst = 0.0;
    for (std::size_t i = from; i < to; ++i) {
        const double q = run.states[i][0], p = run.states[i][1];
        worst = std::max(worst, std::abs(0.5 * (q * q + p * p) - h0));
    }
    return worst;
}

TEST(SymplecticRkn, EnergyOfTheHarmonicOscillatorStaysBounded) {
    // Fact of the trade (common practice, no source): a symplectic method keeps the energy error
    // of a Hamiltonian system bounded over long times, while a non-symplectic one such as
    // classic RK4 lets it drift secularly. 20000 steps of h = 0.25 (about 800 periods).
    const auto p = rotation_problem(5000.0).as_separable();
    const std::size_t n = 20000, stride = 10;
    const auto rkn = stepcert::run_uniform(p, stepcert::symplectic_rkn, n, stride);
    const auto rk4 = stepcert::run_uniform(p, stepcert::classic_rk4, n, stride);
    const std::size_t outputs = rkn.states.size(), half = outputs / 2;
    const double rkn_first = energy_drift(rkn, 0, half), rkn_second = energy_drift(rkn, half, outputs);
    const double rk4_first = energy_drift(rk4, 0, half), rk4_second = energy_drift(rk4, half, outputs);
    EXPECT_LT(rkn_second, 1.1 * rkn_first) << "symplectic energy error grew: " << rkn_first << " -> " << rkn_second;
    EXPECT_LT(rkn_second, 1e-3);
    EXPECT_GT(rk4_second, 1.8 * rk4_first) << "RK4 energy error should keep growing: " << rk4_first << " -> " << rk4_second;
    EXPECT_GT(rk4_second, 10 * rkn_second);
}

TEST(SymplecticRkn, EnergyOfKeplerOrbitStaysBounded) {
    // Same fact on a nonlinear separable problem: H = |p|^2/2 - 1/|q| for e = 0.5, 160 orbits
    // of 100 steps. Every step is observed: the energy error oscillates along the orbit and
    // the numerical orbit's phase drifts, so sparse samples would see different phases.
    const double two_pi = 6.283185307179586;
    const auto p = kepler_problem(160 * two_pi).as_separable();
    const auto run = stepcert::run_uniform(p, stepcert::symplectic_rkn, 16000, 1);
    auto energy = [](const std::vector<double>& y) {
        return 0.5 * (y[2] * y[2] + y[3] * y[3]) - 1.0 / std::sqrt(y[0] * y[0] + y[1] * y[1]);
    };
    const double e0 = energy(run.states.front());
    double first = 0.0, second = 0.0;
    const std::size_t half = run.states.size() / 2;
    for (std::size_t i = 0; i < run.states.size(); ++i) {
        double& worst = i < half ? first : second;
        worst = std::max(worst, std::abs(energy(run.states[i]) - e0));
    }
    EXPECT_LT(second, 1.1 * first) << first << " -> " << second;
    EXPECT_LT(second, 1e-2);
}

} // namespace
