// Cash–Karp 5(4), Dormand–Prince 5(4) and Fehlberg 7(8) with a fixed step through run_uniform,
// in double and in cpp_bin_float_50: stage counts, the driver against Boost.Odeint's own
// integrate_n_steps, observed order on problems with exact solutions.
#include <vector>

#include <gtest/gtest.h>

#include "stepcert/methods/cash_karp54.hpp"
#include "stepcert/methods/dormand_prince54.hpp"
#include "stepcert/methods/fehlberg78.hpp"
#include "stepcert/run/run.hpp"


#include "test_methods_odeint_direct.hpp"
#include "test_methods_support.hpp"

namespace {
using namespace methods_test;
namespace odeint = boost::numeric::odeint;

static_assert(stepcert::fixed_step_method<decltype(stepcert::cash_karp54)>);
static_assert(stepcert::fixed_step_method<decltype(stepcert::dormand_prince54)>);
static_assert(stepcert::fixed_step_method<decltype(stepcert::fehlberg78)>);

template <class T>
class HighOrderFixed : public ::testing::Test {};
using Scalars = ::testing::Types<double, mp50>;
TYPED_TEST_SUITE(HighOrderFixed, Scalars);

TYPED_TEST(HighOrderFixed, EvaluationsPerStepAreTheStageCounts) {
    // Cash–Karp 5(4): 6 stages (Cash, Karp, ACM TOMS 16 (1990)); Dormand–Prince 5(4): 7 stages,
    // the 7th first-same-as-last, so 6 new ones per step and 1 for the first derivative
    // (Dormand, Prince, J. Comput. Appl. Math. 6 (1980)); Fehlberg 7(8): 13 stages (NASA TR R-287, 1968).
    using T = TypeParam;
    const auto p = rigid_body_problem();
    for (std::size_t n : {5u, 32u}) {
        EXPECT_EQ(stepcert::run_uniform<T>(p, stepcert::cash_karp54, n).stats.evaluations, 6 * n);
        EXPECT_EQ(stepcert::run_uniform<T>(p, stepcert::dormand_prince54, n).stats.evaluations, 6 * n + 1);
        EXPECT_EQ(stepcert::run_uniform<T>(p, stepcert::fehlberg78, n).stats.evaluations, 13 * n);
        EXPECT_EQ(stepcert::run_uniform<T>(p, stepcert::fehlberg78, n).stats.steps, n);
    }
}

TYPED_TEST(HighOrderFixed, AgreesWithOdeintCalledDirectly) {
    // Driver check, not a check of the methods: cash_karp54, dormand_prince54 and fehlberg78 wrap
    // odeint's runge_kutta_cash_karp54, runge_kutta_dopri5 and runge_kutta_fehlberg78, compared
    // here with the same steppers under odeint's own integrate_n_steps (a few units of round-off).
    // Independent checks of the methods: stepcert's tableau stepper against these odeint steppers
    // (test_methods_tableau.cpp) and the observed orders below.
    using T = TypeParam;
    using S = std::vector<T>;
    const std::size_t n = 24;
    auto check = [&](const auto& p, const auto& method, auto stepper) {
        const S direct = odeint_n_steps<T>(p, stepper, n);
        auto ours = stepcert::run_uniform<T>(p, method, n);
        EXPECT_LE(max_distance(ours.final_state(), direct), 8 * eps<T>()) << method.name() << " on " << p.name();
    };
    const auto body = rigid_body_problem();
    const auto pendulum = pendulum_problem();
    check(body, stepcert::cash_karp54, odeint::runge_kutta_cash_karp54<S, T, S, T>());
    check(pendulum, stepcert::cash_karp54, odeint::runge_kutta_cash_karp54<S, T, S, T>());
    check(body, stepcert::dormand_prince54, odeint::runge_kutta_dopri5<S, T, S, T>());
    check(pendulum, stepcert::dormand_prince54, odeint::runge_kutta_dopri5<S, T, S, T>());
    check(body, stepcert::fehlberg78, odeint::runge_kutta_fehlberg78<S, T, S, T>());
    check(pendulum, stepcert::fehlberg78, odeint::runge_kutta_fehlberg78<S, T, S, T>());
}

// Order p: global error O(h^p) (common practice, no source). The last `checked` local orders of
// a halving sequence must lie within 0.1 of the declared order.
template <class T, class P, class M>
void expect_order(const P& p, const M& method, std::size_t n0, int levels, int checked) {
    const auto orders = observed_orders<T>(p, method, n0, levels);
    for (std::size_t i = orders.size() - checked; i < orders.size(); ++i)
        EXPECT_NEAR(orders[i], method.order(), 0.1) << method.name() << " on " << p.name() << ", halving " << i + 1;
}

TEST(HighOrderFixed, ObservedOrderInMultiprecision) {
    // 50 digits keep round-off far below the errors. Exact solutions: Jacobi elliptic functions
    // (rigid body, pendulum; Boost.Math) and (cos t, -sin t).
    const auto body = rigid_body_problem();
    const auto pendulum = pendulum_problem();
    const auto rotation = rotation_problem();
    expect_order<mp50>(body, stepcert::cash_karp54, 40, 4, 2);
    expect_order<mp50>(pendulum, stepcert::cash_karp54, 40, 4, 2);
    expect_order<mp50>(body, stepcert::dormand_prince54, 40, 4, 2);
    expect_order<mp50>(pendulum, stepcert::dormand_prince54, 80, 4, 2);
    expect_order<mp50>(body, stepcert::fehlberg78, 32, 4, 2);
    expect_order<mp50>(pendulum, stepcert::fehlberg78, 32, 4, 2);
    expect_order<mp50>(rotation, stepcert::fehlberg78, 8, 4, 2);
}

TEST(HighOrderFixed, ObservedOrderInDouble) {
    // Coarse enough steps that round-off (about 1e-15) stays far below the error.
    const auto rotation = rotation_problem();
    const auto body = rigid_body_problem();
    expect_order<double>(rotation, stepcert::cash_karp54, 10, 4, 3);
    expect_order<double>(body, stepcert::cash_karp54, 20, 4, 2);
    expect_order<double>(rotation, stepcert::dormand_prince54, 10, 4, 3);
    expect_order<double>(rotation, stepcert::fehlberg78, 4, 3, 2);
}

TEST(HighOrderFixed, DeclareNameAndOrder) {
    EXPECT_EQ(stepcert::cash_karp54.order(), 5);
    EXPECT_EQ(stepcert::dormand_prince54.order(), 5);
    EXPECT_EQ(stepcert::fehlberg78.order(), 8);
    EXPECT_EQ(stepcert::fehlberg78.name(), "Fehlberg 7(8)");
}

} // namespace
