// Large systems: a method-of-lines problem (problems/busbar_cooling.hpp) of up to 10^5 unknowns
// runs through stepcert's wrappers on odeint's default algebra and on its OpenMP algebra.
// Ground truth: the exact solution of the semi-discrete heat equation (the lowest eigenpair of
// the second-difference matrix, common practice, no source), and classic RK4's order 4 (Kutta
// 1901; common practice, no source).
#include <cmath>
#include <cstdio>
#include <cstddef>
#include <string>
#include <vector>

#include <gtest/gtest.h>

#ifdef _OPENMP
#include <omp.h>
#endif

#include "stepcert/core/error.hpp"
#include "stepcert/methods/classic_rk4.hpp"
#include "stepcert/methods/classic_rk4_openmp.hpp"
#include "stepcert/problems/busbar_cooling.hpp"
#include "stepcert/run/run.hpp"

namespace test_large_systems {

/// Largest |u_i - exact_i| at t1 of the run with n steps.
template <class P, class M>
double error_at_end(const P& p, const M& m, std::size_t n) {
    const auto run = stepcert::run_uniform(p, m, n, n);
    std::vector<double> exact(p.y0().size());
    p.exact()(p.t1(), exact);
    double worst = 0.0;
    for (std::size_t i = 0; i < exact.size(); ++i) worst = std::max(worst, std::abs(run.states.back()[i] - exact[i]));
    return worst;
}

} // namespace test_large_systems

using namespace test_large_systems;

// The exact solution solves the semi-discrete system: a central difference of it in time
// matches the right-hand side (O(delta^2) agreement; common practice, no source).
TEST(BusbarCooling, ExactSolutionSolvesTheSemiDiscreteSystem) {
    const auto p = stepcert::problems::busbar_cooling<long double>(50, 0.01L);
    const long double t = 0.004L, delta = 1e-6L;
    std::vector<long double> before(50), after(50), at(50), slope(50);
    p.exact()(t - delta, before);
    p.exact()(t + delta, after);
    p.exact()(t, at);
    p.rhs()(at, slope, t);
    for (std::size_t i = 0; i < 50; ++i) {
        const long double difference = (after[i] - before[i]) / (2 * delta);
        EXPECT_NEAR(static_cast<double>(difference), static_cast<double>(slope[i]), 1e-6 * std::abs(static_cast<double>(slope[i])) + 1e-9)
            << "cell " << i;
    }
}

// RK4 on 1000 cells, mode 300 (h mu = -0.22 at the coarse level, stable: h k / dx^2 = 0.25 within
// RK4's real interval 2.785 / 4): halving the step divides the error by about 2^4 = 16.
TEST(BusbarCooling, RK4ConvergesAtOrderFourOnAThousandCells) {
    const std::size_t cells = 1000;
    const double dx = 1.0 / (cells + 1);
    const double t1 = 40 * 0.5 * dx * dx;
    const auto p = stepcert::problems::busbar_cooling(cells, t1, 1.0, 300);
    const double coarse = error_at_end(p, stepcert::classic_rk4, 80);
    const double fine = error_at_end(p, stepcert::classic_rk4, 160);
    const double order = std::log2(coarse / fine);
    EXPECT_NEAR(order, 4.0, 0.15) << "errors " << coarse << " and " << fine;
    std::printf("busbar, 1000 cells, mode 300, RK4: errors %.3g (80 steps), %.3g (160 steps), order %.3f\n", coarse, fine, order);
}

// 10^5 unknowns: the OpenMP algebra gives the very same numbers as the default one (each
// component is computed by the same operations), and both stay on the exact solution.
TEST(BusbarCooling, HundredThousandUnknownsOnTheOpenMPAlgebra) {
    const std::size_t cells = 100000;
    const double dx = 1.0 / (cells + 1);
    const std::size_t steps = 20;
    const auto p = stepcert::problems::busbar_cooling(cells, steps * 0.5 * dx * dx);
    const auto serial = stepcert::run_uniform(p, stepcert::classic_rk4, steps, steps);
    const auto parallel = stepcert::run_uniform(p, stepcert::classic_rk4_openmp, steps, steps);
    ASSERT_EQ(serial.states.back().size(), cells);
    EXPECT_EQ(serial.states.back(), parallel.states.back());
    EXPECT_EQ(serial.stats.evaluations, 4 * steps);
    EXPECT_EQ(parallel.stats.evaluations, 4 * steps);
    EXPECT_LT(error_at_end(p, stepcert::classic_rk4_openmp, steps), 1e-12);
#ifdef _OPENMP
    std::printf("OpenMP: up to %d threads\n", omp_get_max_threads());
#else
    std::printf("built without OpenMP: the OpenMP algebra ran on one thread\n");
#endif
}

TEST(BusbarCooling, BadInputIsATypedError) {
    EXPECT_THROW((void)stepcert::problems::busbar_cooling(1), stepcert::invalid_input);
    EXPECT_THROW((void)stepcert::problems::busbar_cooling(10, 0.01, -1.0), stepcert::invalid_input);
    EXPECT_THROW((void)stepcert::problems::busbar_cooling(10, 0.01, NAN), stepcert::non_finite_value);
    EXPECT_THROW((void)stepcert::problems::busbar_cooling(10, 0.01, 1.0, 11), stepcert::invalid_input);
}
