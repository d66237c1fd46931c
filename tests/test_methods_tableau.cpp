// The fixed-step method built from an explicit tableau: agreement with Boost.Odeint's own RK4
// and Dormand–Prince steppers on the same steps, observed order equal to the algebraic order
// in double and in cpp_bin_float_50 (coefficients converted exactly from cpp_rational).
#include <vector>

#include <gtest/gtest.h>

#include <boost/multiprecision/cpp_int.hpp>

#include "stepcert/methods/classic_rk4.hpp"
#include "stepcert/methods/dormand_prince54.hpp"
#include "stepcert/methods/tableau_method.hpp"
#include "stepcert/run/run.hpp"
#include "stepcert/tableau/catalogue.hpp"

#include "test_methods_odeint_direct.hpp"
#include "test_methods_support.hpp"

namespace {
using namespace methods_test;
using boost::multiprecision::cpp_rational;
namespace odeint = boost::numeric::odeint;
namespace tb = stepcert::tableaus;

static_assert(stepcert::fixed_step_method<stepcert::explicit_tableau_method<cpp_rational>>);

template <class T>
class TableauMethod : public ::testing::Test {};
using Scalars = ::testing::Types<double, mp50>;
TYPED_TEST_SUITE(TableauMethod, Scalars);

TYPED_TEST(TableauMethod, AgreesWithOdeintSteppers) {
    // Outside reference: Boost.Odeint's runge_kutta4 and runge_kutta_dopri5 under integrate_n_steps.
    // The same coefficients in a different order of summation: agreement to a few units of round-off.
    using T = TypeParam;
    using S = std::vector<T>;
    const std::size_t n = 24;
    const auto p = rigid_body_problem();
    auto direct = [&](auto stepper) { return odeint_n_steps<T>(p, stepper, n); };
    const auto rk4 = stepcert::run_uniform<T>(p, stepcert::tableau_method(tb::classic_rk4<cpp_rational>()), n);
    EXPECT_LE(max_distance(rk4.final_state(), direct(odeint::runge_kutta4<S, T, S, T>())), 16 * eps<T>());
    const auto dp = stepcert::run_uniform<T>(p, stepcert::tableau_method(tb::dormand_prince54<cpp_rational>()), n);
    EXPECT_LE(max_distance(dp.final_state(), direct(odeint::runge_kutta_dopri5<S, T, S, T>())), 16 * eps<T>());
    // Stage count: 4 evaluations per RK4 step, 7 per Dormand–Prince step (no FSAL reuse here).
    EXPECT_EQ(rk4.stats.evaluations, 4 * n);
    EXPECT_EQ(dp.stats.evaluations, 7 * n);
}

TYPED_TEST(TableauMethod, ObservedOrderIsTheAlgebraicOrder) {
    // Order p: global error O(h^p) (common practice, no source). Halving sequences on the rigid
    // body (exact solution by Jacobi elliptic functions, Boost.Math).
    using T = TypeParam;
    const auto p = rigid_body_problem();
    auto check = [&](const auto& tab, std::size_t n0) {
        const auto orders = observed_orders<T>(p, stepcert::tableau_method(tab), n0, 4);
        EXPECT_NEAR(orders.back(), tab.claimed_order, 0.15) << tab.name;
    };
    check(tb::kutta3<cpp_rational>(), 40);
    check(tb::three_eighths_rule<cpp_rational>(), 40);
    check(tb::bogacki_shampine32<cpp_rational>(), 40);
    check(tb::fehlberg45<cpp_rational>(), 20);
}

TEST(TableauMethodInput, ImplicitTableausAreRefused) {
    EXPECT_THROW(stepcert::tableau_method(tb::backward_euler<cpp_rational>()), stepcert::unsupported_operation);
    auto broken = tb::classic_rk4<double>();
    broken.c.pop_back();
    EXPECT_THROW(stepcert::tableau_method(broken), stepcert::invalid_input);
}

} // namespace
