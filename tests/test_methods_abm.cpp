// Adams–Bashforth–Moulton<Steps> through run_uniform, in double and cpp_bin_float_50: start-up
// inside the run (observer times, step count, evaluations), the driver against Boost.Odeint's
// own integrate_n_steps, and the n < Steps error. Observed orders: test_methods_abm_order.cpp.
#include <string>
#include <utility>
#include <vector>

#include <gtest/gtest.h>

#include "stepcert/methods/adams_bashforth_moulton.hpp"
#include "stepcert/methods/classic_rk4.hpp"
#include "stepcert/methods/fehlberg78.hpp"
#include "stepcert/run/run.hpp"


#include "test_methods_odeint_direct.hpp"
#include "test_methods_support.hpp"

namespace {
using namespace methods_test;
namespace odeint = boost::numeric::odeint;

static_assert(stepcert::fixed_step_method<decltype(stepcert::adams_bashforth_moulton<1>)>);
static_assert(stepcert::fixed_step_method<decltype(stepcert::adams_bashforth_moulton<8>)>);

template <class T>
class AdamsBashforthMoulton : public ::testing::Test {};
using Scalars = ::testing::Types<double, mp50>;
TYPED_TEST_SUITE(AdamsBashforthMoulton, Scalars);

TYPED_TEST(AdamsBashforthMoulton, StartUpStepsArePartOfTheRun) {
    // The first Steps - 1 steps are one-step Runge–Kutta steps of the same h (RK4 up to 4 steps,
    // Fehlberg 7(8) above): the observer sees them at t0 + k h, they count in n, and their
    // states are those of that one-step method.
    using T = TypeParam;
    const auto p = rigid_body_problem(2.0);
    const std::size_t n = 20;
    auto check = [&](const auto& abm, const auto& start_up) {
        constexpr std::size_t steps = std::decay_t<decltype(abm)>::steps;
        const auto run = stepcert::run_uniform<T>(p, abm, n, 1);
        const auto one_step = stepcert::run_uniform<T>(p, start_up, n, 1);
        ASSERT_EQ(run.times.size(), n + 1);
        EXPECT_EQ(run.stats.steps, n);
        for (std::size_t k = 0; k <= n; ++k) EXPECT_EQ(run.times[k], static_cast<T>(k) * (T(2) / n)) << "k = " << k;
        for (std::size_t k = 1; k < steps; ++k)
            EXPECT_LE(max_distance(run.states[k], one_step.states[k]), 4 * eps<T>()) << abm.name() << ", start-up step " << k;
        // From step Steps on the multistep formula takes over, so the states part ways.
        EXPECT_GT(max_distance(run.states[steps], one_step.states[steps]), 1e-12) << abm.name();
    };
    check(stepcert::adams_bashforth_moulton<3>, stepcert::classic_rk4);
    check(stepcert::adams_bashforth_moulton<4>, stepcert::classic_rk4);
    check(stepcert::adams_bashforth_moulton<6>, stepcert::fehlberg78);
}

TYPED_TEST(AdamsBashforthMoulton, EvaluationCounts) {
    // PECE: one evaluation for the predictor's newest derivative, one for the corrector
    // (common practice, no source). Start-up steps cost what their one-step method costs:
    // RK4 4, Fehlberg 7(8) 13.
    using T = TypeParam;
    const auto p = rigid_body_problem();
    const std::size_t n = 30;
    EXPECT_EQ(stepcert::run_uniform<T>(p, stepcert::adams_bashforth_moulton<1>, n).stats.evaluations, 2 * n);
    EXPECT_EQ(stepcert::run_uniform<T>(p, stepcert::adams_bashforth_moulton<2>, n).stats.evaluations, 1 * 4 + 2 * (n - 1));
    EXPECT_EQ(stepcert::run_uniform<T>(p, stepcert::adams_bashforth_moulton<4>, n).stats.evaluations, 3 * 4 + 2 * (n - 3));
    EXPECT_EQ(stepcert::run_uniform<T>(p, stepcert::adams_bashforth_moulton<5>, n).stats.evaluations, 4 * 13 + 2 * (n - 4));
    EXPECT_EQ(stepcert::run_uniform<T>(p, stepcert::adams_bashforth_moulton<8>, n).stats.evaluations, 7 * 13 + 2 * (n - 7));
    EXPECT_EQ(stepcert::adams_start_up_evaluations<4>, 4u);
    EXPECT_EQ(stepcert::adams_start_up_evaluations<5>, 13u);
}

TYPED_TEST(AdamsBashforthMoulton, AgreesWithOdeintCalledDirectly) {
    // Driver check, not a check of the method: adams_bashforth_moulton<Steps> wraps odeint's
    // adams_bashforth_moulton, compared here with the same stepper under odeint's own
    // integrate_n_steps; for 4 steps with odeint's default start-up (RK4), for 6 steps with
    // Fehlberg 7(8) given to odeint as its initializing stepper, as stepcert does. The method is
    // checked independently by stepcert's own PECE loop reproducing odeint's steps
    // (test_estimate_milne.cpp, MilnePeceRun) and by its observed orders (test_methods_abm_order.cpp).
    using T = TypeParam;
    using S = std::vector<T>;
    const std::size_t n = 40;
    const auto p = rigid_body_problem();
    auto direct = [&](auto stepper) { return odeint_n_steps<T>(p, stepper, n); };
    const S d4 = direct(odeint::adams_bashforth_moulton<4, S, T, S, T>());
    const S d6 = direct(odeint::adams_bashforth_moulton<6, S, T, S, T, odeint::range_algebra, odeint::default_operations,
                                                        odeint::initially_resizer, odeint::runge_kutta_fehlberg78<S, T, S, T>>());
    EXPECT_LE(max_distance(stepcert::run_uniform<T>(p, stepcert::adams_bashforth_moulton<4>, n).final_state(), d4), 8 * eps<T>());
    EXPECT_LE(max_distance(stepcert::run_uniform<T>(p, stepcert::adams_bashforth_moulton<6>, n).final_state(), d6), 8 * eps<T>());
}

TYPED_TEST(AdamsBashforthMoulton, FewerStepsThanTheMethodNeedsIsInvalid) {
    using T = TypeParam;
    const auto p = rigid_body_problem();
    try {
        (void)stepcert::run_uniform<T>(p, stepcert::adams_bashforth_moulton<5>, 4);
        FAIL() << "expected invalid_input";
    } catch (const stepcert::invalid_input& e) {
        EXPECT_NE(std::string(e.what()).find("at least 5 steps"), std::string::npos) << e.what();
        EXPECT_NE(std::string(e.what()).find("n = 4"), std::string::npos) << e.what();
    }
    EXPECT_NO_THROW((void)stepcert::run_uniform<T>(p, stepcert::adams_bashforth_moulton<5>, 5));
    EXPECT_THROW((void)stepcert::run_uniform<T>(p, stepcert::adams_bashforth_moulton<2>, 1), stepcert::invalid_input);
    EXPECT_NO_THROW((void)stepcert::run_uniform<T>(p, stepcert::adams_bashforth_moulton<1>, 1));
}

} // namespace
