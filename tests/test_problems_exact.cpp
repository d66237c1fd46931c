// The catalogue's exact solutions: each satisfies its ODE and starts at y0, in double and in
// cpp_bin_float_50, and Kepler's matches its check value. Bad parameters get typed errors.
#include <array>
#include <cmath>
#include <limits>
#include <string>

#include <gtest/gtest.h>

#include "stepcert/problems/catalogue.hpp"
#include "test_problems_support.hpp"

namespace {

namespace pr = stepcert::problems;
using problems_test::eps;
using problems_test::mp;

template <class U>
class ExactSolution : public ::testing::Test {};
using Scalars = ::testing::Types<double, mp>;
TYPED_TEST_SUITE(ExactSolution, Scalars);

/// Largest ode_residual over nine equally spaced times of [t0, t1], in units of the tolerance.
template <class U, class P>
double worst_residual_in_tolerances(const P& p, const U& tau) {
    U worst = 0;
    for (int k = 0; k <= 8; ++k) {
        const U t = U(p.t0()) + (U(p.t1()) - U(p.t0())) * k / 8;
        worst = std::max(worst, problems_test::ode_residual<U>(p, t, tau));
    }
    return static_cast<double>(worst / problems_test::residual_tolerance<U>());
}

// Derived check: d/dt exact(t) = f(exact(t), t) by an eighth-order central difference, to a
// tolerance of 100 eps^(8/9) relative (see test_problems_support.hpp). The problems are built in
// double and their exact solutions and right-hand sides evaluated in TypeParam, which is how the
// reference and study code use them.
TYPED_TEST(ExactSolution, SatisfiesItsOde) {
    using U = TypeParam;
    EXPECT_LE(worst_residual_in_tolerances<U>(pr::dahlquist(-3.0), U(1) / 3), 1.0);
    EXPECT_LE(worst_residual_in_tolerances<U>(pr::dahlquist(-50.0), U(1) / 50), 1.0);
    EXPECT_LE(worst_residual_in_tolerances<U>(pr::dahlquist(2.0, 3.0), U(1) / 2), 1.0);
    EXPECT_LE(worst_residual_in_tolerances<U>(pr::linear_system(), U(1) / 2), 1.0);
    EXPECT_LE(worst_residual_in_tolerances<U>(pr::harmonic_oscillator(2.5), U(2) / 5), 1.0);
    EXPECT_LE(worst_residual_in_tolerances<U>(pr::prothero_robinson(-1000.0), U(1)), 1.0);
    EXPECT_LE(worst_residual_in_tolerances<U>(pr::prothero_robinson(5.0), U(1) / 5), 1.0);
    // Time scale at the pericentre: r_p / v_p = (1 - e)^{3/2} / (1 + e)^{1/2}.
    const auto pericentre_time = [](double e) {
        using std::pow;
        using std::sqrt;
        return U(pow(U(1 - e), U(3) / 2) / sqrt(U(1 + e)));
    };
    for (double e : {0.0, 0.1, 0.5, 0.7, 0.9})
        EXPECT_LE(worst_residual_in_tolerances<U>(pr::kepler(e), pericentre_time(e)), 1.0) << "e = " << e;
    // Long times exercise the reduction of Kepler's equation modulo 2π.
    EXPECT_LE(worst_residual_in_tolerances<U>(pr::kepler(0.9, 1000.0), pericentre_time(0.9)), 1.0);
}

/// max_i |exact(t0)_i - y0_i| for a problem built in U.
template <class P>
auto start_mismatch(const P& p) {
    using U = typename P::scalar_type;
    auto y = p.y0();
    p.exact()(p.t0(), y);
    U worst = 0;
    using std::abs;
    for (std::size_t i = 0; i < y.size(); ++i) worst = std::max(worst, U(abs(y[i] - p.y0()[i])));
    return worst;
}

TYPED_TEST(ExactSolution, StartsAtTheInitialState) {
    using U = TypeParam;
    const U e = eps<U>();
    // exp(0), cos(0), sin(0) are exact, and the linear system's data are integers: equality.
    EXPECT_EQ(start_mismatch(pr::dahlquist<U>(-3)), U(0));
    EXPECT_EQ(start_mismatch(pr::linear_system<U>()), U(0));
    EXPECT_EQ(start_mismatch(pr::harmonic_oscillator<U>(U(5) / 2)), U(0));
    EXPECT_EQ(start_mismatch(pr::prothero_robinson<U>(-1000)), U(0));
    // Kepler: y'(0) = √((1+e)/(1-e)) against √(1-e²)/(1-e), equal up to a few roundings.
    for (int tenths : {0, 1, 5, 9}) {
        const auto p = pr::kepler<U>(U(tenths) / 10);
        EXPECT_LE(start_mismatch(p), 8 * e * p.y0()[3]) << "e = " << tenths << "/10";
    }
}

// Check value from reference-values §2, derived by us from the exact solution (Kepler's
// equation), for the problem of Hull, Enright, Fellen, Sedgwick, SIAM J. Numer. Anal. 9 (1972)
// 603-637, class D (definitions partly from memory): e = 0.5, t = 20. The values carry 15
// decimals (rounding 5e-16); in double, cos E and sin E of E near 20 lose about 20 eps more.
TYPED_TEST(ExactSolution, KeplerMatchesItsCheckValue) {
    using U = TypeParam;
    const auto p = pr::kepler(0.5);
    std::array<U, 4> y{};
    p.exact()(U(20), y);
    const double tol = 6e-16 + 200 * static_cast<double>(eps<U>());
    EXPECT_NEAR(static_cast<double>(y[0]), -0.578043295303536, tol);
    EXPECT_NEAR(static_cast<double>(y[1]), 0.863384000919419, tol);
    // Energy v²/2 - 1/r = -1/2 for every e (semi-major axis 1; fact of the trade, common
    // practice, no source): a check on the velocities, which the check value does not cover.
    using std::sqrt;
    const U energy = (y[2] * y[2] + y[3] * y[3]) / 2 - 1 / sqrt(y[0] * y[0] + y[1] * y[1]);
    EXPECT_LE(static_cast<double>(abs(energy + U(1) / 2)), 100 * static_cast<double>(eps<U>()));
}

// The residual check can fail: Kepler's exact solution computed in double and rounded up to
// cpp_bin_float_50 misses the ODE by about 1e-16, far above the multiprecision tolerance.
TEST(ExactSolutionCheck, RejectsASolutionAccurateOnlyToDouble) {
    const auto p = pr::kepler(0.5);
    const auto double_accurate = [](auto t, auto& y) {
        std::array<double, 4> yd{};
        pr::kepler_exact<double>{0.5}(static_cast<double>(t), yd);
        for (std::size_t i = 0; i < 4; ++i) y[i] = yd[i];
    };
    const auto wrong = p.with_exact(double_accurate);
    const mp r = problems_test::ode_residual<mp>(wrong, mp(7), mp(1) / 2);
    EXPECT_GT(r, 1e6 * problems_test::residual_tolerance<mp>());
    EXPECT_LE(problems_test::ode_residual<mp>(p, mp(7), mp(1) / 2), problems_test::residual_tolerance<mp>());
}

TEST(Catalogue, DeclaresSeparabilityAndShapes) {
    EXPECT_TRUE(pr::harmonic_oscillator().separable());
    EXPECT_TRUE(pr::kepler(0.3).separable());
    EXPECT_TRUE(pr::small_satellite().separable());
    EXPECT_FALSE(pr::dahlquist(-1.0).separable());
    EXPECT_FALSE(pr::arenstorf_orbit().separable());
    EXPECT_FALSE(pr::suspension_rig().separable());
    EXPECT_EQ(pr::linear_system().dimension(), 3u);
    EXPECT_EQ(pr::small_satellite().dimension(), 6u);
    EXPECT_DOUBLE_EQ(pr::kepler(0.3).t1(), 20.0);
    EXPECT_DOUBLE_EQ(pr::dahlquist(-1.0).t1(), 1.0);
    EXPECT_EQ(pr::kepler(0.5).name(), "kepler(e=0.5)");
}

TEST(Catalogue, RejectsBadParameters) {
    const double nan = std::numeric_limits<double>::quiet_NaN();
    EXPECT_THROW((void)pr::kepler(1.0), stepcert::invalid_input);
    EXPECT_THROW((void)pr::kepler(-0.1), stepcert::invalid_input);
    EXPECT_THROW((void)pr::kepler(nan), stepcert::non_finite_value);
    EXPECT_THROW((void)pr::harmonic_oscillator(0.0), stepcert::invalid_input);
    EXPECT_THROW((void)pr::dahlquist(nan), stepcert::non_finite_value);
    EXPECT_THROW((void)pr::prothero_robinson(-1.0, 0.0), stepcert::invalid_input);  // t1 <= t0
    EXPECT_THROW((void)pr::dahlquist(-1.0, -2.0), stepcert::invalid_input);
    stepcert::problems::suspension_data bad;
    bad.unsprung_mass_kg = 0;
    EXPECT_THROW((void)pr::suspension_rig(3.0, bad), stepcert::invalid_input);
    try {
        (void)pr::kepler(1.5);
        FAIL() << "expected invalid_input";
    } catch (const stepcert::invalid_input& e) {
        EXPECT_NE(std::string(e.what()).find("0 <= e < 1"), std::string::npos) << e.what();
    }
}

} // namespace
