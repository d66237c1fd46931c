// Every method through the umbrella header, with std::array and std::vector states in double:
// concepts satisfied, names distinct, a short run accurate against the exact solution.
#include <array>
#include <set>
#include <string>
#include <vector>

#include <gtest/gtest.h>

#include "stepcert/stepcert.hpp"

#include "test_methods_support.hpp"

namespace {
using namespace methods_test;

template <class P, class M>
void expect_accurate_uniform(const P& p, const M& m, std::size_t n, double bound) {
    using S = typename P::state_type;
    const auto run = stepcert::run_uniform(p, m, n);
    S exact = p.y0();
    p.exact()(p.t1(), exact);
    EXPECT_LT(max_distance(run.final_state(), exact), bound) << m.name() << " on " << p.name();
    EXPECT_EQ(run.stats.steps, n) << m.name();
}

template <class P, class M>
void expect_accurate_adaptive(const P& p, const M& m) {
    using S = typename P::state_type;
    const auto run = stepcert::run_adaptive(p, m, {1e-10, 1e-10}, {0.5, 1.0, 2.0});
    ASSERT_EQ(run.times.size(), 4u) << m.name();
    S exact = p.y0();
    p.exact()(2.0, exact);
    EXPECT_LT(max_distance(run.final_state(), exact), 1e-7) << m.name() << " on " << p.name();
    EXPECT_GT(run.stats.steps, 0u) << m.name();
}

template <class S>
void run_every_method() {
    // Exact solution (cos t, -sin t) on [0, 2].
    const auto p = rotation_problem<S>();
    expect_accurate_uniform(p, stepcert::explicit_euler, 2000, 2e-3);
    expect_accurate_uniform(p, stepcert::explicit_midpoint, 200, 1e-4);
    expect_accurate_uniform(p, stepcert::classic_rk4, 50, 1e-6);
    expect_accurate_uniform(p, stepcert::cash_karp54, 20, 1e-6);
    expect_accurate_uniform(p, stepcert::dormand_prince54, 20, 1e-6);
    expect_accurate_uniform(p, stepcert::fehlberg78, 10, 1e-7);
    expect_accurate_uniform(p, stepcert::adams_bashforth_moulton<4>, 100, 1e-6);
    expect_accurate_uniform(p.as_separable(), stepcert::symplectic_rkn, 50, 1e-6);
    const auto heun = stepcert::one_step_method("Heun", 2, [](auto& rhs, auto& y, auto t, auto h) {
        auto k1 = y, k2 = y, z = y;
        rhs(y, k1, t);
        for (std::size_t i = 0; i < y.size(); ++i) z[i] = y[i] + h * k1[i];
        rhs(z, k2, t + h);
        for (std::size_t i = 0; i < y.size(); ++i) y[i] += h / 2 * (k1[i] + k2[i]);
    });
    expect_accurate_uniform(p, heun, 200, 2e-4);
    expect_accurate_adaptive(p, stepcert::cash_karp54_adaptive);
    expect_accurate_adaptive(p, stepcert::dormand_prince54_adaptive);
    expect_accurate_adaptive(p, stepcert::fehlberg78_adaptive);
    expect_accurate_adaptive(p, stepcert::bulirsch_stoer_adaptive);
}

TEST(AllMethods, RunWithArrayStates) { run_every_method<std::array<double, 2>>(); }

TEST(AllMethods, RunWithVectorStates) { run_every_method<std::vector<double>>(); }

// A wrapper rebuilt on another odeint algebra (range_algebra instead of array_algebra for
// std::array): same method, same results to round-off.
template <class S>
using rk4_on_range_algebra = stepcert::odeint_stepper::rk4<S, boost::numeric::odeint::range_algebra>;
template <class S>
using controlled_ck_on_range_algebra = stepcert::odeint_stepper::cash_karp54<S, boost::numeric::odeint::range_algebra>;

TEST(AllMethods, WrappersAcceptAnotherOdeintAlgebra) {
    const auto p = rotation_problem<std::array<double, 2>>();
    const stepcert::odeint_fixed_step<rk4_on_range_algebra> rk4_range{"classic RK4 (range algebra)", 4};
    const auto a = stepcert::run_uniform(p, rk4_range, 40);
    const auto b = stepcert::run_uniform(p, stepcert::classic_rk4, 40);
    EXPECT_LE(max_distance(a.final_state(), b.final_state()), 4 * eps<double>());
    EXPECT_EQ(a.stats.evaluations, b.stats.evaluations);
    const stepcert::odeint_controlled<stepcert::odeint_rk_controller<controlled_ck_on_range_algebra, 5>> ck_range{
        "Cash-Karp 5(4) adaptive (range algebra)", 5};
    const auto c = stepcert::run_adaptive(p, ck_range, {1e-9, 1e-9});
    const auto d = stepcert::run_adaptive(p, stepcert::cash_karp54_adaptive, {1e-9, 1e-9});
    EXPECT_LE(max_distance(c.final_state(), d.final_state()), 16 * eps<double>());
    EXPECT_EQ(c.stats.steps, d.stats.steps);
}

TEST(AllMethods, SatisfyTheirConceptsAndHaveDistinctNames) {
    static_assert(stepcert::fixed_step_method<decltype(stepcert::explicit_euler)>);
    static_assert(stepcert::fixed_step_method<decltype(stepcert::symplectic_rkn)>);
    static_assert(stepcert::adaptive_method<decltype(stepcert::bulirsch_stoer_adaptive)>);
    static_assert(stepcert::method<decltype(stepcert::dormand_prince54_adaptive)>);
    static_assert(!stepcert::method<int>);
    const std::vector<std::string> names{
        std::string(stepcert::explicit_euler.name()),      std::string(stepcert::explicit_midpoint.name()),
        std::string(stepcert::classic_rk4.name()),         std::string(stepcert::cash_karp54.name()),
        std::string(stepcert::dormand_prince54.name()),    std::string(stepcert::fehlberg78.name()),
        std::string(stepcert::cash_karp54_adaptive.name()), std::string(stepcert::dormand_prince54_adaptive.name()),
        std::string(stepcert::fehlberg78_adaptive.name()), std::string(stepcert::bulirsch_stoer_adaptive.name()),
        std::string(stepcert::adams_bashforth_moulton<3>.name()), std::string(stepcert::symplectic_rkn.name())};
    EXPECT_EQ(std::set<std::string>(names.begin(), names.end()).size(), names.size());
    EXPECT_EQ(stepcert::adams_bashforth_moulton<3>.name(), "Adams-Bashforth-Moulton 3");
}

} // namespace
