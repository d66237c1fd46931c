// Cost of watching the local error of a production run: odeint's integrate_n_steps with
// Cash–Karp 5(4) and Dormand–Prince 5(4), plain (do_step without error estimate), with the error
// estimate computed and dropped (do_step with xerr), and through stepcert::local_error_monitor
// (do_step with xerr, its weighted norm and one record per step); and Adams–Bashforth–Moulton 4,
// odeint's own against stepcert::adams_milne_monitor (the same steps plus Milne's estimate).
// Problems (our own): a two-cart spring chain (4 unknowns, a few flops per evaluation), a 64-node
// thermal rod of a battery pack cooled at both ends (64 unknowns, a few flops per unknown), and the
// catalogue's small satellite with its J2 term (6 unknowns, square roots and divisions: a right-hand
// side of realistic cost). Acceptance target: monitored / plain <= 1.05. Run with
//   --benchmark_repetitions=10 --benchmark_report_aggregates_only=true
// odeint's steppers keep std::array scratch states that g++ 12 believes are read before they are
// written when a default-constructed stepper is copied (they never are); as in
// methods/odeint_rk_controller.hpp.
#if defined(__GNUC__) && !defined(__clang__)
#pragma GCC diagnostic ignored "-Wmaybe-uninitialized"
#endif
#include <array>
#include <cmath>
#include <cstddef>
#include <vector>

#include <benchmark/benchmark.h>

#include <boost/numeric/odeint/integrate/integrate_n_steps.hpp>
#include <boost/numeric/odeint/stepper/runge_kutta_cash_karp54.hpp>
#include <boost/numeric/odeint/stepper/runge_kutta_dopri5.hpp>
#include "stepcert/methods/adams_bashforth_moulton.hpp"

#include "stepcert/estimate/local_error_monitor.hpp"
#include "stepcert/estimate/milne_monitor.hpp"
#include "stepcert/problems/small_satellite.hpp"

namespace {
namespace odeint = boost::numeric::odeint;
using S = std::vector<double>;
using A6 = std::array<double, 6>;

/// wall -k1- m1 -k2- m2 -k3- wall, light damping.
struct spring_chain {
    using state_type = S;
    static constexpr double m1 = 1.5, m2 = 0.8, k1 = 40.0, k2 = 25.0, k3 = 60.0, c = 0.3;
    [[gnu::noinline]] void operator()(const S& y, S& d, double) const {
        const double stretch = y[1] - y[0];
        d[0] = y[2];
        d[1] = y[3];
        d[2] = (-k1 * y[0] + k2 * stretch - c * y[2]) / m1;
        d[3] = (-k2 * stretch - k3 * y[1] - c * y[3]) / m2;
    }
    static S start() { return {0.05, -0.02, 0.0, 0.3}; }
    static constexpr double t1 = 10.0;
};

/// Conduction along a rod of 64 cells with a heat source that grows with temperature (a pack
/// under load): T_i' = a (T_(i-1) - 2 T_i + T_(i+1)) + q (1 + 0.01 T_i), ends held at 0.
struct thermal_rod {
    using state_type = S;
    static constexpr double a = 40.0, q = 2.0;
    [[gnu::noinline]] void operator()(const S& y, S& d, double) const {
        const std::size_t n = y.size();
        for (std::size_t i = 0; i < n; ++i) {
            const double left = i == 0 ? 0.0 : y[i - 1], right = i + 1 == n ? 0.0 : y[i + 1];
            d[i] = a * (left - 2.0 * y[i] + right) + q * (1.0 + 0.01 * y[i]);
        }
    }
    static S start() {
        S y(64);
        for (std::size_t i = 0; i < y.size(); ++i) y[i] = 20.0 * std::sin(3.14159265358979 * (i + 1.0) / 65.0);
        return y;
    }
    static constexpr double t1 = 0.5;
};

/// Three orbits of the catalogue's satellite (period about 8.8 time units).
struct satellite {
    using state_type = A6;
    static const stepcert::problems::small_satellite_rhs<double>& model() {
        static const stepcert::problems::small_satellite_rhs<double> f;
        return f;
    }
    [[gnu::noinline]] void operator()(const A6& y, A6& d, double t) const { model()(y, d, t); }
    static A6 start() { return stepcert::problems::small_satellite_initial_state<double>(); }
    static constexpr double t1 = 26.0;
};

// Every right-hand side above is kept out of line ([[gnu::noinline]]), as a model's usually is:
// inlined into some variants and not into others, the same work measured up to 2x apart. Their
// parameters live in static storage, not in the functor: odeint copies the functor onto the stack,
// and there, depending on each variant's frame layout, loads of the parameters falsely depended on
// stores to the state 4 KiB away (the satellite measured 0.9 or 1.4 ms for the same run, by variant).
constexpr std::size_t steps = 5000;

template <class Problem, class Stepper>
void plain(benchmark::State& bs) {
    Problem f;
    benchmark::DoNotOptimize(f);
    for (auto _ : bs) {
        auto y = Problem::start();
        odeint::integrate_n_steps(Stepper(), f, y, 0.0, Problem::t1 / steps, steps);
        benchmark::DoNotOptimize(y);
    }
}

/// The same stepper's do_step with the error estimate, which is then dropped.
template <class Problem, class Stepper>
void estimate_dropped(benchmark::State& bs) {
    Problem f;
    benchmark::DoNotOptimize(f);
    for (auto _ : bs) {
        auto y = Problem::start(), err = y;
        Stepper st;
        const double h = Problem::t1 / steps;
        for (std::size_t k = 0; k < steps; ++k) st.do_step(f, y, static_cast<double>(k) * h, h, err);
        benchmark::DoNotOptimize(y);
        benchmark::DoNotOptimize(err);
    }
}

template <class Problem, class Stepper>
void monitored(benchmark::State& bs) {
    Problem f;
    benchmark::DoNotOptimize(f);
    for (auto _ : bs) {
        auto y = Problem::start();
        stepcert::local_error_profile log;
        log.steps.reserve(steps);
        stepcert::local_error_monitor<Stepper> monitor(log);
        odeint::integrate_n_steps(monitor, f, y, 0.0, Problem::t1 / steps, steps);
        benchmark::DoNotOptimize(y);
        benchmark::DoNotOptimize(log.steps.back());
    }
}

/// Adams–Bashforth–Moulton 4 with Milne's device (adams_milne_monitor) against odeint's own
/// adams_bashforth_moulton<4> (plain<Problem, odeint ABM>).
template <class Problem>
void milne_monitored(benchmark::State& bs) {
    Problem f;
    benchmark::DoNotOptimize(f);
    for (auto _ : bs) {
        auto y = Problem::start();
        stepcert::local_error_profile log;
        log.steps.reserve(steps);
        stepcert::adams_milne_monitor<4, typename Problem::state_type> monitor(log);
        odeint::integrate_n_steps(monitor, f, y, 0.0, Problem::t1 / steps, steps);
        benchmark::DoNotOptimize(y);
        benchmark::DoNotOptimize(log.steps.back());
    }
}

using ck = odeint::runge_kutta_cash_karp54<S>;
using dp = odeint::runge_kutta_dopri5<S>;
using ck6 = odeint::runge_kutta_cash_karp54<A6>;
using dp6 = odeint::runge_kutta_dopri5<A6>;

BENCHMARK(plain<thermal_rod, ck>)->Name("rod/cash_karp54/plain")->Unit(benchmark::kMillisecond);
BENCHMARK(estimate_dropped<thermal_rod, ck>)->Name("rod/cash_karp54/estimate_dropped")->Unit(benchmark::kMillisecond);
BENCHMARK(monitored<thermal_rod, ck>)->Name("rod/cash_karp54/monitored")->Unit(benchmark::kMillisecond);
BENCHMARK(plain<thermal_rod, dp>)->Name("rod/dopri5/plain")->Unit(benchmark::kMillisecond);
BENCHMARK(estimate_dropped<thermal_rod, dp>)->Name("rod/dopri5/estimate_dropped")->Unit(benchmark::kMillisecond);
BENCHMARK(monitored<thermal_rod, dp>)->Name("rod/dopri5/monitored")->Unit(benchmark::kMillisecond);
BENCHMARK(plain<satellite, ck6>)->Name("satellite/cash_karp54/plain")->Unit(benchmark::kMillisecond);
BENCHMARK(estimate_dropped<satellite, ck6>)->Name("satellite/cash_karp54/estimate_dropped")->Unit(benchmark::kMillisecond);
BENCHMARK(monitored<satellite, ck6>)->Name("satellite/cash_karp54/monitored")->Unit(benchmark::kMillisecond);
BENCHMARK(plain<satellite, dp6>)->Name("satellite/dopri5/plain")->Unit(benchmark::kMillisecond);
BENCHMARK(estimate_dropped<satellite, dp6>)->Name("satellite/dopri5/estimate_dropped")->Unit(benchmark::kMillisecond);
BENCHMARK(monitored<satellite, dp6>)->Name("satellite/dopri5/monitored")->Unit(benchmark::kMillisecond);
using abm4 = stepcert::odeint_stepper::adams_bashforth_moulton<4, S>;
using abm4_6 = stepcert::odeint_stepper::adams_bashforth_moulton<4, A6>;
BENCHMARK(plain<thermal_rod, abm4>)->Name("rod/abm4/plain")->Unit(benchmark::kMillisecond);
BENCHMARK(milne_monitored<thermal_rod>)->Name("rod/abm4/milne_monitored")->Unit(benchmark::kMillisecond);
BENCHMARK(plain<satellite, abm4_6>)->Name("satellite/abm4/plain")->Unit(benchmark::kMillisecond);
BENCHMARK(milne_monitored<satellite>)->Name("satellite/abm4/milne_monitored")->Unit(benchmark::kMillisecond);
BENCHMARK(plain<spring_chain, ck>)->Name("chain/cash_karp54/plain")->Unit(benchmark::kMillisecond);
BENCHMARK(estimate_dropped<spring_chain, ck>)->Name("chain/cash_karp54/estimate_dropped")->Unit(benchmark::kMillisecond);
BENCHMARK(monitored<spring_chain, ck>)->Name("chain/cash_karp54/monitored")->Unit(benchmark::kMillisecond);

} // namespace
