// What a vouched reference costs: stepcert::reference_solution against "the plain way" of
// vouching for the same digits, two odeint Bulirsch–Stoer runs in cpp_bin_float_50 at
// tolerances 100x apart, both on one period of the Arenstorf orbit (published constants,
// built from decimal strings: E. Hairer, S. P. Nørsett, G. Wanner, Solving ODEs I, 2nd ed.,
// Springer 1993, §II.0). Also the per-evaluation cost of each scalar type and the evaluations
// each method needs, which chose the default type and method. One program run measures all;
// the summary at the end gives the ratios (median real time of 3 repetitions each).
// This program links libquadmath (stepcert_dev), so the cheap check may run in float128.
#define STEPCERT_HAVE_FLOAT128 1
#include "stepcert/reference/reference_solution.hpp"  // includes the odeint fix first

#include <algorithm>
#include <array>
#include <cmath>
#include <cstdio>
#include <map>
#include <string>
#include <vector>

#include <benchmark/benchmark.h>
#include <boost/numeric/odeint/integrate/integrate_adaptive.hpp>
#include <boost/numeric/odeint/stepper/bulirsch_stoer.hpp>
#include <boost/numeric/odeint/stepper/bulirsch_stoer_dense_out.hpp>

#include "stepcert/problems/arenstorf.hpp"

namespace {

namespace odeint = boost::numeric::odeint;
namespace pr = stepcert::problems;
using stepcert::cpp_bin_float_50;

const auto& orbit() {
    static const auto p = pr::arenstorf_orbit<cpp_bin_float_50>(pr::arenstorf_constants::published);
    return p;
}

/// One odeint run over the period in T; returns the end state and counts evaluations.
template <class T, class Stepper>
std::array<T, 4> odeint_period(Stepper stepper, std::size_t& evaluations) {
    using S = std::array<T, 4>;
    const auto& p = orbit();
    S y = stepcert::convert_state<S>(p.y0());
    const auto rhs = p.rhs();
    auto counted = [&](const S& x, S& dxdt, const T& t) {
        ++evaluations;
        rhs(x, dxdt, t);
    };
    odeint::integrate_adaptive(stepper, counted, y, T(0), static_cast<T>(p.t1()), T(1) / 100);
    return y;
}

/// -log10 of the largest relative difference: the same measure as vouched_digits.
template <class S>
double agreement(const S& a, const S& b) {
    return stepcert::agreement_digits(stepcert::compare_runs(std::vector<S>{a}, std::vector<S>{b}).largest_relative_difference,
                                      1.0, 50.0);
}

// The plain way: two Bulirsch–Stoer runs in cpp_bin_float_50 at 10^-a and 10^-(a+2), with
// odeint's controlled (bulirsch_stoer) or dense-output (bulirsch_stoer_dense_out) stepper.
using plain_real = cpp_bin_float_50;
using plain_state = std::array<plain_real, 4>;

template <class Stepper>
void plain_way(benchmark::State& state) {
    using T = plain_real;
    const double loose = std::pow(10.0, -static_cast<double>(state.range(0)));
    std::size_t evaluations = 0;
    double digits = 0;
    for (auto _ : state) {
        evaluations = 0;
        const auto a = odeint_period<T>(Stepper(T(loose), T(loose)), evaluations);
        const auto b = odeint_period<T>(Stepper(T(loose / 100), T(loose / 100)), evaluations);
        digits = agreement(b, a);
        benchmark::DoNotOptimize(digits);
    }
    state.counters["vouched_digits"] = digits;
    state.counters["evaluations"] = static_cast<double>(evaluations);
}
void plain_way_controlled(benchmark::State& state) { plain_way<odeint::bulirsch_stoer<plain_state, plain_real>>(state); }
void plain_way_dense(benchmark::State& state) { plain_way<odeint::bulirsch_stoer_dense_out<plain_state, plain_real>>(state); }

// stepcert's reference for the given digits; Checks as reference_solution takes them.
template <class Checks>
void reference_with(benchmark::State& state) {
    const int digits = static_cast<int>(state.range(0));
    stepcert::reference_result<std::array<stepcert::default_reference_real, 4>> r;
    for (auto _ : state) {
        r = stepcert::reference_solution<stepcert::default_reference_real, Checks>(orbit(), digits);
        benchmark::DoNotOptimize(r.states);
    }
    state.counters["vouched_digits"] = r.vouched_digits;
    state.counters["evaluations"] = static_cast<double>(r.cost.evaluations);
}
// The default check types (float128 first where STEPCERT_HAVE_FLOAT128 is defined).
void stepcert_reference(benchmark::State& state) { reference_with<stepcert::reference_check_types>(state); }
// Boost only: the check in cpp_bin_float_quad instead of float128.
void stepcert_reference_boost_only(benchmark::State& state) {
    reference_with<stepcert::type_list<long double, stepcert::cpp_bin_float_quad, stepcert::cpp_bin_float_38, stepcert::cpp_bin_float_50>>(state);
}

// Cost per evaluation, stepper included, of one run of `method` in T at tolerance 10^-a.
template <class T, class M>
void one_run(benchmark::State& state, const M& method) {
    const double tol = std::pow(10.0, -static_cast<double>(state.range(0)));
    std::size_t evaluations = 0;
    for (auto _ : state) {
        const auto tr = stepcert::run_adaptive<T>(orbit(), method, stepcert::controller_tolerance{tol, tol});
        evaluations = tr.stats.evaluations;
        benchmark::DoNotOptimize(tr.states);
    }
    state.counters["evaluations"] = static_cast<double>(evaluations);
    state.counters["us_per_evaluation"] =
        benchmark::Counter(static_cast<double>(evaluations) * static_cast<double>(state.iterations()),
                           benchmark::Counter::kIsRate | benchmark::Counter::kInvert);
}

template <class T>
void extrapolation20_in(benchmark::State& state) {
    one_run<T>(state, stepcert::extrapolation20_adaptive);
}

/// odeint's controlled Bulirsch–Stoer in T, driven as the plain way drives it, for the method comparison.
template <class T>
void odeint_bulirsch_stoer_in(benchmark::State& state) {
    const T tol = static_cast<T>(std::pow(10.0, -static_cast<double>(state.range(0))));
    std::size_t evaluations = 0;
    for (auto _ : state) {
        evaluations = 0;
        const auto y = odeint_period<T>(odeint::bulirsch_stoer<std::array<T, 4>, T>(tol, tol), evaluations);
        benchmark::DoNotOptimize(y);
    }
    state.counters["evaluations"] = static_cast<double>(evaluations);
    state.counters["us_per_evaluation"] =
        benchmark::Counter(static_cast<double>(evaluations) * static_cast<double>(state.iterations()),
                           benchmark::Counter::kIsRate | benchmark::Counter::kInvert);
}

/// Keeps the median real and CPU times (ms) of every benchmark, for the ratios printed at the
/// end (CPU time is the steadier measure on a shared machine; both are single-threaded).
class ratio_reporter : public benchmark::ConsoleReporter {
public:
    std::map<std::string, std::pair<double, double>> median_ms;
    void ReportRuns(const std::vector<Run>& reports) override {
        for (const Run& run : reports)
            if (run.aggregate_name == "median") {
                std::string name = run.benchmark_name();
                name = name.substr(0, name.find("/repeats"));
                median_ms[name] = {run.GetAdjustedRealTime(), run.GetAdjustedCPUTime()};
            }
        ConsoleReporter::ReportRuns(reports);
    }
};

} // namespace

#define STEPCERT_REFERENCE_BENCH(fn) \
    BENCHMARK(fn)->Unit(benchmark::kMillisecond)->Repetitions(3)->ReportAggregatesOnly(true)

// Which plain pair vouches 16 and 25 digits: 1e-20/1e-22 and 1e-28/1e-30 (measured: 1e-19/1e-21
// gives 15.7, 1e-26/1e-28 gives 23.5).
STEPCERT_REFERENCE_BENCH(plain_way_controlled)->Arg(19)->Arg(20)->Arg(26)->Arg(28);
STEPCERT_REFERENCE_BENCH(plain_way_dense)->Arg(20)->Arg(28);
STEPCERT_REFERENCE_BENCH(stepcert_reference)->Arg(16)->Arg(25);
STEPCERT_REFERENCE_BENCH(stepcert_reference_boost_only)->Arg(25);

// Per-evaluation cost by type (order-20 extrapolation at 1e-28; float128 is near its floor there).
#if defined(STEPCERT_HAVE_FLOAT128)
STEPCERT_REFERENCE_BENCH(extrapolation20_in<stepcert::float128>)->Arg(28);
#endif
STEPCERT_REFERENCE_BENCH(extrapolation20_in<stepcert::cpp_bin_float_quad>)->Arg(28);
STEPCERT_REFERENCE_BENCH(extrapolation20_in<stepcert::cpp_bin_float_38>)->Arg(28)->Arg(31);
STEPCERT_REFERENCE_BENCH(extrapolation20_in<stepcert::cpp_bin_float_50>)->Arg(28);
#if defined(STEPCERT_HAVE_MPFR)
STEPCERT_REFERENCE_BENCH(extrapolation20_in<stepcert::mpfr_float_50>)->Arg(28);
#endif
// Method comparison in the default type at the check's and the answer's tolerances.
STEPCERT_REFERENCE_BENCH(odeint_bulirsch_stoer_in<stepcert::cpp_bin_float_38>)->Arg(28)->Arg(31);

int main(int argc, char** argv) {
    benchmark::Initialize(&argc, argv);
    if (benchmark::ReportUnrecognizedArguments(argc, argv)) return 1;
    ratio_reporter reporter;
    benchmark::RunSpecifiedBenchmarks(&reporter);
    benchmark::Shutdown();
    const auto& m = reporter.median_ms;
    auto ratio = [&](const char* ours, const char* plain) {
        const auto a = m.find(ours), b = m.find(plain);
        if (a == m.end() || b == m.end()) return;
        std::printf("%-34s vs %-26s real %7.1f / %7.1f ms = %.3f   cpu %7.1f / %7.1f ms = %.3f\n", ours, plain,
                    a->second.first, b->second.first, a->second.first / b->second.first, a->second.second,
                    b->second.second, a->second.second / b->second.second);
    };
    std::printf("\nReference cost against the plain way (median of 3, same run):\n");
    ratio("stepcert_reference/25", "plain_way_controlled/28");
    ratio("stepcert_reference/25", "plain_way_dense/28");
    ratio("stepcert_reference_boost_only/25", "plain_way_controlled/28");
    ratio("stepcert_reference/16", "plain_way_controlled/20");
    ratio("stepcert_reference/16", "plain_way_dense/20");
    return 0;
}
