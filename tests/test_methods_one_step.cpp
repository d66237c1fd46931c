// In-house one-step methods through one_step_method(name, order, step): they run through
// run_uniform like the odeint wrappers, in double and cpp_bin_float_50, with counted evaluations.
#include <array>
#include <cstddef>
#include <string>
#include <vector>

#include <gtest/gtest.h>

#include "stepcert/core/concepts.hpp"
#include "stepcert/methods/classic_rk4.hpp"
#include "stepcert/methods/one_step_method.hpp"
#include "stepcert/run/run.hpp"

#include "test_methods_support.hpp"

namespace {
using namespace methods_test;

// Heun's method written the way a team would: generic in the state and scalar types.
const auto heun_step = [](auto& rhs, auto& y, auto t, auto h) {
    auto k1 = y, k2 = y, z = y;
    rhs(y, k1, t);
    for (std::size_t i = 0; i < y.size(); ++i) z[i] = y[i] + h * k1[i];
    rhs(z, k2, t + h);
    for (std::size_t i = 0; i < y.size(); ++i) y[i] += h / 2 * (k1[i] + k2[i]);
};

// Classic RK4 by hand; a21 is a parameter so a deliberately wrong variant can be built.
struct hand_rk4 {
    int a21_denominator = 2;  // correct: 1/2
    template <class Rhs, class S, class T>
    void operator()(Rhs& rhs, S& y, T t, T h) const {
        S k1 = y, k2 = y, k3 = y, k4 = y, z = y;
        const std::size_t n = y.size();
        rhs(y, k1, t);
        for (std::size_t i = 0; i < n; ++i) z[i] = y[i] + h / a21_denominator * k1[i];
        rhs(z, k2, t + h / 2);
        for (std::size_t i = 0; i < n; ++i) z[i] = y[i] + h / 2 * k2[i];
        rhs(z, k3, t + h / 2);
        for (std::size_t i = 0; i < n; ++i) z[i] = y[i] + h * k3[i];
        rhs(z, k4, t + h);
        for (std::size_t i = 0; i < n; ++i) y[i] += h / 6 * (k1[i] + 2 * k2[i] + 2 * k3[i] + k4[i]);
    }
};

using probe_rhs = stepcert::detail::probe_rhs;
static_assert(stepcert::one_step_function_for<decltype(heun_step), probe_rhs, std::vector<double>>);
static_assert(stepcert::one_step_function_for<hand_rk4, probe_rhs, std::array<double, 3>>);
// Wrong shapes the concept (and the static_assert in integrate_uniform) reject:
const auto no_rhs_step = [](std::vector<double>& y, double, double) { y[0] += 1; };
static_assert(!stepcert::one_step_function_for<decltype(no_rhs_step), probe_rhs, std::vector<double>>);
static_assert(stepcert::fixed_step_method<decltype(stepcert::one_step_method("Heun", 2, heun_step))>);

template <class T>
class InHouseMethod : public ::testing::Test {};
using Scalars = ::testing::Types<double, mp50>;
TYPED_TEST_SUITE(InHouseMethod, Scalars);

TYPED_TEST(InHouseMethod, HandWrittenRk4AgreesWithOdeintsRk4) {
    // Outside reference: Boost.Odeint's runge_kutta4 (through the classic_rk4 wrapper). The same
    // formula by hand through one_step_method gives the same states to round-off and the same
    // evaluation count.
    using T = TypeParam;
    const auto m = stepcert::one_step_method("RK4 by hand", 4, hand_rk4{});
    for (const auto& p : {rigid_body_problem(1.0), rigid_body_problem(4.0)}) {
        const auto ours = stepcert::run_uniform<T>(p, m, 40, 8);
        const auto ref = stepcert::run_uniform<T>(p, stepcert::classic_rk4, 40, 8);
        ASSERT_EQ(ours.states.size(), ref.states.size());
        for (std::size_t i = 0; i < ours.states.size(); ++i) {
            EXPECT_EQ(ours.times[i], ref.times[i]);
            EXPECT_LE(max_distance(ours.states[i], ref.states[i]), 16 * eps<T>());
        }
        EXPECT_EQ(ours.stats.evaluations, ref.stats.evaluations);
        EXPECT_EQ(ours.stats.steps, 40u);
    }
}

TYPED_TEST(InHouseMethod, HeunRunsAndShowsOrderTwo) {
    // Heun's method: 2 evaluations per step, order 2 (K. Heun, Z. Math. Phys. 45 (1900), from memory).
    using T = TypeParam;
    const auto m = stepcert::one_step_method("Heun", 2, heun_step);
    EXPECT_EQ(m.name(), "Heun");
    EXPECT_EQ(m.order(), 2);
    const auto body = rigid_body_problem();
    EXPECT_EQ(stepcert::run_uniform<T>(body, m, 33).stats.evaluations, 66u);
    for (const auto& orders : {observed_orders<T>(body, m, 80, 4), observed_orders<T>(decay_problem(), m, 20, 4)})
        for (std::size_t i = 1; i < orders.size(); ++i) EXPECT_NEAR(orders[i], 2.0, 0.1) << "halving " << i + 1;
}

TYPED_TEST(InHouseMethod, WrongCoefficientShowsItsLowerOrder) {
    // a21 = 1/3 instead of 1/2 (c2 still 1/2): on an autonomous problem sum_i b_i c_i, with c
    // the row sums of A, becomes 4/9 instead of 1/2, so the method is only of order 1 (derived
    // from the order conditions, Butcher). run_uniform must not hide it.
    using T = TypeParam;
    const auto wrong = stepcert::one_step_method("RK4 with a wrong a21", 4, hand_rk4{3});
    const auto orders = observed_orders<T>(rigid_body_problem(), wrong, 40, 4);
    for (std::size_t i = 1; i < orders.size(); ++i) EXPECT_NEAR(orders[i], 1.0, 0.1) << "halving " << i + 1;
}

TEST(InHouseMethod_Input, RejectsMissingNameAndOrderBelowOne) {
    EXPECT_THROW((void)stepcert::one_step_method("", 2, heun_step), stepcert::invalid_input);
    EXPECT_THROW((void)stepcert::one_step_method("Heun", 0, heun_step), stepcert::invalid_input);
    try {
        (void)stepcert::one_step_method("Heun", -1, heun_step);
        FAIL() << "expected invalid_input";
    } catch (const stepcert::invalid_input& e) {
        EXPECT_NE(std::string(e.what()).find("'Heun'"), std::string::npos) << e.what();
    }
    const auto m = stepcert::one_step_method("Heun", 2, heun_step);
    EXPECT_THROW((void)stepcert::run_uniform(rigid_body_problem(), m, 0), stepcert::invalid_input);
    EXPECT_THROW((void)stepcert::run_uniform(rigid_body_problem(), m, 10, 3), stepcert::invalid_input);
}

TEST(InHouseMethod_Input, EvaluationBudgetAndNaNAreEnforcedAsForWrappedMethods) {
    const auto m = stepcert::one_step_method("Heun", 2, heun_step);
    stepcert::run_options small;
    small.max_evaluations = 10;
    EXPECT_THROW((void)stepcert::run_uniform(rigid_body_problem(), m, 6, 0, small), stepcert::budget_exhausted);
    EXPECT_NO_THROW((void)stepcert::run_uniform(rigid_body_problem(), m, 5, 0, small));
    const auto blows_up = stepcert::one_step_method("doubling", 1, [](auto&, auto& y, auto, auto) { y[0] *= 1e300; });
    EXPECT_THROW((void)stepcert::run_uniform(decay_problem(), blows_up, 4, 1), stepcert::non_finite_value);
}

TEST(InHouseMethod_Input, ArrayStatesWork) {
    const auto p = rotation_problem<std::array<double, 2>>();
    const auto run = stepcert::run_uniform(p, stepcert::one_step_method("RK4 by hand", 4, hand_rk4{}), 40);
    const auto ref = stepcert::run_uniform(p, stepcert::classic_rk4, 40);
    EXPECT_LE(max_distance(run.final_state(), ref.final_state()), 16 * eps<double>());
}

} // namespace
