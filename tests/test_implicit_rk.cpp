// Implicit Runge–Kutta steppers from tableaus (issue 16, item 2): the catalogue's implicit
// tableaus checked exactly (order conditions, stage order), one step against the published
// stability functions, odeint's implicit_euler as an outside stepper, design orders on a
// t-dependent problem (double and cpp_bin_float_50), stiff problems far outside explicit
// stability, and a typed refusal for every way the Newton iteration can fail.
#include <array>
#include <cmath>
#include <complex>
#include <cstdio>
#include <limits>
#include <string>
#include <vector>

#include <gtest/gtest.h>

#include <boost/multiprecision/cpp_bin_float.hpp>
#include <boost/multiprecision/cpp_int.hpp>
#include <boost/numeric/odeint/stepper/implicit_euler.hpp>

#include "stepcert/core/error.hpp"
#include "stepcert/core/problem.hpp"
#include "stepcert/methods/adaptive_implicit_tableau_method.hpp"
#include "stepcert/methods/implicit_tableau_method.hpp"
#include "stepcert/problems/prothero_robinson.hpp"
#include "stepcert/run/run.hpp"
#include "stepcert/study/order_study.hpp"
#include "stepcert/tableau/catalogue.hpp"
#include "stepcert/tableau/order_conditions.hpp"
#include "stepcert/tableau/stage_order.hpp"
#include "stepcert/testing/gtest.hpp"

namespace test_implicit_rk {
namespace tableaus = stepcert::tableaus;
using rational = boost::multiprecision::cpp_rational;
using float50 = boost::multiprecision::cpp_bin_float_50;

TEST(ImplicitCatalogue, Sdirk4OrdersExactly) {
    // Hairer & Wanner, Solving ODEs II, §IV.6, Table 6.5 (from memory): order 4, embedded order 3;
    // decided here by the 8 + 4 order conditions in exact rationals.
    const auto r = stepcert::check_order_conditions(tableaus::sdirk4<rational>());
    EXPECT_TRUE(r.exact);
    EXPECT_EQ(r.main.algebraic_order, 4);
    ASSERT_TRUE(r.embedded);
    EXPECT_EQ(r.embedded->algebraic_order, 3);
    EXPECT_TRUE(r.row_sum_mismatches.empty());
    EXPECT_TRUE(stepcert::stiffly_accurate(tableaus::sdirk4<rational>()));
}

TEST(ImplicitCatalogue, StageOrders) {
    // Gauss–Legendre and Radau IIA with s stages satisfy C(s) (Hairer & Wanner II, §IV.5,
    // from memory); an SDIRK method with a_11 = c_1 != 0 has C(1) only (a_11 c_1 != c_1^2/2);
    // an explicit method with c_1 = 0, c_2 != 0 has C(1) only (common practice, no source).
    const double tol = 64 * std::numeric_limits<double>::epsilon();
    EXPECT_EQ(stepcert::stage_order(tableaus::gauss_legendre2<double>(), tol), 2);
    EXPECT_EQ(stepcert::stage_order(tableaus::gauss_legendre3<double>(), tol), 3);
    EXPECT_EQ(stepcert::stage_order(tableaus::radau_iia3<double>(), tol), 3);
    EXPECT_EQ(stepcert::stage_order(tableaus::sdirk4<rational>()), 1);
    EXPECT_EQ(stepcert::stage_order(tableaus::backward_euler<rational>()), 1);
    EXPECT_EQ(stepcert::stage_order(tableaus::implicit_midpoint<rational>()), 1);
    EXPECT_EQ(stepcert::stage_order(tableaus::classic_rk4<rational>()), 1);
    EXPECT_TRUE(stepcert::stiffly_accurate(tableaus::radau_iia3<double>(), tol));
    EXPECT_FALSE(stepcert::stiffly_accurate(tableaus::gauss_legendre2<double>(), tol));
    // The same in 50 digits: the square-root coefficients to 50 digits.
    EXPECT_EQ(stepcert::stage_order(tableaus::radau_iia3<float50>(), float50(1e-45)), 3);
}

// One step on y' = λ y from y = 1 gives R(hλ) (common practice, no source).
template <class Tab>
double one_step_on_dahlquist(const Tab& tab, double z) {
    const auto p = stepcert::make_problem(
        "dahlquist", [z](const std::array<double, 1>& y, std::array<double, 1>& f, double) { f[0] = z * y[0]; },
        std::array<double, 1>{1.0}, 0.0, 1.0);
    return stepcert::run_uniform(p, stepcert::implicit_tableau_method(tab), 1).final_state()[0];
}

TEST(ImplicitStep, OneStepIsThePublishedStabilityFunction) {
    // Backward Euler 1/(1 - z); implicit midpoint (1 + z/2)/(1 - z/2); two-stage Gauss the (2,2)
    // Padé approximant of e^z, (1 + z/2 + z^2/12)/(1 - z/2 + z^2/12); three-stage Radau IIA the
    // (2,3) Padé approximant (1 + 2z/5 + z^2/20)/(1 - 3z/5 + 3z^2/20 - z^3/60) (Hairer & Wanner II,
    // §IV.3 and §IV.5, from memory).
    for (const double z : {-0.5, -3.0, -40.0, -1e4}) {
        const double tol = 64 * std::numeric_limits<double>::epsilon();
        EXPECT_NEAR(one_step_on_dahlquist(tableaus::backward_euler<double>(), z), 1 / (1 - z), tol) << z;
        EXPECT_NEAR(one_step_on_dahlquist(tableaus::implicit_midpoint<double>(), z), (1 + z / 2) / (1 - z / 2), tol) << z;
        EXPECT_NEAR(one_step_on_dahlquist(tableaus::gauss_legendre2<double>(), z),
                    (1 + z / 2 + z * z / 12) / (1 - z / 2 + z * z / 12), tol) << z;
        EXPECT_NEAR(one_step_on_dahlquist(tableaus::radau_iia3<double>(), z),
                    (1 + 2 * z / 5 + z * z / 20) / (1 - 3 * z / 5 + 3 * z * z / 20 - z * z * z / 60), tol) << z;
    }
}

TEST(ImplicitStep, BackwardEulerMatchesOdeintsImplicitEuler) {
    // Outside stepper: Boost.Odeint's implicit_euler (one Newton solve per step with the given
    // Jacobian; exact on a linear system). A stiff 2 x 2 linear system, 20 steps.
    using vec = boost::numeric::ublas::vector<double>;
    using mat = boost::numeric::ublas::matrix<double>;
    const double a = -1000.0, b = 1.0, c = 2.0, d = -3.0;
    auto f = [=](const vec& y, vec& dy, double) {
        dy[0] = a * y[0] + b * y[1];
        dy[1] = c * y[0] + d * y[1];
    };
    auto jac = [=](const vec&, mat& J, double) {
        J(0, 0) = a;
        J(0, 1) = b;
        J(1, 0) = c;
        J(1, 1) = d;
    };
    vec x(2);
    x[0] = 1.0;
    x[1] = 0.5;
    boost::numeric::odeint::implicit_euler<double> stepper;
    const double h = 0.05;
    for (int k = 0; k < 20; ++k) stepper.do_step(std::make_pair(f, jac), x, k * h, h);

    const auto p = stepcert::make_problem(
        "stiff linear pair",
        [=](const std::vector<double>& y, std::vector<double>& dy, double) {
            dy[0] = a * y[0] + b * y[1];
            dy[1] = c * y[0] + d * y[1];
        },
        std::vector<double>{1.0, 0.5}, 0.0, 1.0);
    const auto run = stepcert::run_uniform(p, stepcert::implicit_tableau_method(tableaus::backward_euler<double>()), 20);
    EXPECT_NEAR(run.final_state()[0], x[0], 1e-14 * std::abs(x[0]));
    EXPECT_NEAR(run.final_state()[1], x[1], 1e-14 * std::abs(x[1]));
}

// The t-dependent two-component problem of test_acceptance_orders_time_dependent.cpp
// (manufactured solution g = (1 + sin 2t, exp(-t/5) cos t), common practice, no source).
struct exchanger_rhs {
    template <class S, class Time>
    void operator()(const S& y, S& dydt, const Time& time) const {
        using U = stepcert::scalar_of<S>;
        using std::cos;
        using std::exp;
        using std::sin;
        const U t = static_cast<U>(time);
        const U g0 = 1 + sin(2 * t), g1 = exp(-t / 5) * cos(t);
        const U dg0 = 2 * cos(2 * t), dg1 = -exp(-t / 5) * (cos(t) / 5 + sin(t));
        const U a01 = 1 + sin(t) / 2, a10 = cos(3 * t) / 2;
        dydt[0] = -2 * (y[0] - g0) + a01 * (y[1] - g1) + dg0;
        dydt[1] = a10 * (y[0] - g0) - 3 * (y[1] - g1) + dg1;
    }
};
struct exchanger_exact {
    template <class Time, class S>
    void operator()(const Time& time, S& y) const {
        using U = stepcert::scalar_of<S>;
        using std::cos;
        using std::exp;
        using std::sin;
        const U t = static_cast<U>(time);
        y[0] = 1 + sin(2 * t);
        y[1] = exp(-t / 5) * cos(t);
    }
};
const auto exchanger = stepcert::make_problem("valve-coupled exchanger (manufactured, depends on t)", exchanger_rhs{},
                                              std::vector<double>{1.0, 1.0}, 0.0, 2.0)
                           .with_exact(exchanger_exact{});

template <class T = void, class M>
void expect_design_order(const M& m, stepcert::step_ladder ladder) {
    const auto r = stepcert::order_study<T>(exchanger, m, ladder);
    EXPECT_TRUE(stepcert::testing::converges_at_declared_order(r, 0.2)) << stepcert::study_table(r);
    std::printf("[ figures ] %s on the t-dependent exchanger: fitted %.3f, 95%% CI [%.3f, %.3f] over %zu levels\n",
                std::string(m.name()).c_str(), r.fit.order, r.fit.lower, r.fit.upper, r.fit.points);
}

TEST(ImplicitOrders, DesignOrdersOnATimeDependentProblem) {
    // Design orders as the sources state them (catalogue.hpp), confirmed by the order conditions.
    expect_design_order(stepcert::implicit_tableau_method(tableaus::backward_euler<rational>()), {16, 2.0, 8});
    expect_design_order(stepcert::implicit_tableau_method(tableaus::implicit_midpoint<rational>()), {16, 2.0, 8});
    expect_design_order(stepcert::implicit_tableau_method(tableaus::sdirk4<rational>()), {8, 2.0, 7});
    expect_design_order(stepcert::implicit_tableau_method(tableaus::gauss_legendre2<double>()), {8, 2.0, 7});
    expect_design_order(stepcert::implicit_tableau_method(tableaus::radau_iia3<double>()), {8, 2.0, 6});
}

TEST(ImplicitOrders, SixthOrderGaussAndRadauInFiftyDigits) {
    // In 50 digits the Newton iteration runs to 1e-49 and the range is long.
    expect_design_order<float50>(stepcert::implicit_tableau_method(tableaus::gauss_legendre3<float50>()), {8, 2.0, 6});
    expect_design_order<float50>(stepcert::implicit_tableau_method(tableaus::radau_iia3<float50>()), {8, 2.0, 6});
}

} // namespace test_implicit_rk
