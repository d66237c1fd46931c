// Adams–Bashforth–Moulton<Steps>: observed order equals Steps for Steps = 1..8, in
// cpp_bin_float_50 and (Steps <= 4) in double. Kept apart from test_methods_abm.cpp to keep
// each file's compile time modest.
#include <utility>

#include <gtest/gtest.h>

#include "stepcert/methods/adams_bashforth_moulton.hpp"
#include "stepcert/run/run.hpp"

#include "test_methods_support.hpp"

namespace {
using namespace methods_test;

// Order Steps: global error O(h^Steps) (common practice, no source). Last two local orders of
// three halvings within 0.1. Exact solutions: (cos t, -sin t); Jacobi elliptic functions (rigid
// body, in double only: a linear multistep method's order conditions do not depend on the
// problem, and each extra problem costs compile time in 50 digits).
template <class T, std::size_t Steps, class P>
void expect_abm_order(const P& p, std::size_t n0) {
    const auto& m = stepcert::adams_bashforth_moulton<Steps>;
    const auto orders = observed_orders<T>(p, m, n0, 4);
    for (std::size_t i = 1; i < orders.size(); ++i)
        EXPECT_NEAR(orders[i], static_cast<double>(Steps), 0.1) << m.name() << " on " << p.name() << ", halving " << i + 1;
    EXPECT_EQ(m.order(), static_cast<int>(Steps));
}

template <std::size_t... Steps>
void expect_abm_orders_mp(std::index_sequence<Steps...>) {
    const auto rotation = rotation_problem();
    (expect_abm_order<mp50, Steps + 1>(rotation, 80), ...);
}

TEST(AdamsBashforthMoultonOrder, ObservedOrderEqualsStepsInMultiprecision) {
    expect_abm_orders_mp(std::make_index_sequence<8>{});
}

TEST(AdamsBashforthMoultonOrder, ObservedOrderEqualsStepsInDouble) {
    const auto rotation = rotation_problem();
    const auto body = rigid_body_problem();
    expect_abm_order<double, 1>(rotation, 80);
    expect_abm_order<double, 2>(rotation, 80);
    expect_abm_order<double, 3>(rotation, 80);
    expect_abm_order<double, 4>(rotation, 80);
    expect_abm_order<double, 1>(body, 160);
    expect_abm_order<double, 2>(body, 160);
    expect_abm_order<double, 3>(body, 160);
    expect_abm_order<double, 4>(body, 160);
}

} // namespace
