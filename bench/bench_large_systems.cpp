// How the cost of a step grows with the size of the system: classic RK4 on the busbar
// (problems/busbar_cooling.hpp, a method-of-lines heat equation) with 10^3, 10^4 and 10^5
// unknowns, on odeint's default algebra and on its OpenMP algebra (threads: OMP_NUM_THREADS,
// default all cores). Each benchmark runs stepcert::run_uniform for a fixed number of stable steps
// (h k / dx^2 = 0.25) and reports items_per_second = unknowns x steps per second; the target is a
// cost per step that grows no worse than linearly with the unknowns (items_per_second about flat,
// or rising). Measure on an idle machine: OpenMP threads that wait for a busy core lose whole
// time slices.
// Run from a Release build with --benchmark_min_time=0.2
#include <cstddef>
#include <cstdint>

#include <benchmark/benchmark.h>

#ifdef _OPENMP
#include <omp.h>
#endif

#include "stepcert/methods/classic_rk4.hpp"
#include "stepcert/methods/classic_rk4_openmp.hpp"
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

BENCHMARK(default_algebra)->Name("busbar/rk4/default_algebra")->Arg(1000)->Arg(10000)->Arg(100000)->Unit(benchmark::kMicrosecond);
BENCHMARK(openmp_algebra)->Name("busbar/rk4/openmp_algebra")->Arg(1000)->Arg(10000)->Arg(100000)->Unit(benchmark::kMicrosecond);
