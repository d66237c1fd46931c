// How the cost of a step grows with the size of the system: classic RK4 on the busbar
// (problems/busbar_cooling.hpp, a method-of-lines heat equation) with 10^3, 10^4 and 10^5
// unknowns, on odeint's default algebra and on its OpenMP algebra (threads: OMP_NUM_THREADS,
// default all cores), and 10^6 for the default algebra and the control: past the step where the
// state leaves the core's cache, growth should be linear again. Each benchmark runs stepcert::run_uniform for a fixed number of stable steps
// (h k / dx^2 = 0.25) and reports items_per_second = unknowns x steps per second; the target is a
// cost per step that grows no worse than linearly with the unknowns (items_per_second about flat,
// or rising). Measure on an idle machine: OpenMP threads that wait for a busy core lose whole
// time slices.
// Run from a Release build with --benchmark_min_time=0.2
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <vector>

#include <benchmark/benchmark.h>

#ifdef _OPENMP
#include <omp.h>
#endif

#include "stepcert/methods/classic_rk4.hpp"
#include "stepcert/methods/classic_rk4_openmp.hpp"
#include "stepcert/core/problem.hpp"
#include "stepcert/problems/busbar_cooling.hpp"
#include "stepcert/run/run.hpp"

namespace {

constexpr std::size_t steps = 400;

template <class M>
void rk4_steps(benchmark::State& s, const M& method) {
    const auto cells = static_cast<std::size_t>(s.range(0));
    const double dx = 1.0 / static_cast<double>(cells + 1);
    const auto p = stepcert::problems::busbar_cooling(cells, static_cast<double>(steps) * 0.25 * dx * dx);
    for (auto _ : s) {
        auto run = stepcert::run_uniform(p, method, steps, steps);
        benchmark::DoNotOptimize(run.states.back().data());
    }
    s.SetItemsProcessed(static_cast<std::int64_t>(s.iterations() * steps * cells));
}

void default_algebra(benchmark::State& s) { rk4_steps(s, stepcert::classic_rk4); }

/// The busbar with Joule heating that rises with temperature, q exp(u / (1 + |u|)) per cell
/// (invented, like a reaction term in a reaction-diffusion model): one exp per unknown makes the
/// right-hand side compute-bound rather than memory-bound, so this separates the library's growth
/// from the caches'. Fused into one loop, so it reads and writes no more memory than the busbar.
struct heated_busbar_rhs {
    double q = 0.1;
    template <class S, class Time>
    void operator()(const S& u, S& dudt, const Time&) const {
        const std::size_t n = u.size();
        const double dx = 1.0 / static_cast<double>(n + 1), c = 1.0 / (dx * dx);
        for (std::size_t i = 0; i < n; ++i) {
            const double left = i > 0 ? u[i - 1] : 0.0, right = i + 1 < n ? u[i + 1] : 0.0;
            dudt[i] = c * (left - 2.0 * u[i] + right) + q * std::exp(u[i] / (1.0 + std::abs(u[i])));
        }
    }
};

void heated_default_algebra(benchmark::State& s) {
    const auto cells = static_cast<std::size_t>(s.range(0));
    const double dx = 1.0 / static_cast<double>(cells + 1);
    const auto busbar = stepcert::problems::busbar_cooling(cells);
    const auto p = stepcert::make_problem("heated_busbar", heated_busbar_rhs{}, busbar.y0(), 0.0,
                                          static_cast<double>(steps) * 0.25 * dx * dx);
    for (auto _ : s) {
        auto run = stepcert::run_uniform(p, stepcert::classic_rk4, steps, steps);
        benchmark::DoNotOptimize(run.states.back().data());
    }
    s.SetItemsProcessed(static_cast<std::int64_t>(s.iterations() * steps * cells));
}

/// The control: RK4 written out by hand over std::vector with the same right-hand side, no
/// stepcert and no odeint. If it grows like default_algebra, the growth is the machine's (the
/// state leaving the caches), not the library's.
void hand_written_loop(benchmark::State& s) {
    const auto cells = static_cast<std::size_t>(s.range(0));
    const double dx = 1.0 / static_cast<double>(cells + 1);
    const double h = 0.25 * dx * dx;
    const auto p = stepcert::problems::busbar_cooling(cells, static_cast<double>(steps) * h);
    const auto f = p.rhs();
    for (auto _ : s) {
        std::vector<double> y = p.y0(), k1(cells), k2(cells), k3(cells), k4(cells), tmp(cells);
        double t = 0.0;
        for (std::size_t n = 0; n < steps; ++n, t += h) {
            f(y, k1, t);
            for (std::size_t i = 0; i < cells; ++i) tmp[i] = y[i] + 0.5 * h * k1[i];
            f(tmp, k2, t + 0.5 * h);
            for (std::size_t i = 0; i < cells; ++i) tmp[i] = y[i] + 0.5 * h * k2[i];
            f(tmp, k3, t + 0.5 * h);
            for (std::size_t i = 0; i < cells; ++i) tmp[i] = y[i] + h * k3[i];
            f(tmp, k4, t + h);
            for (std::size_t i = 0; i < cells; ++i) y[i] += h / 6.0 * (k1[i] + 2.0 * k2[i] + 2.0 * k3[i] + k4[i]);
        }
        benchmark::DoNotOptimize(y.data());
    }
    s.SetItemsProcessed(static_cast<std::int64_t>(s.iterations() * steps * cells));
}
void openmp_algebra(benchmark::State& s) {
#ifdef _OPENMP
    // odeint's OpenMP algebra asks for schedule(runtime); libgomp's default is dynamic with chunk 1,
    // measured 50x slower here. Static chunks are what a stage sum wants (OMP_SCHEDULE=static).
    omp_set_schedule(omp_sched_static, 0);
    s.counters["threads"] = omp_get_max_threads();
#endif
    rk4_steps(s, stepcert::classic_rk4_openmp);
}

} // namespace

BENCHMARK(hand_written_loop)->Name("busbar/rk4/hand_written_loop")->Arg(1000)->Arg(10000)->Arg(100000)->Arg(1000000)->Unit(benchmark::kMicrosecond);
BENCHMARK(default_algebra)->Name("busbar/rk4/default_algebra")->Arg(1000)->Arg(10000)->Arg(100000)->Arg(1000000)->Unit(benchmark::kMicrosecond);
BENCHMARK(heated_default_algebra)->Name("heated_busbar/rk4/default_algebra")->Arg(1000)->Arg(10000)->Arg(100000)->Unit(benchmark::kMicrosecond);
BENCHMARK(openmp_algebra)->Name("busbar/rk4/openmp_algebra")->Arg(1000)->Arg(10000)->Arg(100000)->Unit(benchmark::kMicrosecond);
