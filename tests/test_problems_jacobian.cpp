// The catalogue's Jacobians agree with central differences of the right-hand sides, in double
// and in cpp_bin_float_50, and write into an Eigen matrix as well as into a plain one.
// Check basis: derived — an 8th-order central difference of the right-hand side (exact Taylor
// coefficients of the difference formula), tolerance 100·eps^(8/9); no published values are used.
#include <array>
#include <cmath>

#include <Eigen/Dense>
#include <gtest/gtest.h>

#include "stepcert/problems/catalogue.hpp"
#include "test_problems_support.hpp"

namespace {

namespace pr = stepcert::problems;
using problems_test::mp;

template <class U>
class Jacobian : public ::testing::Test {};
using Scalars = ::testing::Types<double, mp>;
TYPED_TEST_SUITE(Jacobian, Scalars);

/// Expects the mismatch below 100 eps^(8/9): the central difference's own error (derived, see
/// test_problems_support.hpp), with yscale the distance over which f changes.
template <class U, std::size_t N, class P>
void expect_jacobian_matches(const char* where, const P& p, const std::array<U, N>& y, const U& t,
                             const U& yscale) {
    const U mismatch = problems_test::jacobian_mismatch<U, N>(p, y, t, yscale);
    EXPECT_LE(mismatch, problems_test::residual_tolerance<U>())
        << p.name() << " at " << where << ": mismatch " << static_cast<double>(mismatch) << " = "
        << static_cast<double>(mismatch / problems_test::residual_tolerance<U>()) << " tolerances";
}

TYPED_TEST(Jacobian, AgreesWithDifferencesOfTheRhs) {
    using U = TypeParam;
    const U t = U(7) / 10;
    using A1 = std::array<U, 1>;
    using A2 = std::array<U, 2>;
    using A3 = std::array<U, 3>;
    using A4 = std::array<U, 4>;
    expect_jacobian_matches("y = 2/3", pr::dahlquist(-3.0), A1{U(2) / 3}, t, U(1));
    expect_jacobian_matches("y = 1/3", pr::prothero_robinson(-1000.0), A1{U(1) / 3}, t, U(1));
    expect_jacobian_matches("(1/3, -2)", pr::harmonic_oscillator(2.5), A2{U(1) / 3, U(-2)}, t, U(1));
    expect_jacobian_matches("(1, -2, 5/7)", pr::linear_system(), A3{U(1), U(-2), U(5) / 7}, t, U(1));
    const auto kep = pr::kepler(0.5);
    expect_jacobian_matches("pericentre", kep, A4{U(1) / 2, U(0), U(0), U(173) / 100}, t, U(1) / 10);
    expect_jacobian_matches("off axis", kep, A4{U(-3) / 5, U(4) / 5, U(-1) / 2, U(-1) / 3}, t, U(1) / 10);
    const auto aren = pr::arenstorf_orbit();
    // At the start the orbit is 0.0063 from the Moon, so f varies on that scale.
    expect_jacobian_matches("y0", aren, pr::arenstorf_initial_state<U>(), t, U(1) / 1000);
    expect_jacobian_matches("far side", aren, A4{U(-1) / 2, U(7) / 10, U(1) / 3, U(-1)}, t, U(1) / 10);
    const auto rig = pr::suspension_rig();
    // Relative speeds at the edge of and inside the damper's tanh blend (v_smooth = 0.3 m/s).
    expect_jacobian_matches("rebound", rig, A4{U(2) / 100, U(-1) / 100, U(3) / 10, U(-1) / 2}, t, U(1) / 100);
    expect_jacobian_matches("blend", rig, A4{U(-3) / 100, U(1) / 100, U(-1) / 100, U(1) / 100}, U(1) / 2,
                            U(1) / 100);
}

// The same entries arrive in an Eigen matrix (double) as in the plain multiprecision one.
TEST(JacobianSink, EigenMatrixGetsTheSameEntries) {
    const auto rig = pr::suspension_rig();
    const std::array<double, 4> y{0.02, -0.01, 0.3, -0.5};
    Eigen::Matrix4d J = Eigen::Matrix4d::Constant(99.0);  // every entry must be overwritten
    rig.jacobian()(y, 0.5, J);
    problems_test::small_matrix<mp, 4> Jm;
    const std::array<mp, 4> ym{mp(y[0]), mp(y[1]), mp(y[2]), mp(y[3])};
    rig.jacobian()(ym, mp("0.5"), Jm);
    for (int i = 0; i < 4; ++i)
        for (int j = 0; j < 4; ++j)
            EXPECT_NEAR(J(i, j), static_cast<double>(Jm(i, j)), 1e-13 * (1 + std::abs(J(i, j)))) << i << "," << j;
}

} // namespace
