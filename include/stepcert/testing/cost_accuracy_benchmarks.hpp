#pragma once
// Google Benchmark registration for a team's own bench/ (optional: needs Google Benchmark; not in
// stepcert.hpp): one benchmark per (method, step count or controller tolerance) that times the
// run and reports, beside the time, the accuracy it bought, so cost and accuracy are tracked
// together over time:
//   stepcert::testing::cost_accuracy_benchmarks b("kepler", stepcert::problems::kepler(0.5, 20.0));
//   b.add_fixed_step(stepcert::classic_rk4, {256, 512, 1024});
//   b.add_adaptive(stepcert::dormand_prince54_adaptive, std::vector<double>{1e-6, 1e-8});
// registers kepler/classic RK4/steps:256 ... with user counters error (max over the output times,
// against the exact solution or the multiprecision reference), evaluations and steps. The truth is
// computed once, in an untimed run before the first benchmark's timing starts. The registrations own what they use: the
// object may go out of scope before benchmark::RunSpecifiedBenchmarks().
#include <cstddef>
#include <cstdio>
#include <memory>
#include <string>
#include <utility>
#include <vector>

#include <benchmark/benchmark.h>

#include "stepcert/sweep/cost_accuracy_sweep.hpp"

namespace stepcert::testing {

template <problem_like P>
class cost_accuracy_benchmarks {
public:
    /// Benchmarks are named prefix/method/steps:N or prefix/method/tol:atol,rtol.
    cost_accuracy_benchmarks(std::string prefix, P problem, sweep_options options = {})
        : prefix_(std::move(prefix)), sweep_(std::make_shared<cost_accuracy_sweep<P>>(std::move(problem), std::move(options))) {}

    template <class M>
    cost_accuracy_benchmarks& add_fixed_step(const M& method, const std::vector<std::size_t>& step_counts) {
        sweep_->add_fixed_step(method, step_counts);  // checks the method and the ladder
        const std::size_t index = sweep_->method_count() - 1;
        for (std::size_t n : step_counts) add(index, sweep_setting::fixed(n), "steps:" + std::to_string(n));
        return *this;
    }

    template <class M>
    cost_accuracy_benchmarks& add_adaptive(const M& method, const std::vector<controller_tolerance>& tolerances) {
        sweep_->add_adaptive(method, tolerances);
        const std::size_t index = sweep_->method_count() - 1;
        for (const controller_tolerance& t : tolerances)
            add(index, sweep_setting::adaptive(t), "tol:" + detail::formatted_number(t.atol, "%.3g") + "," +
                                                       detail::formatted_number(t.rtol, "%.3g"));
        return *this;
    }

    template <class M>
    cost_accuracy_benchmarks& add_adaptive(const M& method, const std::vector<double>& tolerances) {
        std::vector<controller_tolerance> both;
        for (double t : tolerances) both.push_back({t, t});
        return add_adaptive(method, both);
    }

    /// The registered benchmarks, in the order added (for ->Unit(), ->Repetitions() ...).
    const std::vector<benchmark::internal::Benchmark*>& registered() const { return registered_; }

private:
    void add(std::size_t index, sweep_setting setting, const std::string& label) {
        const std::string name = prefix_ + "/" + sweep_->method_name(index) + "/" + label;
        auto sweep = sweep_;
        registered_.push_back(benchmark::RegisterBenchmark(name.c_str(), [sweep, index, setting](benchmark::State& s) {
            // One untimed run first: it computes the truth (once per object) outside the timing.
            sweep_point last = sweep->run_point(index, setting);
            // No DoNotOptimize: a run has effects the compiler keeps, and Google Benchmark 1.7's
            // DoNotOptimize on a double lvalue was seen to corrupt it here (GCC 12, -O1).
            for (auto _ : s) last = sweep->run_point(index, setting);
            if (!last.ok()) {
                s.SkipWithError(("the run failed: " + last.message).c_str());
                return;
            }
            s.counters["error"] = last.error;
            s.counters["evaluations"] = static_cast<double>(last.evaluations);
            s.counters["steps"] = static_cast<double>(last.steps);
        }));
    }

    std::string prefix_;
    std::shared_ptr<cost_accuracy_sweep<P>> sweep_;
    std::vector<benchmark::internal::Benchmark*> registered_;
};

} // namespace stepcert::testing
