// Parallel cost–accuracy sweep: wall time of one sweep of 24 points (three fixed-step methods,
// eight step counts each, on Kepler's problem) on 1 and on 2 worker threads. The issue's
// acceptance: speed-up (time at 1 thread / time at 2 threads) >= 1.6 on two cores. Run with
//   --benchmark_repetitions=5 --benchmark_report_aggregates_only=true
// on an otherwise idle machine, from a build without STEPCERT_BENCH_OPTIMIZE.
// Two ladders: arithmetic step counts (points of about equal cost), and the geometric ladder a
// real sweep uses (ratio 2: a method's largest point is half its cost). The sweep starts the
// longest points first, so the geometric ladder is not left with one worker on its largest point.
#include <cstddef>
#include <vector>

#include <benchmark/benchmark.h>

#include "stepcert/methods/classic_rk4.hpp"
#include "stepcert/methods/explicit_euler.hpp"
#include "stepcert/methods/explicit_midpoint.hpp"
#include "stepcert/problems/kepler.hpp"
#include "stepcert/sweep/cost_accuracy_sweep.hpp"

namespace {

void sweep_on_threads(benchmark::State& bs, bool geometric) {
    stepcert::sweep_options o;
    o.output_times = 8;
    o.threads = static_cast<std::size_t>(bs.range(0));
    stepcert::cost_accuracy_sweep sweep(stepcert::problems::kepler(0.5, 100.0), o);
    std::vector<std::size_t> steps;
    for (std::size_t k = 0; k < 8; ++k) steps.push_back(geometric ? (std::size_t{1000} << k) : 40000 + 4000 * k);
    sweep.add_fixed_step(stepcert::explicit_euler, steps)
        .add_fixed_step(stepcert::explicit_midpoint, steps)
        .add_fixed_step(stepcert::classic_rk4, steps);
    std::size_t evaluations = 0;
    for (auto _ : bs) {
        const auto r = sweep.run();
        evaluations = 0;
        for (const auto& p : r.points) evaluations += p.evaluations;
    }
    bs.counters["points"] = static_cast<double>(sweep.point_count());
    bs.counters["evaluations"] = static_cast<double>(evaluations);
}

void arithmetic_ladder(benchmark::State& bs) { sweep_on_threads(bs, false); }
void geometric_ladder(benchmark::State& bs) { sweep_on_threads(bs, true); }

} // namespace

BENCHMARK(arithmetic_ladder)->Arg(1)->Arg(2)->UseRealTime()->Unit(benchmark::kMillisecond);
BENCHMARK(geometric_ladder)->Arg(1)->Arg(2)->UseRealTime()->Unit(benchmark::kMillisecond);
