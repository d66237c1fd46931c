// Explicit Euler, explicit midpoint and classic RK4 through run_uniform, in double and in
// cpp_bin_float_50: stage counts, the driver against Boost.Odeint's own integrate_n_steps,
// observed order, and published Euler tables.
#include <array>
#include <cmath>
#include <vector>

#include <gtest/gtest.h>

#include "stepcert/methods/classic_rk4.hpp"
#include "stepcert/methods/explicit_euler.hpp"
#include "stepcert/methods/explicit_midpoint.hpp"
#include "stepcert/run/run.hpp"


#include "test_methods_odeint_direct.hpp"
#include "test_methods_support.hpp"

namespace {
using namespace methods_test;
namespace odeint = boost::numeric::odeint;

static_assert(stepcert::fixed_step_method<decltype(stepcert::explicit_euler)>);
static_assert(stepcert::fixed_step_method<decltype(stepcert::explicit_midpoint)>);
static_assert(stepcert::fixed_step_method<decltype(stepcert::classic_rk4)>);
static_assert(!stepcert::requires_separable_v<decltype(stepcert::classic_rk4)>);
static_assert(!stepcert::has_variable_order_v<decltype(stepcert::classic_rk4)>);

// W. F. Trench, Elementary Differential Equations, Example 3.1.2 / Table 3.1.1 (published):
// y' = -2y + x^3 e^{-2x}, y(0) = 1, exact y = e^{-2x}(x^4 + 4)/4. Non-autonomous.
auto trench_problem() {
    auto rhs = [](const auto& y, auto& dydt, auto x) {
        using std::exp;
        dydt[0] = -2 * y[0] + x * x * x * exp(-2 * x);
    };
    return stepcert::make_problem("Trench 3.1.2", rhs, std::vector<double>{1.0}, 0.0, 1.0).with_exact([](auto x, auto& y) {
        using std::exp;
        y[0] = exp(-2 * x) * (x * x * x * x + 4) / 4;
    });
}

template <class T>
class LowOrderFixed : public ::testing::Test {};
using Scalars = ::testing::Types<double, mp50>;
TYPED_TEST_SUITE(LowOrderFixed, Scalars);

TYPED_TEST(LowOrderFixed, EvaluationsPerStepAreTheStageCounts) {
    // Stage counts: explicit Euler 1 (common practice, no source); explicit midpoint 2
    // (C. Runge, Math. Ann. 46 (1895), from memory); classic RK4 4 (W. Kutta, Z. Math. Phys. 46 (1901)).
    using T = TypeParam;
    const auto p = rigid_body_problem();
    for (std::size_t n : {7u, 40u}) {
        auto euler = stepcert::run_uniform<T>(p, stepcert::explicit_euler, n);
        auto midpoint = stepcert::run_uniform<T>(p, stepcert::explicit_midpoint, n);
        auto rk4 = stepcert::run_uniform<T>(p, stepcert::classic_rk4, n);
        EXPECT_EQ(euler.stats.steps, n);
        EXPECT_EQ(euler.stats.evaluations, 1 * n);
        EXPECT_EQ(midpoint.stats.evaluations, 2 * n);
        EXPECT_EQ(rk4.stats.evaluations, 4 * n);
        EXPECT_EQ(rk4.stats.rejected, 0u);
    }
}

TYPED_TEST(LowOrderFixed, AgreesWithOdeintCalledDirectly) {
    // Driver check, not a check of the methods: explicit_euler and classic_rk4 wrap odeint's euler
    // and runge_kutta4, so this compares run_uniform with odeint's own integrate_n_steps driving
    // the very same steppers (agreement to a few units of round-off). The methods are checked
    // independently by the published Euler table below and by stepcert's tableau stepper against
    // these odeint steppers (test_methods_tableau.cpp, TableauMethod.AgreesWithOdeintSteppers).
    using T = TypeParam;
    using S = std::vector<T>;
    const std::size_t n = 50;
    auto check = [&](const auto& p, const auto& method, auto stepper) {
        const S direct = odeint_n_steps<T>(p, stepper, n);
        auto ours = stepcert::run_uniform<T>(p, method, n);
        EXPECT_LE(max_distance(ours.final_state(), direct), 8 * eps<T>()) << method.name() << " on " << p.name();
    };
    for (double t1 : {1.0, 4.0}) {
        const auto body = rigid_body_problem(t1);
        const auto trench = trench_problem().on_interval(0.0, t1);
        check(body, stepcert::explicit_euler, odeint::euler<S, T, S, T>());
        check(trench, stepcert::explicit_euler, odeint::euler<S, T, S, T>());
        check(body, stepcert::classic_rk4, odeint::runge_kutta4<S, T, S, T>());
        check(trench, stepcert::classic_rk4, odeint::runge_kutta4<S, T, S, T>());
    }
}

TYPED_TEST(LowOrderFixed, MidpointFollowsItsDefinition) {
    // odeint has no plain explicit midpoint stepper; ours is explicit_generic_rk with the
    // tableau c = (0, 1/2), a21 = 1/2, b = (0, 1). Checked against the defining formula
    // y+ = y + h f(t + h/2, y + h/2 f(t, y)) (Runge 1895, from memory) written out here.
    using T = TypeParam;
    using S = std::vector<T>;
    const auto p = trench_problem();
    const std::size_t n = 40;
    const T h = T(1) / n;
    S y = stepcert::convert_state<S>(p.y0()), k(1), mid(1);
    for (std::size_t i = 0; i < n; ++i) {
        const T t = static_cast<T>(i) * h;
        p.rhs()(y, k, t);
        mid[0] = y[0] + h / 2 * k[0];
        p.rhs()(mid, k, t + h / 2);
        y[0] += h * k[0];
    }
    auto ours = stepcert::run_uniform<T>(p, stepcert::explicit_midpoint, n);
    EXPECT_LE(max_distance(ours.final_state(), y), 8 * eps<T>());
}

TYPED_TEST(LowOrderFixed, ObservedOrderMatchesDeclaredOrder) {
    // Order p: global error O(h^p), so halving h divides it by 2^p (common practice, no source).
    // Exact solutions: e^{-t}; (cos t, -sin t); Jacobi elliptic functions (rigid body).
    using T = TypeParam;
    auto expect_order = [](const auto& p, const auto& method, std::size_t n0) {
        const auto orders = observed_orders<T>(p, method, n0, 4);
        for (std::size_t i = 1; i < orders.size(); ++i)
            EXPECT_NEAR(orders[i], method.order(), 0.1) << method.name() << " on " << p.name() << ", halving " << i;
    };
    const auto decay = decay_problem();
    const auto rotation = rotation_problem();
    const auto body = rigid_body_problem();
    expect_order(rotation, stepcert::explicit_euler, 100);
    expect_order(decay, stepcert::explicit_euler, 100);
    expect_order(body, stepcert::explicit_euler, 200);
    expect_order(decay, stepcert::explicit_midpoint, 20);
    expect_order(rotation, stepcert::explicit_midpoint, 20);
    expect_order(body, stepcert::explicit_midpoint, 40);
    expect_order(decay, stepcert::classic_rk4, 10);
    expect_order(rotation, stepcert::classic_rk4, 10);
    expect_order(body, stepcert::classic_rk4, 20);
}

TYPED_TEST(LowOrderFixed, ArrayStatesGiveTheSameResultAsVectors) {
    using T = TypeParam;
    const auto pv = rotation_problem<std::vector<double>>();
    const auto pa = rotation_problem<std::array<double, 2>>();
    auto v = stepcert::run_uniform<T>(pv, stepcert::classic_rk4, 30);
    auto a = stepcert::run_uniform<T>(pa, stepcert::classic_rk4, 30);
    EXPECT_LE(max_distance(v.final_state(), a.final_state()), 4 * eps<T>());
    EXPECT_EQ(a.stats.evaluations, 120u);
}

TEST(ExplicitEuler, HalvingTheStepRoughlyHalvesTheGlobalError) {
    // Fact of the trade (common practice, no source): Euler's global error is O(h).
    const auto p = decay_problem();
    double previous = final_error<double>(p, stepcert::explicit_euler, 50);
    for (std::size_t n = 100; n <= 800; n *= 2) {
        const double e = final_error<double>(p, stepcert::explicit_euler, n);
        EXPECT_GT(previous / e, 1.8) << "n = " << n;
        EXPECT_LT(previous / e, 2.2) << "n = " << n;
        previous = e;
    }
}

TEST(ExplicitEuler, ReproducesTrenchTable311) {
    // W. F. Trench, Elementary Differential Equations, Example 3.1.2 / Table 3.1.1 (published),
    // values at x = 1 printed to 9 decimals: tolerance half a unit of the last digit.
    const auto p = trench_problem();
    EXPECT_NEAR(stepcert::run_uniform(p, stepcert::explicit_euler, 10).final_state()[0], 0.139778910, 5e-10);
    EXPECT_NEAR(stepcert::run_uniform(p, stepcert::explicit_euler, 20).final_state()[0], 0.154715925, 5e-10);
    EXPECT_NEAR(stepcert::run_uniform(p, stepcert::explicit_euler, 40).final_state()[0], 0.162003293, 5e-10);
    std::vector<double> exact(1);
    p.exact()(1.0, exact);
    EXPECT_NEAR(exact[0], 0.169169104, 5e-10);
    // The same in 50-digit arithmetic: Euler's result does not depend on round-off at this size.
    EXPECT_NEAR(to_double(stepcert::run_uniform<mp50>(p, stepcert::explicit_euler, 40).final_state()[0]), 0.162003293, 5e-10);
}

TEST(ExplicitEuler, ReproducesLeblSection17) {
    // J. Lebl, Notes on Diffy Qs, §1.7 (published): y' = y^2/3, y(0) = 1, exact y(2) = 3;
    // Euler gives 1.92593 with h = 1 and 2.97472 with h = 0.0078125 (5 decimals printed).
    auto rhs = [](const auto& y, auto& dydt, auto) { dydt[0] = y[0] * y[0] / 3; };
    const auto p = stepcert::make_problem("Lebl 1.7", rhs, std::vector<double>{1.0}, 0.0, 2.0);
    EXPECT_NEAR(stepcert::run_uniform(p, stepcert::explicit_euler, 2).final_state()[0], 1.92593, 5e-6);
    EXPECT_NEAR(stepcert::run_uniform(p, stepcert::explicit_euler, 256).final_state()[0], 2.97472, 5e-6);
    // Successive error ratios tend to 1/2 (same source).
    const double e1 = 3.0 - stepcert::run_uniform(p, stepcert::explicit_euler, 512).final_state()[0];
    const double e2 = 3.0 - stepcert::run_uniform(p, stepcert::explicit_euler, 1024).final_state()[0];
    EXPECT_NEAR(e2 / e1, 0.5, 0.02);
}

TEST(FixedStepMethods, DeclareNameAndOrder) {
    EXPECT_EQ(stepcert::explicit_euler.order(), 1);
    EXPECT_EQ(stepcert::explicit_midpoint.order(), 2);
    EXPECT_EQ(stepcert::classic_rk4.order(), 4);
    EXPECT_EQ(stepcert::explicit_midpoint.name(), "explicit midpoint");
}

TEST(FixedStepMethods, RejectBadStepArguments) {
    // Called directly (not through run_uniform): h <= 0, NaN h, zero steps and a stride that
    // does not divide n are typed errors, not silent no-ops as in odeint.
    std::vector<double> y{1.0};
    auto rhs = [](const std::vector<double>& x, std::vector<double>& d, double) { d[0] = -x[0]; };
    auto obs = [](const std::vector<double>&, double) {};
    EXPECT_THROW(stepcert::classic_rk4.integrate_uniform(rhs, y, 0.0, -0.1, 10, 10, obs), stepcert::invalid_input);
    EXPECT_THROW(stepcert::classic_rk4.integrate_uniform(rhs, y, 0.0, 0.0, 10, 10, obs), stepcert::invalid_input);
    EXPECT_THROW(stepcert::classic_rk4.integrate_uniform(rhs, y, 0.0, std::nan(""), 10, 10, obs), stepcert::invalid_input);
    EXPECT_THROW(stepcert::explicit_euler.integrate_uniform(rhs, y, 0.0, 0.1, 0, 1, obs), stepcert::invalid_input);
    EXPECT_THROW(stepcert::explicit_euler.integrate_uniform(rhs, y, 0.0, 0.1, 10, 3, obs), stepcert::invalid_input);
    EXPECT_THROW(stepcert::explicit_euler.integrate_uniform(rhs, y, 0.0, 0.1, 10, 0, obs), stepcert::invalid_input);
    EXPECT_EQ(y[0], 1.0);
}

} // namespace
