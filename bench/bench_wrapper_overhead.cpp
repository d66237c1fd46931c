// Wrapper overhead: stepcert's run_uniform with classic_rk4, dormand_prince54 and Rosenbrock 4
// against the loop a user writes around odeint's do_step, same stepper, same steps, same
// right-hand side (Rosenbrock 4: the same given Jacobian and df/dt on both sides).
// Problem: a two-mass spring chain between two walls (our own), state (x1, x2, v1, v2).
// Acceptance: median time ratio (stepcert / raw) <= 1.02 (Rosenbrock 4: <= 1.03). Run with
//   --benchmark_repetitions=10 --benchmark_report_aggregates_only=true
// (add --benchmark_enable_random_interleaving=true on a shared machine).
#include <array>
#include <cstddef>
#include <vector>

#include <benchmark/benchmark.h>

#include "stepcert/methods/classic_rk4.hpp"
#include "stepcert/core/state_ublas.hpp"
#include "stepcert/methods/dormand_prince54.hpp"
#include "stepcert/methods/rosenbrock4.hpp"
#include "stepcert/run/run.hpp"

namespace {

/// Two carts on springs: wall -k1- m1 -k2- m2 -k3- wall, light damping on both.
struct spring_chain {
    double m1 = 1.5, m2 = 0.8, k1 = 40.0, k2 = 25.0, k3 = 60.0, c = 0.3;

    template <class S, class T>
    void operator()(const S& y, S& dydt, T) const {
        const auto stretch = y[1] - y[0];
        dydt[0] = y[2];
        dydt[1] = y[3];
        dydt[2] = (-k1 * y[0] + k2 * stretch - c * y[2]) / m1;
        dydt[3] = (-k2 * stretch - k3 * y[1] - c * y[3]) / m2;
    }
};

/// Its Jacobian, written out (constant: the chain is linear).
struct spring_chain_jacobian {
    spring_chain c;
    template <class S, class T, class M>
    void operator()(const S&, const T&, M& J) const {
        J(0, 2) = 1.0;
        J(1, 3) = 1.0;
        J(2, 0) = (-c.k1 - c.k2) / c.m1;
        J(2, 1) = c.k2 / c.m1;
        J(2, 2) = -c.c / c.m1;
        J(3, 0) = c.k2 / c.m2;
        J(3, 1) = (-c.k2 - c.k3) / c.m2;
        J(3, 3) = -c.c / c.m2;
    }
};

/// df/dt = 0: the chain does not depend on t.
struct no_time_dependence {
    template <class S, class T>
    void operator()(const S&, const T&, S& v) const {
        for (std::size_t i = 0; i < stepcert::state_size(v); ++i) v[i] = 0.0;
    }
};

constexpr std::size_t steps = 20000;
constexpr double t1 = 10.0;

template <class S>
S initial_state() {
    S y = stepcert::state_traits<S>::make(4);
    y[0] = 0.05;
    y[1] = -0.02;
    y[2] = 0.0;
    y[3] = 0.3;
    return y;
}

/// The problem both sides integrate. Its parameters are run-time values, as in a real model:
/// a default-constructed local functor would let the compiler fold them into the raw loop.
template <class S>
auto make_chain_problem() {
    spring_chain chain;
    benchmark::DoNotOptimize(chain);
    return stepcert::make_problem("spring chain", chain, initial_state<S>(), 0.0, t1);
}

/// What a user writes around odeint: the stepper, the same system object, t += h.
template <class S, class Stepper>
void raw_odeint(benchmark::State& bs) {
    const auto problem = make_chain_problem<S>();
    const double h = t1 / steps;
    for (auto _ : bs) {
        S y = problem.y0();
        Stepper stepper;
        double t = 0.0;
        for (std::size_t k = 0; k < steps; ++k) {
            stepper.do_step(problem.rhs(), y, t, h);
            t += h;
        }
        benchmark::DoNotOptimize(y);
    }
    bs.counters["steps"] = static_cast<double>(steps);
}

/// stepcert's run_uniform: counts evaluations, checks the budget, collects the final state.
template <class S, class Method>
void through_stepcert(benchmark::State& bs, const Method& method) {
    const auto problem = make_chain_problem<S>();
    for (auto _ : bs) {
        auto run = stepcert::run_uniform(problem, method, steps);
        benchmark::DoNotOptimize(run.states.back());
    }
    bs.counters["steps"] = static_cast<double>(steps);
}

/// odeint's rosenbrock4 stepped by hand on ublas vectors, Jacobian written out (zeros included).
void rosenbrock_raw_ublas(benchmark::State& bs) {
    using V = boost::numeric::ublas::vector<double>;
    using M = boost::numeric::ublas::matrix<double>;
    spring_chain chain;
    benchmark::DoNotOptimize(chain);
    const spring_chain_jacobian jac{chain};
    auto f = [&chain](const V& x, V& dxdt, double t) { chain(x, dxdt, t); };
    auto j = [&jac](const V& x, M& J, double t, V& dfdt) {
        J.clear();
        jac(x, t, J);
        for (std::size_t i = 0; i < dfdt.size(); ++i) dfdt[i] = 0.0;
    };
    const double h = t1 / steps;
    for (auto _ : bs) {
        V y = initial_state<V>();
        boost::numeric::odeint::rosenbrock4<double, stepcert::rodas_coefficients<double>> stepper;
        double t = 0.0;
        for (std::size_t k = 0; k < steps; ++k) {
            stepper.do_step(std::make_pair(f, j), y, t, h);
            t += h;
        }
        benchmark::DoNotOptimize(y);
    }
    bs.counters["steps"] = static_cast<double>(steps);
}

template <class S>
void rosenbrock_stepcert(benchmark::State& bs) {
    spring_chain chain;
    benchmark::DoNotOptimize(chain);
    const auto problem = stepcert::make_problem("spring chain", chain, initial_state<S>(), 0.0, t1).with_jacobian(spring_chain_jacobian{chain});
    const auto method = stepcert::rosenbrock4_fixed_for(problem, no_time_dependence{});
    for (auto _ : bs) {
        auto run = stepcert::run_uniform(problem, method, steps);
        benchmark::DoNotOptimize(run.states.back());
    }
    bs.counters["steps"] = static_cast<double>(steps);
}

using arr = std::array<double, 4>;
using vec = std::vector<double>;
namespace odeint = boost::numeric::odeint;

void rk4_raw_array(benchmark::State& s) { raw_odeint<arr, odeint::runge_kutta4<arr>>(s); }
void rk4_stepcert_array(benchmark::State& s) { through_stepcert<arr>(s, stepcert::classic_rk4); }
void rk4_raw_vector(benchmark::State& s) { raw_odeint<vec, odeint::runge_kutta4<vec>>(s); }
void rk4_stepcert_vector(benchmark::State& s) { through_stepcert<vec>(s, stepcert::classic_rk4); }
void dopri5_raw_array(benchmark::State& s) { raw_odeint<arr, odeint::runge_kutta_dopri5<arr>>(s); }
void dopri5_stepcert_array(benchmark::State& s) { through_stepcert<arr>(s, stepcert::dormand_prince54); }
void dopri5_raw_vector(benchmark::State& s) { raw_odeint<vec, odeint::runge_kutta_dopri5<vec>>(s); }
void dopri5_stepcert_vector(benchmark::State& s) { through_stepcert<vec>(s, stepcert::dormand_prince54); }

void rosenbrock_stepcert_ublas(benchmark::State& s) { rosenbrock_stepcert<boost::numeric::ublas::vector<double>>(s); }
void rosenbrock_stepcert_array(benchmark::State& s) { rosenbrock_stepcert<arr>(s); }

BENCHMARK(rk4_raw_array)->Unit(benchmark::kMicrosecond);
BENCHMARK(rk4_stepcert_array)->Unit(benchmark::kMicrosecond);
BENCHMARK(rk4_raw_vector)->Unit(benchmark::kMicrosecond);
BENCHMARK(rk4_stepcert_vector)->Unit(benchmark::kMicrosecond);
BENCHMARK(dopri5_raw_array)->Unit(benchmark::kMicrosecond);
BENCHMARK(dopri5_stepcert_array)->Unit(benchmark::kMicrosecond);
BENCHMARK(dopri5_raw_vector)->Unit(benchmark::kMicrosecond);
BENCHMARK(dopri5_stepcert_vector)->Unit(benchmark::kMicrosecond);
BENCHMARK(rosenbrock_raw_ublas)->Unit(benchmark::kMicrosecond);
BENCHMARK(rosenbrock_stepcert_ublas)->Unit(benchmark::kMicrosecond);
BENCHMARK(rosenbrock_stepcert_array)->Unit(benchmark::kMicrosecond);

} // namespace
