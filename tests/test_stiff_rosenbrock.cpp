// Rosenbrock 4 through odeint's rosenbrock4: the defect of odeint's shipped coefficient set
// (first order on right-hand sides that depend on t), shown on odeint itself and caught by an
// order study; the corrected set's order; the wrapper's steps against odeint's own loop.
#include <array>
#include <cmath>
#include <cstdio>
#include <string>
#include <type_traits>
#include <utility>
#include <vector>

#include <gtest/gtest.h>

#include <boost/numeric/odeint/stepper/rosenbrock4.hpp>
#include <boost/numeric/odeint/stepper/rosenbrock4_controller.hpp>

#include "stepcert/methods/dormand_prince54.hpp"
#include "stepcert/methods/rosenbrock4.hpp"
#include "stepcert/methods/rosenbrock4_adaptive.hpp"
#include "stepcert/problems/prothero_robinson.hpp"
#include "stepcert/run/run.hpp"
#include "stepcert/study/order_study.hpp"
#include "stepcert/testing/gtest.hpp"

namespace test_stiff_rosenbrock {

namespace odeint = boost::numeric::odeint;
using vector = boost::numeric::ublas::vector<double>;
using matrix = boost::numeric::ublas::matrix<double>;

// y' = cos t, y(0) = 0: exact y = sin t; ∂f/∂y = 0, ∂f/∂t = −sin t (exact).
struct cosine_forcing {
    void operator()(const vector&, vector& dxdt, double t) const { dxdt[0] = std::cos(t); }
};
struct cosine_forcing_derivatives {
    void operator()(const vector&, matrix& J, double t, vector& dfdt) const {
        J(0, 0) = 0.0;
        dfdt[0] = -std::sin(t);
    }
};

// Raw odeint: n fixed steps of rosenbrock4 with the coefficient set C on y' = cos t over [0, 3].
template <class C>
double odeint_error_on_cosine(int n) {
    odeint::rosenbrock4<double, C> stepper;
    vector x(1);
    x[0] = 0.0;
    const double h = 3.0 / n;
    for (int k = 0; k < n; ++k) stepper.do_step(std::make_pair(cosine_forcing{}, cosine_forcing_derivatives{}), x, k * h, h);
    return std::abs(x[0] - std::sin(3.0));
}

TEST(Rosenbrock4Coefficients, OdeintsShippedSetIsFirstOrderOnATimeDependentRightHandSide) {
    // Measured when the defect was found (Boost 1.81): errors 2.0e-2, 1.0e-2, 5.1e-3, 2.5e-3 for
    // 10, 20, 40, 80 steps. A fourth-order method divides its error by 16 per halving of the step
    // (common practice, no source); odeint's set divides it by 2.
    const std::array<int, 4> steps{10, 20, 40, 80};
    const std::array<double, 4> measured{2.0e-2, 1.0e-2, 5.1e-3, 2.5e-3};
    for (std::size_t i = 0; i < steps.size(); ++i) {
        const double e = odeint_error_on_cosine<odeint::default_rosenbrock_coefficients<double>>(steps[i]);
        EXPECT_NEAR(e, measured[i], 0.05 * measured[i]) << steps[i] << " steps";
        if (i > 0) {
            const double previous = odeint_error_on_cosine<odeint::default_rosenbrock_coefficients<double>>(steps[i - 1]);
            EXPECT_NEAR(std::log2(previous / e), 1.0, 0.05);
        }
    }
    // The corrected set, through the same stepper's Coefficients parameter: at least the design
    // order 4 (on this pure quadrature the final value even converges at order 5.00, measured).
    for (std::size_t i = 1; i < steps.size(); ++i) {
        const double coarse = odeint_error_on_cosine<stepcert::rodas_coefficients<double>>(steps[i - 1]);
        const double fine = odeint_error_on_cosine<stepcert::rodas_coefficients<double>>(steps[i]);
        std::printf("[ figures ] y' = cos t, %d -> %d steps: odeint's set order %.3f, corrected %.3f (errors %.3g, %.3g)\n",
                    steps[i - 1], steps[i],
                    std::log2(odeint_error_on_cosine<odeint::default_rosenbrock_coefficients<double>>(steps[i - 1]) /
                              odeint_error_on_cosine<odeint::default_rosenbrock_coefficients<double>>(steps[i])),
                    std::log2(coarse / fine), coarse, fine);
        EXPECT_GT(std::log2(coarse / fine), 3.8);
    }
}

TEST(Rosenbrock4Coefficients, TheCorrectedD4IsTheRowSumOfGamma) {
    // d_i = Σ_j γ_ij, Γ = (diag(1/γ) − C)^(-1) (Hairer & Wanner, Solving ODEs II, §IV.7; from
    // memory): solved here by forward substitution from odeint's own γ and C, so the check uses
    // nothing but the coefficient table.
    const stepcert::rodas_coefficients<double> c;
    const double g = c.gamma;
    // Rows of M = diag(1/γ) − C (lower triangular, six stages); Γ = M^(-1); γ_i = (Γ 1)_i solves M x = 1.
    const std::array<std::array<double, 6>, 6> C{{{0, 0, 0, 0, 0, 0},
                                                   {c.c21, 0, 0, 0, 0, 0},
                                                   {c.c31, c.c32, 0, 0, 0, 0},
                                                   {c.c41, c.c42, c.c43, 0, 0, 0},
                                                   {c.c51, c.c52, c.c53, c.c54, 0, 0},
                                                   {c.c61, c.c62, c.c63, c.c64, c.c65, 0}}};
    std::array<double, 6> x{};
    for (std::size_t i = 0; i < 6; ++i) {
        double r = 1.0;
        for (std::size_t j = 0; j < i; ++j) r += C[i][j] * x[j];
        x[i] = r * g;
    }
    EXPECT_NEAR(x[0], c.d1, 1e-14);
    EXPECT_NEAR(x[1], c.d2, 1e-13);
    EXPECT_NEAR(x[2], c.d3, 1e-13);
    EXPECT_NEAR(x[3], c.d4, 1e-13);
    EXPECT_NEAR(x[3], -0.0362, 1e-13);
    const odeint::default_rosenbrock_coefficients<double> shipped;
    EXPECT_GT(std::abs(x[3] - shipped.d4), 0.07) << "odeint's d4 has the opposite sign";
    // Stiffly accurate: the last two stages carry no ∂f/∂t term.
    EXPECT_NEAR(x[4], 0.0, 1e-12);
    EXPECT_NEAR(x[5], 0.0, 1e-12);
}

// Prothero–Robinson y' = λ (y − sin t) + cos t, exact y = sin t (A. Prothero, A. Robinson, Math.
// Comp. 28 (1974) 145–162; from memory). ∂f/∂t = −λ cos t − sin t (derived).
struct prothero_robinson_time_derivative {
    double lambda;
    template <class S>
    void operator()(const S&, double t, S& v) const {
        v[0] = -lambda * std::cos(t) - std::sin(t);
    }
};

TEST(Rosenbrock4Study, OrderStudyCatchesTheShippedSetAndConfirmsTheCorrectedOne) {
    const auto p = stepcert::problems::prothero_robinson(-2.0, 3.0);
    const auto corrected = stepcert::rosenbrock4_fixed_for(p, prothero_robinson_time_derivative{-2.0});
    const auto good = stepcert::order_study(p, corrected, stepcert::step_ladder{8, 2.0, 8});
    ASSERT_TRUE(good.fitted()) << good.verdict_text;
    EXPECT_TRUE(stepcert::testing::converges_at_declared_order(good, 0.2)) << stepcert::study_table(good);
    EXPECT_GT(good.fit.lower, 3.5);
    EXPECT_LT(good.fit.upper, 4.5);

    const stepcert::rosenbrock4_method<odeint::default_rosenbrock_coefficients, std::remove_cvref_t<decltype(p)>::jacobian_type,
                                       prothero_robinson_time_derivative>
        shipped{"Rosenbrock 4 (odeint's coefficients)", p.jacobian(), {-2.0}};
    const auto bad = stepcert::order_study(p, shipped, stepcert::step_ladder{8, 2.0, 8});
    ASSERT_TRUE(bad.fitted()) << bad.verdict_text;
    EXPECT_FALSE(stepcert::testing::converges_at_declared_order(bad, 0.2));
    EXPECT_NEAR(bad.fit.order, 1.0, 0.2) << stepcert::study_table(bad);
    std::printf("[ figures ] Prothero-Robinson lambda = -2 on [0, 3]: corrected set order %.3f [%.3f, %.3f]; odeint's set %.3f "
                "[%.3f, %.3f]\n",
                good.fit.order, good.fit.lower, good.fit.upper, bad.fit.order, bad.fit.lower, bad.fit.upper);
}

TEST(Rosenbrock4Study, DifferencedDerivativesKeepTheOrder) {
    // With ∂f/∂y and ∂f/∂t by central differences the method is the same up to their O(eps^(2/3))
    // error, far below the errors of this ladder.
    const auto p = stepcert::problems::prothero_robinson(-2.0, 3.0);
    const auto r = stepcert::order_study(p, stepcert::rosenbrock4_fixed, stepcert::step_ladder{8, 2.0, 7});
    ASSERT_TRUE(r.fitted()) << r.verdict_text;
    EXPECT_TRUE(stepcert::testing::converges_at_declared_order(r, 0.2)) << stepcert::study_table(r);
    const auto shipped = stepcert::order_study(p, stepcert::rosenbrock4_fixed_odeint_coefficients, stepcert::step_ladder{8, 2.0, 7});
    EXPECT_NEAR(shipped.fit.order, 1.0, 0.2) << stepcert::study_table(shipped);
}

TEST(Rosenbrock4Run, SameStepsAsOdeintsOwnLoop) {
    // The wrapper copies the state into odeint's ublas vector and back at output points only, so
    // its numbers are odeint's to the last bit (reference: odeint's rosenbrock4 stepped by hand).
    const double lambda = -50.0;
    const auto p = stepcert::problems::prothero_robinson(lambda, 2.0);
    const auto m = stepcert::rosenbrock4_fixed_for(p, prothero_robinson_time_derivative{lambda});
    const std::size_t n = 40;
    const auto run = stepcert::run_uniform(p, m, n);

    odeint::rosenbrock4<double, stepcert::rodas_coefficients<double>> stepper;
    vector x(1);
    x[0] = 0.0;
    const double h = 2.0 / n;
    auto f = [&](const vector& y, vector& dydt, double t) { dydt[0] = lambda * (y[0] - std::sin(t)) + std::cos(t); };
    auto jac = [&](const vector&, matrix& J, double t, vector& dfdt) {
        J(0, 0) = lambda;
        dfdt[0] = -lambda * std::cos(t) - std::sin(t);
    };
    for (std::size_t k = 0; k < n; ++k) stepper.do_step(std::make_pair(f, jac), x, static_cast<double>(k) * h, h);
    EXPECT_EQ(run.final_state()[0], x[0]);
    // Six evaluations of f per step; the given Jacobian and ∂f/∂t cost none.
    EXPECT_EQ(run.stats.evaluations, 6 * n);
    // |λh| = 2.5: the smooth solution sin t is followed to 1e-5.
    EXPECT_LT(std::abs(x[0] - std::sin(2.0)), 1e-5);
}

TEST(Rosenbrock4Run, DifferencedDerivativesAreCountedAsEvaluations) {
    const auto p = stepcert::problems::prothero_robinson(-2.0, 1.0);
    const auto run = stepcert::run_uniform(p, stepcert::rosenbrock4_fixed, 10);
    // 6 per step, 2n = 2 for the Jacobian, 2 for ∂f/∂t.
    EXPECT_EQ(run.stats.evaluations, 10u * (6 + 2 + 2));
}

TEST(Rosenbrock4Run, StiffProblemFarOutsideExplicitStability) {
    // λ = −1e6 and h = 0.05: |λh| = 5e4. Rosenbrock 4 (L-stable: RODAS is stiffly accurate;
    // Hairer & Wanner II §VI.4, from memory) follows the smooth solution.
    const auto p = stepcert::problems::prothero_robinson(-1e6, 1.0);
    const auto run = stepcert::run_uniform(p, stepcert::rosenbrock4_fixed_for(p), 20);
    EXPECT_LT(std::abs(run.final_state()[0] - std::sin(1.0)), 1e-8);
}

TEST(Rosenbrock4Adaptive, SameStepsAsOdeintsControllerSteppedByHand) {
    // Reference: odeint's rosenbrock4_controller stepped by hand from the same first step, the
    // last step cut to land on t1; the wrapper must take the same steps and rejections.
    const double lambda = -1e3;
    const auto p = stepcert::problems::prothero_robinson(lambda, 2.0);
    using jacobian_type = std::remove_cvref_t<decltype(p)>::jacobian_type;
    const stepcert::rosenbrock4_adaptive_method<stepcert::rodas_coefficients, jacobian_type, prothero_robinson_time_derivative> m{
        {"Rosenbrock 4 (RODAS) adaptive", 4}, p.jacobian(), {lambda}};
    const auto run = stepcert::run_adaptive(p, m.with_initial_step(1e-3), {1e-8, 1e-8}, std::vector<double>{2.0});

    odeint::rosenbrock4_controller<odeint::rosenbrock4<double, stepcert::rodas_coefficients<double>>> controller(1e-8, 1e-8);
    auto f = [&](const vector& y, vector& dydt, double t) { dydt[0] = lambda * (y[0] - std::sin(t)) + std::cos(t); };
    auto jac = [&](const vector&, matrix& J, double t, vector& dfdt) {
        J(0, 0) = lambda;
        dfdt[0] = -lambda * std::cos(t) - std::sin(t);
    };
    vector x(1), x_new(1);
    x[0] = 0.0;
    double t = 0.0, dt = 1e-3;
    std::size_t steps = 0, rejected = 0;
    while (t < 2.0 && steps + rejected < 100000) {
        const bool lands = t + dt >= 2.0;
        double step_t = t, step_dt = lands ? 2.0 - t : dt;
        if (controller.try_step(std::make_pair(f, jac), x, step_t, x_new, step_dt) != odeint::success) {
            ++rejected;
            dt = step_dt;
            continue;
        }
        ++steps;
        x = x_new;
        t = lands ? 2.0 : step_t;
        dt = step_dt;
    }
    EXPECT_EQ(run.stats.steps, steps);
    EXPECT_EQ(run.stats.rejected, rejected);
    EXPECT_EQ(run.final_state()[0], x[0]);
    EXPECT_LT(std::abs(x[0] - std::sin(2.0)), 1e-6);
    std::printf("[ figures ] Prothero-Robinson lambda = -1e3, tolerance 1e-8: %zu steps, %zu rejected, error %.2e\n", steps, rejected,
                std::abs(x[0] - std::sin(2.0)));
}

TEST(Rosenbrock4Adaptive, StiffProblemTakesFarFewerStepsThanAnExplicitPair) {
    // λ = −1e4: Dormand–Prince's steps are held at |λh| ≲ 3.3 (its real stability interval,
    // shared reference values §6, derived) by stability, Rosenbrock's follow the smooth solution.
    const auto p = stepcert::problems::prothero_robinson(-1e4, 2.0);
    const stepcert::controller_tolerance tol{1e-6, 1e-6};
    const auto stiff = stepcert::run_adaptive(p, stepcert::rosenbrock4_adaptive_for(p), tol, std::vector<double>{2.0});
    const auto explicit_pair = stepcert::run_adaptive(p, stepcert::dormand_prince54_adaptive, tol, std::vector<double>{2.0});
    std::printf("[ figures ] Prothero-Robinson lambda = -1e4 on [0, 2], tolerance 1e-6: Rosenbrock 4 %zu steps (%zu rejected), "
                "error %.2e; Dormand-Prince 5(4) %zu steps (%zu rejected), error %.2e\n",
                stiff.stats.steps, stiff.stats.rejected, std::abs(stiff.final_state()[0] - std::sin(2.0)), explicit_pair.stats.steps,
                explicit_pair.stats.rejected, std::abs(explicit_pair.final_state()[0] - std::sin(2.0)));
    EXPECT_LT(std::abs(stiff.final_state()[0] - std::sin(2.0)), 1e-5);
    EXPECT_LT(stiff.stats.steps * 20, explicit_pair.stats.steps);
    // The explicit pair's steps: at least 2 * 1e4 / 3.31 from stability alone.
    EXPECT_GT(static_cast<double>(explicit_pair.stats.steps), 2.0 * 1e4 / 3.3065678926349465);
}

TEST(Rosenbrock4Adaptive, OdeintsShippedSetNeedsFarMoreStepsOnATimeDependentProblem) {
    // The error estimate sees the first-order defect as a large error, so the shipped set's
    // controller shrinks the step much further for the same tolerance.
    const auto p = stepcert::problems::prothero_robinson(-2.0, 3.0);
    const stepcert::controller_tolerance tol{1e-8, 1e-8};
    const auto good = stepcert::run_adaptive(p, stepcert::rosenbrock4_adaptive, tol, std::vector<double>{3.0});
    const auto bad = stepcert::run_adaptive(p, stepcert::rosenbrock4_adaptive_odeint_coefficients, tol, std::vector<double>{3.0});
    std::printf("[ figures ] Prothero-Robinson lambda = -2, tolerance 1e-8: corrected set %zu steps, error %.2e; odeint's set %zu "
                "steps, error %.2e\n",
                good.stats.steps, std::abs(good.final_state()[0] - std::sin(3.0)), bad.stats.steps,
                std::abs(bad.final_state()[0] - std::sin(3.0)));
    EXPECT_LT(std::abs(good.final_state()[0] - std::sin(3.0)), 1e-6);
    EXPECT_GT(bad.stats.steps, 3 * good.stats.steps);
}

// Bad input: every failure is a typed stepcert error that names what failed, where.
struct fast_growth {
    template <class S, class T>
    void operator()(const S& y, S& dydt, const T&) const {
        dydt[0] = 40 * y[0];
    }
};
struct fast_growth_jacobian {
    template <class S, class T, class M>
    void operator()(const S&, const T&, M& J) const {
        J(0, 0) = 40.0;
    }
};
struct jacobian_failing_after_half {
    template <class S, class T, class M>
    void operator()(const S&, const T& t, M& J) const {
        J(0, 0) = t > 0.5 ? std::nan("") : 40.0;
    }
};

template <class F>
std::string message_of(F&& f) {
    try {
        f();
    } catch (const stepcert::error& e) {
        return e.what();
    }
    return "no error";
}

TEST(Rosenbrock4BadInput, SingularIterationMatrixIsAMethodFailureThatSaysWhere) {
    // y' = 40 y with 10 steps on [0, 1]: h = 0.1, γ = 1/4 (odeint's coefficient table), so
    // 1/(γh) = 40 = ∂f/∂y and I/(γh) − J = 0 exactly (derived).
    const auto p = stepcert::make_problem("growth at rate 40", fast_growth{}, std::vector<double>{1.0}, 0.0, 1.0)
                       .with_jacobian(fast_growth_jacobian{});
    EXPECT_THROW(stepcert::run_uniform(p, stepcert::rosenbrock4_fixed_for(p), 10), stepcert::method_failure);
    const std::string m = message_of([&] { stepcert::run_uniform(p, stepcert::rosenbrock4_fixed_for(p), 10); });
    EXPECT_NE(m.find("singular at t = 0 with h = 0.1"), std::string::npos) << m;
    EXPECT_NE(m.find("1/(gamma h) = 40"), std::string::npos) << m;
    // 11 steps avoid it; the adaptive method's steps never sit on it for long (a failed attempt is retried shorter).
    EXPECT_NO_THROW(stepcert::run_uniform(p, stepcert::rosenbrock4_fixed_for(p), 11));
    const auto run = stepcert::run_adaptive(p, stepcert::rosenbrock4_adaptive_for(p).with_initial_step(0.1), {1e-8, 1e-8},
                                            std::vector<double>{1.0});
    EXPECT_NEAR(run.final_state()[0] / std::exp(40.0), 1.0, 1e-5);
}

TEST(Rosenbrock4BadInput, NonFiniteJacobianIsNamedWithItsEntryAndTime) {
    const auto p = stepcert::make_problem("growth at rate 40", fast_growth{}, std::vector<double>{1.0}, 0.0, 1.0)
                       .with_jacobian(jacobian_failing_after_half{});
    for (const std::string& m : {message_of([&] { stepcert::run_uniform(p, stepcert::rosenbrock4_fixed_for(p), 16); }),
                                 message_of([&] {
                                     stepcert::run_adaptive(p, stepcert::rosenbrock4_adaptive_for(p), {1e-6, 1e-6},
                                                            std::vector<double>{1.0});
                                 })}) {
        EXPECT_NE(m.find("the Jacobian given with the problem has a NaN or infinite entry (0, 0) at t = 0.5"), std::string::npos) << m;
    }
    EXPECT_THROW(stepcert::run_uniform(p, stepcert::rosenbrock4_fixed_for(p), 16), stepcert::non_finite_value);
}

TEST(Rosenbrock4BadInput, NonFiniteTimeDerivativeIsNamed) {
    const auto p = stepcert::problems::prothero_robinson(-2.0, 1.0);
    const auto m = stepcert::rosenbrock4_fixed_for(p, [](const auto&, double t, auto& v) { v[0] = t > 0.25 ? std::nan("") : 0.0; });
    const std::string text = message_of([&] { stepcert::run_uniform(p, m, 8); });
    EXPECT_NE(text.find("the given df/dt has a NaN or infinite component at t = 0.375"), std::string::npos) << text;
}

} // namespace test_stiff_rosenbrock
