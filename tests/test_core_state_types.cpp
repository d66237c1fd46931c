// State types: make_problem, the run drivers, multiprecision references, order studies and
// certificates take std::vector<double>, std::array<double, N>, Eigen::VectorXd,
// Eigen::Matrix<double, N, 1> and boost::numeric::ublas::vector<double> alike, with the same
// numbers. Outside references: the exact solution of a damped two-mass chain (derived below) and
// Boost.Odeint's runge_kutta4 and runge_kutta_dopri5 run directly on each state type
// (K. Ahnert, M. Mulansky, "Odeint - Solving ordinary differential equations in C++",
// AIP Conf. Proc. 1389 (2011) 1586; from memory).
#include <algorithm>
#include <array>
#include <cmath>
#include <cstddef>
#include <limits>
#include <string>
#include <type_traits>
#include <vector>

#include <gtest/gtest.h>

#include <boost/numeric/odeint/integrate/integrate_times.hpp>
#include <boost/numeric/odeint/stepper/generation.hpp>
#include <boost/numeric/odeint/stepper/runge_kutta4.hpp>
#include <boost/numeric/odeint/stepper/runge_kutta_dopri5.hpp>

#include "stepcert/core/state_eigen.hpp"
#include "stepcert/core/state_ublas.hpp"

#include "stepcert/certify/certify_fixed_step.hpp"
#include "stepcert/certify/certify_step_count.hpp"
#include "stepcert/certify/check_certificate.hpp"
#include "stepcert/core/problem.hpp"
#include "stepcert/methods/adams_bashforth_moulton.hpp"
#include "stepcert/methods/adaptive_tableau_method.hpp"
#include "stepcert/methods/bulirsch_stoer.hpp"
#include "stepcert/methods/cash_karp54.hpp"
#include "stepcert/methods/classic_rk4.hpp"
#include "stepcert/methods/dormand_prince54.hpp"
#include "stepcert/methods/explicit_euler.hpp"
#include "stepcert/methods/explicit_midpoint.hpp"
#include "stepcert/methods/fehlberg78.hpp"
#include "stepcert/methods/odeint_types.hpp"
#include "stepcert/methods/tableau_method.hpp"
#include "stepcert/reference/multiprecision_types.hpp"
#include "stepcert/reference/reference_solution.hpp"
#include "stepcert/run/run.hpp"
#include "stepcert/study/order_study.hpp"
#include "stepcert/tableau/catalogue.hpp"

namespace test_core_state_types {

using stepcert::cpp_bin_float_38;
using stepcert::cpp_bin_float_50;

// A damped two-mass chain (invented): unit masses between two walls, wall springs k = 101/100,
// a coupling spring kc = 3/2 between the masses, damping c = 1/5 on each; y = (x1, x2, v1, v2),
//   x1'' = -k x1 - kc (x1 - x2) - c x1',   x2'' = -k x2 - kc (x2 - x1) - c x2'.
// Exact solution (derived): the mean s = (x1 + x2)/2 and the half-difference d = (x1 - x2)/2
// decouple into u'' + c u' + w0^2 u = 0 with w0^2 = k for s and k + 2 kc for d; both are
// underdamped with decay sigma = c/2 = 1/10 and frequencies w = sqrt(w0^2 - sigma^2) = 1 and 2.
// From x1 = 1, x2 = 0 at rest (u(0) = 1/2, u'(0) = 0):
//   u(t) = u(0) e^{-sigma t} (cos wt + (sigma/w) sin wt),  u'(t) = -u(0) e^{-sigma t} (w + sigma^2/w) sin wt,
// and x1 = s + d, x2 = s - d, v1 = s' + d', v2 = s' - d'.
struct chain_rhs {
    template <class S, class T>
    void operator()(const S& y, S& dydt, T) const {
        using R = stepcert::scalar_of<S>;
        const R k = R(101) / 100, kc = R(3) / 2, c = R(1) / 5;
        dydt[0] = y[2];
        dydt[1] = y[3];
        dydt[2] = -k * y[0] - kc * (y[0] - y[1]) - c * y[2];
        dydt[3] = -k * y[1] - kc * (y[1] - y[0]) - c * y[3];
    }
};

struct chain_exact {
    template <class T, class S>
    void operator()(const T& time, S& y) const {
        using R = stepcert::scalar_of<S>;
        using std::cos;
        using std::exp;
        using std::sin;
        const R t = static_cast<R>(time);
        const R sigma = R(1) / 10;
        const R e = exp(-sigma * t) / 2;
        const R s = e * (cos(t) + sigma * sin(t));
        const R ds = -e * (1 + sigma * sigma) * sin(t);
        const R d = e * (cos(2 * t) + sigma / 2 * sin(2 * t));
        const R dd = -e * (2 + sigma * sigma / 2) * sin(2 * t);
        y[0] = s + d;
        y[1] = s - d;
        y[2] = ds + dd;
        y[3] = ds - dd;
    }
};

constexpr double t_end = 8.0;
constexpr std::size_t grid = 8;  // output times of runs and certificates

template <class S>
S initial_state() {
    S y0 = stepcert::state_traits<S>::make(4);
    y0[0] = 1.0;
    y0[1] = 0.0;
    y0[2] = 0.0;
    y0[3] = 0.0;
    return y0;
}

template <class S>
auto chain() {
    return stepcert::make_problem("damped two-mass chain", chain_rhs{}, initial_state<S>(), 0.0, t_end).with_exact(chain_exact{});
}

/// The exact solution at t in 50 digits.
template <class T>
std::vector<cpp_bin_float_50> exact_at(const T& t) {
    std::vector<cpp_bin_float_50> y(4);
    chain_exact{}(static_cast<cpp_bin_float_50>(t), y);
    return y;
}

/// max_i |a_i - b_i|, taken in the wider scalar type.
template <class A, class B>
double largest_difference(const A& a, const B& b) {
    using W = stepcert::wider_scalar_t<stepcert::scalar_of<A>, stepcert::scalar_of<B>>;
    EXPECT_EQ(stepcert::state_size(a), stepcert::state_size(b));
    double worst = 0.0;
    for (std::size_t i = 0; i < stepcert::state_size(a); ++i) {
        using std::abs;
        const W d = abs(static_cast<W>(a[i]) - static_cast<W>(b[i]));
        worst = std::max(worst, static_cast<double>(d));
    }
    return worst;
}

/// Runs of two state types agree to this (the arithmetic is the same element by element; a few
/// units of round-off of order-1 values are allowed, common practice, no source).
template <class T>
double round_off() {
    return 16 * static_cast<double>(std::numeric_limits<T>::epsilon());
}

const stepcert::weighted_norm tolerance{1e-6, 0.0, stepcert::norm_kind::max};

/// The certificate of the std::vector<double> state, made once: the one every type must match.
const stepcert::step_certificate& vector_certificate() {
    static const stepcert::step_certificate c = stepcert::certify(chain<std::vector<double>>(), stepcert::classic_rk4, tolerance);
    return c;
}

template <class S>
class StateTypeCertify : public ::testing::Test {};

/// The state types odeint must resize its scratch states for (run-time size, not std::vector).
template <class S>
class RuntimeSizeStateSteps : public ::testing::Test {};

using RuntimeSizeStates = ::testing::Types<Eigen::VectorXd, boost::numeric::ublas::vector<double>>;

/// The final state and cost of a fixed-step run of m on S match those on std::vector<double>.
template <class S, class M>
void expect_fixed_step_match(const M& m, std::size_t n) {
    const auto run = stepcert::run_uniform(chain<S>(), m, n, n / grid);
    const auto run_v = stepcert::run_uniform(chain<std::vector<double>>(), m, n, n / grid);
    EXPECT_EQ(run.stats.evaluations, run_v.stats.evaluations) << m.name();
    EXPECT_LE(largest_difference(run.final_state(), run_v.final_state()), round_off<double>()) << m.name();
}

/// The same for an adaptive run, with its accepted and rejected steps.
template <class S, class M>
void expect_adaptive_match(const M& m) {
    const stepcert::controller_tolerance ctol{1e-8, 1e-8};
    const auto run = stepcert::run_adaptive(chain<S>(), m, ctol);
    const auto run_v = stepcert::run_adaptive(chain<std::vector<double>>(), m, ctol);
    EXPECT_EQ(run.stats.steps, run_v.stats.steps) << m.name();
    EXPECT_EQ(run.stats.rejected, run_v.stats.rejected) << m.name();
    EXPECT_EQ(run.stats.evaluations, run_v.stats.evaluations) << m.name();
    EXPECT_LE(largest_difference(run.final_state(), run_v.final_state()), round_off<double>()) << m.name();
}

using StateTypes = ::testing::Types<std::vector<double>, std::array<double, 4>, Eigen::VectorXd, Eigen::Matrix<double, 4, 1>,
                                    boost::numeric::ublas::vector<double>>;

struct state_type_names {
    template <class S>
    static std::string GetName(int) {
        if constexpr (std::is_same_v<S, std::vector<double>>) return "StdVector";
        else if constexpr (std::is_same_v<S, std::array<double, 4>>) return "StdArray4";
        else if constexpr (std::is_same_v<S, Eigen::VectorXd>) return "EigenVectorXd";
        else if constexpr (std::is_same_v<S, Eigen::Matrix<double, 4, 1>>) return "EigenVector4d";
        else return "UblasVector";
    }
};

} // namespace test_core_state_types

using namespace test_core_state_types;

TYPED_TEST_SUITE(StateTypeCertify, StateTypes, state_type_names);
TYPED_TEST_SUITE(RuntimeSizeStateSteps, RuntimeSizeStates, state_type_names);

TEST(StateTypeChain, ExactSolutionSatisfiesTheEquation) {
    // Central difference of the exact solution in 50 digits (truncation ~ delta^2 |y'''| ~ 1e-24)
    // against the right-hand side at the same point: the derivation above is checked.
    const cpp_bin_float_50 delta("1e-12");
    for (const char* time : {"0", "0.7", "3.25", "8"}) {
        const cpp_bin_float_50 t(time);
        const auto plus = exact_at(t + delta), minus = exact_at(t - delta), y = exact_at(t);
        std::vector<cpp_bin_float_50> f(4);
        chain_rhs{}(y, f, t);
        for (std::size_t i = 0; i < 4; ++i)
            EXPECT_LT(static_cast<double>(abs((plus[i] - minus[i]) / (2 * delta) - f[i])), 1e-20) << "t = " << time << ", i = " << i;
    }
    const auto y0 = exact_at(0.0);
    EXPECT_EQ(y0[0], 1);
    EXPECT_EQ(y0[1], 0);
    EXPECT_EQ(y0[2], 0);
    EXPECT_EQ(y0[3], 0);
}

TEST(StateTypeChain, OdeintStepsEigenAndUblasOnItsOwnAlgebraWithResizing) {
    // What state_eigen.hpp / state_ublas.hpp give odeint: its vector_space_algebra, and scratch
    // states that odeint resizes on the first step (a run-time-size state it does not know as
    // resizable would be stepped with empty scratch states).
    namespace odeint = boost::numeric::odeint;
    static_assert(std::is_same_v<stepcert::odeint_stepper::default_algebra<Eigen::VectorXd>, odeint::vector_space_algebra>);
    static_assert(std::is_same_v<stepcert::odeint_stepper::default_algebra<boost::numeric::ublas::vector<double>>,
                                 odeint::vector_space_algebra>);
    static_assert(odeint::is_resizeable<Eigen::VectorXd>::value);
    static_assert(odeint::is_resizeable<Eigen::Matrix<cpp_bin_float_38, Eigen::Dynamic, 1>>::value);
    static_assert(odeint::is_resizeable<boost::numeric::ublas::vector<double>>::value);
    static_assert(odeint::is_resizeable<boost::numeric::ublas::vector<cpp_bin_float_38>>::value);
    static_assert(std::is_same_v<stepcert::rebind_state<Eigen::Vector4d, cpp_bin_float_38>, Eigen::Matrix<cpp_bin_float_38, 4, 1>>);
    static_assert(std::is_same_v<stepcert::rebind_state<boost::numeric::ublas::vector<double>, cpp_bin_float_38>,
                                 boost::numeric::ublas::vector<cpp_bin_float_38>>);
    // Not states: each stops make_problem with its own message (tests/compile_fail/ checks them).
    static_assert(!stepcert::state<Eigen::RowVectorXd>);
    static_assert(!stepcert::state<Eigen::MatrixXd>);
    static_assert(!stepcert::state<Eigen::VectorXi>);
    static_assert(!stepcert::state<Eigen::ArrayXd>);
    static_assert(!stepcert::state<std::vector<int>>);
    static_assert(!stepcert::state<boost::numeric::ublas::vector<int>>);
    const auto fresh = stepcert::state_traits<Eigen::VectorXd>::make(3);
    ASSERT_EQ(fresh.size(), 3);
    EXPECT_EQ(fresh.maxCoeff(), 0.0);
    EXPECT_EQ(fresh.minCoeff(), 0.0);
}

TYPED_TEST(StateTypeCertify, CertifiesTheSameStepAsStdVectorAndMeetsTheToleranceAgainstTheExactSolution) {
    using S = TypeParam;
    const auto p = chain<S>();
    const auto& m = stepcert::classic_rk4;
    const stepcert::step_certificate c = stepcert::certify(p, m, tolerance);
    ASSERT_TRUE(c.issued()) << c.reason_detail;
    EXPECT_EQ(c.level, stepcert::evidence_level::reference_verified) << c.basis;
    EXPECT_EQ(c.dimension, 4u);
    const stepcert::step_certificate& v = vector_certificate();
    ASSERT_TRUE(v.issued()) << v.reason_detail;
    EXPECT_EQ(c.steps, v.steps);
    EXPECT_EQ(c.evaluations, v.evaluations);
    EXPECT_NEAR(c.reference_error, v.reference_error, 1e-9);
    EXPECT_EQ(c.basis, v.basis);

    // The certified step run again and judged against the exact solution (not the certificate's
    // own measure): the tolerance is met at every output time.
    const auto run = stepcert::run_uniform(p, m, c.steps, c.steps / grid);
    ASSERT_EQ(run.states.size(), grid + 1);
    for (std::size_t j = 1; j < run.states.size(); ++j) {
        const auto y = exact_at(run.times[j]);
        EXPECT_LE(tolerance(run.states[j], y), 1.0) << "t = " << run.times[j];
    }

    // The same step judged as given, and the certificate checked again.
    const auto judged = stepcert::certify_step_count(p, m, c.steps, tolerance);
    EXPECT_TRUE(judged.issued()) << judged.reason_detail;
    const auto check = stepcert::check_certificate(c, p, m);
    EXPECT_TRUE(check.holds) << check.why;
}

TYPED_TEST(StateTypeCertify, RunsMatchStdVectorAndOdeintOnTheSameStateType) {
    using S = TypeParam;
    namespace odeint = boost::numeric::odeint;
    const auto p = chain<S>();
    const auto pv = chain<std::vector<double>>();
    const double eps16 = round_off<double>();

    // Fixed step: stepcert's classic RK4 against odeint's runge_kutta4 stepped by hand on S.
    const std::size_t n = 64;
    const auto run = stepcert::run_uniform(p, stepcert::classic_rk4, n, n / grid);
    static_assert(std::is_same_v<typename decltype(run)::state_type, S>);
    const auto run_v = stepcert::run_uniform(pv, stepcert::classic_rk4, n, n / grid);
    ASSERT_EQ(run.states.size(), grid + 1);
    for (std::size_t j = 0; j < run.states.size(); ++j) EXPECT_LE(largest_difference(run.states[j], run_v.states[j]), eps16);
    odeint::runge_kutta4<S> rk4;
    S y = initial_state<S>();
    const double h = t_end / static_cast<double>(n);
    for (std::size_t k = 0; k < n; ++k) rk4.do_step(chain_rhs{}, y, static_cast<double>(k) * h, h);
    EXPECT_LE(largest_difference(run.final_state(), y), eps16);
    EXPECT_EQ(run.stats.evaluations, 4 * n);

    // Adaptive: Dormand-Prince 5(4) with dense output against odeint's dense-output dopri5 on S.
    std::vector<double> times;
    for (std::size_t j = 1; j <= grid; ++j) times.push_back(t_end * static_cast<double>(j) / grid);
    const stepcert::controller_tolerance ctol{1e-9, 1e-9};
    const auto adaptive = stepcert::run_adaptive(p, stepcert::dormand_prince54_adaptive, ctol, times);
    const auto adaptive_v = stepcert::run_adaptive(pv, stepcert::dormand_prince54_adaptive, ctol, times);
    EXPECT_EQ(adaptive.stats.steps, adaptive_v.stats.steps);
    EXPECT_EQ(adaptive.stats.rejected, adaptive_v.stats.rejected);
    EXPECT_EQ(adaptive.stats.evaluations, adaptive_v.stats.evaluations);
    for (std::size_t j = 0; j < adaptive.states.size(); ++j)
        EXPECT_LE(largest_difference(adaptive.states[j], adaptive_v.states[j]), eps16);
    std::vector<S> odeint_states;
    std::vector<double> all_times{0.0};
    all_times.insert(all_times.end(), times.begin(), times.end());
    S ya = initial_state<S>();
    // make_dense_output copies a default-constructed stepper whose scratch states are not yet
    // written; for fixed-size Eigen vectors g++ 12 then warns (maybe-uninitialized), as in
    // methods/odeint_dense_output.hpp. The scratch is written before it is read.
#if defined(__GNUC__) && !defined(__clang__)
#pragma GCC diagnostic push
#pragma GCC diagnostic ignored "-Wmaybe-uninitialized"
#endif
    auto dense = odeint::make_dense_output(1e-9, 1e-9, odeint::runge_kutta_dopri5<S>());
#if defined(__GNUC__) && !defined(__clang__)
#pragma GCC diagnostic pop
#endif
    odeint::integrate_times(dense, chain_rhs{}, ya, all_times.begin(), all_times.end(), 0.01,
                            [&](const S& x, double) { odeint_states.push_back(x); });
    ASSERT_EQ(odeint_states.size(), adaptive.states.size());
    // Different step-size choices (stepcert picks its own first step), so agreement to the
    // tolerance, not to round-off; both are also checked against the exact solution.
    for (std::size_t j = 1; j < adaptive.states.size(); ++j) {
        const auto exact = exact_at(adaptive.times[j]);
        EXPECT_LT(largest_difference(adaptive.states[j], exact), 1e-7) << "t = " << adaptive.times[j];
        EXPECT_LT(largest_difference(odeint_states[j], exact), 1e-7) << "t = " << adaptive.times[j];
    }

    // A given non-uniform grid.
    const std::vector<double> uneven{0.0, 0.5, 1.25, 2.0, 3.5, 5.0, 6.0, 7.25, 8.0};
    const auto on_grid = stepcert::run_on_grid(p, stepcert::classic_rk4, uneven);
    const auto on_grid_v = stepcert::run_on_grid(pv, stepcert::classic_rk4, uneven);
    ASSERT_EQ(on_grid.states.size(), uneven.size());
    for (std::size_t j = 0; j < uneven.size(); ++j) EXPECT_LE(largest_difference(on_grid.states[j], on_grid_v.states[j]), eps16);
}

TYPED_TEST(StateTypeCertify, RunsAndReferencesInMultiprecisionRebindTheState) {
    using S = TypeParam;
    using R = stepcert::rebind_state<S, cpp_bin_float_38>;
    const auto p = chain<S>();
    const auto pv = chain<std::vector<double>>();

    const std::size_t n = 64;
    const auto run = stepcert::run_uniform<cpp_bin_float_38>(p, stepcert::classic_rk4, n, n / grid);
    static_assert(std::is_same_v<typename decltype(run)::state_type, R>);
    const auto run_v = stepcert::run_uniform<cpp_bin_float_38>(pv, stepcert::classic_rk4, n, n / grid);
    for (std::size_t j = 0; j < run.states.size(); ++j)
        EXPECT_LE(largest_difference(run.states[j], run_v.states[j]), round_off<cpp_bin_float_38>());

    // The reference in cpp_bin_float_38 (its check in a narrower type), against the exact solution.
    const int digits = 20;
    const auto ref = stepcert::reference_solution(p, digits, stepcert::uniform_times{grid});
    static_assert(std::is_same_v<typename decltype(ref)::state_type, R>);
    ASSERT_TRUE(ref.vouches_requested()) << ref.how;
    ASSERT_EQ(ref.states.size(), grid);
    for (std::size_t j = 0; j < grid; ++j) {
        // vouched digits are relative to the state's largest component at that time (agreement.hpp)
        const auto exact = exact_at(ref.times[j]);
        double scale = 0.0;
        for (const auto& x : exact) scale = std::max(scale, std::abs(static_cast<double>(x)));
        EXPECT_LE(largest_difference(ref.states[j], exact), std::pow(10.0, -digits) * scale) << "t = " << ref.times[j];
    }
    const auto ref_v = stepcert::reference_solution(pv, digits, stepcert::uniform_times{grid});
    EXPECT_EQ(ref.cost.evaluations, ref_v.cost.evaluations);
    for (std::size_t j = 0; j < grid; ++j)
        EXPECT_LE(largest_difference(ref.states[j], ref_v.states[j]), round_off<cpp_bin_float_38>());
}

TYPED_TEST(StateTypeCertify, OrderStudyObservesTheSameOrder) {
    using S = TypeParam;
    const stepcert::step_ladder ladder{32, 2.0, 5};
    const auto study = stepcert::order_study(chain<S>(), stepcert::classic_rk4, ladder);
    const auto study_v = stepcert::order_study(chain<std::vector<double>>(), stepcert::classic_rk4, ladder);
    ASSERT_TRUE(study.fitted()) << study.verdict_text;
    // Classic RK4 has order 4 (W. Kutta 1901; common practice, no source).
    EXPECT_NEAR(study.order(), 4.0, 0.1);
    EXPECT_EQ(study.basis, stepcert::error_basis::exact_solution);
    ASSERT_EQ(study.levels.size(), study_v.levels.size());
    for (std::size_t i = 0; i < study.levels.size(); ++i)
        EXPECT_NEAR(study.levels[i].error_grid, study_v.levels[i].error_grid, 1e-12 * study_v.levels[i].error_grid);
}

TYPED_TEST(RuntimeSizeStateSteps, EveryMethodStepsLikeStdVector) {
    // Each wrapper keeps scratch states of its own (stages, Adams history, extrapolation table,
    // tableau stages); sized wrongly they would be written out of bounds, which the sanitizer
    // pass would catch. Same numbers as std::vector<double>, and the same cost.
    using S = TypeParam;
    namespace tb = stepcert::tableaus;
    expect_fixed_step_match<S>(stepcert::explicit_euler, 800);
    expect_fixed_step_match<S>(stepcert::explicit_midpoint, 160);
    expect_fixed_step_match<S>(stepcert::classic_rk4, 64);
    expect_fixed_step_match<S>(stepcert::dormand_prince54, 64);
    expect_fixed_step_match<S>(stepcert::cash_karp54, 64);
    expect_fixed_step_match<S>(stepcert::fehlberg78, 32);
    expect_fixed_step_match<S>(stepcert::adams_bashforth_moulton<4>, 160);
    expect_fixed_step_match<S>(stepcert::tableau_method(tb::classic_rk4<double>()), 64);
    expect_adaptive_match<S>(stepcert::dormand_prince54_adaptive);
    expect_adaptive_match<S>(stepcert::cash_karp54_adaptive);
    expect_adaptive_match<S>(stepcert::fehlberg78_adaptive);
    expect_adaptive_match<S>(stepcert::bulirsch_stoer_adaptive);
    expect_adaptive_match<S>(stepcert::adaptive_tableau_method(tb::bogacki_shampine32<double>()));
}
