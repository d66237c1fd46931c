// What the stability check costs on large systems, and how its two paths compare (issue 15, item 5).
// - busbar_1e5: classic RK4 on the busbar (problems/busbar_cooling.hpp) with 10^5 cells over 800
//   stable steps (h k / dx^2 = 0.5; RK4's limit is about 0.696). The check alone at the 9
//   output-grid states certify uses (matrix-free: a dense Jacobian would take 80 GB) against the
//   whole certification with certify's defaults: certify_step_count(800) (its one check included),
//   and the same with check_stability = false; and certify with its defaults on a fine hot-spot
//   pattern (mode 20,000, 64 steps at h k / dx^2 = 0.5), where it issues, against the same ladder
//   (first_steps = certify's own coarse start) with the check off. Target: the check at most 20 %
//   of the certification.
// - busbar_1000: the dense and the matrix-free check at one state, their times and their step
//   limits against the closed form (largest |lambda| = 4 (n + 1)^2 cos^2(pi / (2 (n + 1))), common
//   practice, no source).
// - threshold: one state, dense against matrix-free, by unknowns: what linear_stability_options::
//   dense_up_to is chosen from.
// - estimate_1e5: one extreme-eigenvalue estimate at 10^5 unknowns, our Lanczos against Spectra's
//   restarted Lanczos (SymEigsSolver, full reorthogonalization) at the same tolerance on the
//   residual: why symmetric Jacobians do not go through Spectra.
// The summary at the end gives the ratios from this one run.
// Run from a Release build without STEPCERT_BENCH_OPTIMIZE (about 2 min here) with
//   --benchmark_min_time=0.01
#include <chrono>
#include <cmath>
#include <cstddef>
#include <cstdio>
#include <map>
#include <string>
#include <vector>

#include <benchmark/benchmark.h>

#include <Spectra/SymEigsSolver.h>

// GCC 12 at -O3 reports a -Wrestrict false positive (a string concatenation in
// certify/detail/locate_non_smooth.hpp's windows_text, inlined here); reported to the lead.
#if defined(__GNUC__) && !defined(__clang__)
#pragma GCC diagnostic push
#pragma GCC diagnostic ignored "-Wrestrict"
#endif
#include "stepcert/certify/certify_fixed_step.hpp"
#include "stepcert/certify/certify_step_count.hpp"
#if defined(__GNUC__) && !defined(__clang__)
#pragma GCC diagnostic pop
#endif
#include "stepcert/certify/stability_check.hpp"
#include "stepcert/methods/classic_rk4.hpp"
#include "stepcert/problems/busbar_cooling.hpp"
#include "stepcert/run/run.hpp"
#include "stepcert/transport/extreme_eigenvalues.hpp"
#include "stepcert/transport/jacobian_product.hpp"

namespace {

constexpr double rk4_beta = 2.785293563405281624;  // shared reference values §6 (derived)
constexpr double pi = 3.14159265358979323846;      // common practice, no source
constexpr std::size_t large = 100000, steps = 800;

double largest_magnitude(std::size_t cells) {
    const double n1 = static_cast<double>(cells + 1);
    return 4.0 * n1 * n1 * std::pow(std::cos(pi / (2.0 * n1)), 2);
}

auto busbar(std::size_t cells) {
    const double dx = 1.0 / static_cast<double>(cells + 1);
    return stepcert::problems::busbar_cooling(cells, static_cast<double>(steps) * 0.5 * dx * dx);
}

stepcert::weighted_norm tolerance() {
    stepcert::weighted_norm tol;
    tol.atol = 1e-8;
    tol.rtol = 1e-8;
    return tol;
}

/// Seconds per iteration and figures of each benchmark, for the summary.
std::map<std::string, double>& seconds() {
    static std::map<std::string, double> s;
    return s;
}
std::map<std::string, double>& figures() {
    static std::map<std::string, double> f;
    return f;
}

template <class F>
void timed(benchmark::State& s, const std::string& name, F&& body) {
    double total = 0.0;
    std::size_t n = 0;
    for (auto _ : s) {
        const auto t0 = std::chrono::steady_clock::now();
        body();
        total += std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
        ++n;
    }
    seconds()[name] = total / static_cast<double>(n);
}

/// The 9 output-grid states of the 800-step run (certify's 8 output times and t0).
const stepcert::trajectory<std::vector<double>>& large_run() {
    static const auto run = stepcert::run_uniform(busbar(large), stepcert::classic_rk4, steps, steps / 8);
    return run;
}

void check_large(benchmark::State& s) {
    const auto p = busbar(large);
    const auto& run = large_run();
    const double h = p.t1() / static_cast<double>(steps);
    stepcert::linear_stability_verdict v;
    timed(s, "check_1e5", [&] { v = stepcert::check_linear_stability(p, stepcert::classic_rk4, h, run); });
    s.counters["samples"] = static_cast<double>(v.samples);
    s.counters["products"] = static_cast<double>(v.jacobian_products);
    s.counters["evaluations"] = static_cast<double>(v.rhs_evaluations);
    s.counters["limit_vs_closed_form"] = v.step_limit / (rk4_beta / largest_magnitude(large));
    figures()["check_1e5_evaluations"] = static_cast<double>(v.rhs_evaluations);
    figures()["check_1e5_limit_ratio"] = v.step_limit / (rk4_beta / largest_magnitude(large));
}

void certify_large(benchmark::State& s, bool check) {
    const auto p = busbar(large);
    stepcert::certify_options opt;
    opt.check_stability = check;
    stepcert::step_certificate c;
    const std::string name = check ? "certify_step_count_1e5" : "certify_step_count_1e5_no_check";
    timed(s, name, [&] { c = stepcert::certify_step_count(p, stepcert::classic_rk4, steps, tolerance(), opt); });
    s.counters["issued"] = c.level != stepcert::evidence_level::not_certified;
    s.counters["evaluations"] = static_cast<double>(c.evaluations);
    figures()[name + "_evaluations"] = static_cast<double>(c.evaluations);
    figures()[name + "_issued"] = c.level != stepcert::evidence_level::not_certified;
}
void certify_with_check(benchmark::State& s) { certify_large(s, true); }
void certify_without_check(benchmark::State& s) { certify_large(s, false); }

/// The fine hot-spot pattern (mode 20,000) over 64 steps of h k / dx^2 = 0.5: certify issues there.
auto busbar_high_mode() {
    const double dx = 1.0 / static_cast<double>(large + 1);
    return stepcert::problems::busbar_cooling(large, 64 * 0.5 * dx * dx, 1.0, 20000);
}

/// certify's own coarse start (certify_fixed_step.hpp): 8 steps, or, if unstable at y0, the
/// stability limit there over 0.95, rounded up to a multiple of the 8 output times.
std::size_t coarse_start(const decltype(busbar_high_mode())& p) {
    const double length = p.t1() - p.t0();
    const auto v = stepcert::check_linear_stability(p, stepcert::classic_rk4, length / 8.0, std::vector<std::vector<double>>{p.y0()},
                                                    std::vector<double>{p.t0()});
    if (v.stable || !std::isfinite(v.step_limit)) return 8;
    const auto n = static_cast<std::size_t>(std::ceil(length / (0.95 * v.step_limit)));
    return std::max<std::size_t>(8, (n + 7) / 8 * 8);
}

void certify_full(benchmark::State& s, bool check) {
    const auto p = busbar_high_mode();
    stepcert::certify_options opt;
    if (!check) {
        opt.check_stability = false;
        opt.first_steps = coarse_start(p);  // the ladder the checked certification climbs
    }
    stepcert::step_certificate c;
    const std::string name = check ? "certify_1e5" : "certify_1e5_no_check";
    timed(s, name, [&] { c = stepcert::certify(p, stepcert::classic_rk4, tolerance(), opt); });
    s.counters["issued"] = c.level != stepcert::evidence_level::not_certified;
    s.counters["steps"] = static_cast<double>(c.steps);
    s.counters["evaluations"] = static_cast<double>(c.evaluations);
    figures()[name + "_evaluations"] = static_cast<double>(c.evaluations);
    figures()[name + "_steps"] = static_cast<double>(c.steps);
    figures()[name + "_issued"] = c.level != stepcert::evidence_level::not_certified;
}
void certify_full_with_check(benchmark::State& s) { certify_full(s, true); }
void certify_full_without_check(benchmark::State& s) { certify_full(s, false); }

void one_state(benchmark::State& s, stepcert::eigenvalue_path path, const std::string& name) {
    const auto cells = static_cast<std::size_t>(s.range(0));
    const auto p = busbar(cells);
    stepcert::linear_stability_options opt;
    opt.eigenvalues = path;
    const std::vector<std::vector<double>> state{p.y0()};
    const std::vector<double> t{0.0};
    const double limit = rk4_beta / largest_magnitude(cells);
    stepcert::linear_stability_verdict v;
    const std::string key = name + "_" + std::to_string(cells);
    timed(s, key, [&] { v = stepcert::check_linear_stability(p, stepcert::classic_rk4, 0.5 * limit, state, t, opt); });
    s.counters["limit_vs_closed_form"] = v.step_limit / limit;
    figures()[key + "_limit_ratio"] = v.step_limit / limit;
}
void dense_state(benchmark::State& s) { one_state(s, stepcert::eigenvalue_path::dense, "dense"); }
void matrix_free_state(benchmark::State& s) { one_state(s, stepcert::eigenvalue_path::matrix_free, "matrix_free"); }

/// The busbar's Jacobian products at y0 of 10^5 cells, for Spectra.
struct spectra_products {
    using Scalar = double;
    stepcert::jacobian_product<decltype(busbar(1))>* op;
    Eigen::Index rows() const { return static_cast<Eigen::Index>(op->size()); }
    Eigen::Index cols() const { return rows(); }
    void perform_op(const double* x, double* y) const { op->apply(x, y); }
};

void estimate_lanczos(benchmark::State& s) {
    const auto p = busbar(large);
    stepcert::extreme_eigenvalue_estimate est;
    std::size_t products = 0;
    timed(s, "lanczos_1e5", [&] {
        stepcert::jacobian_product op(p, p.y0(), 0.0, 10000);
        est = stepcert::estimate_extreme_eigenvalues(op);
        products = op.products();
    });
    double left = 0.0;
    for (const auto& e : est.eigenvalues) left = std::min(left, e.value.real());
    s.counters["products"] = static_cast<double>(products);
    s.counters["leftmost_error"] = left / -largest_magnitude(large) - 1.0;
    figures()["lanczos_1e5_products"] = static_cast<double>(products);
    figures()["lanczos_1e5_error"] = left / -largest_magnitude(large) - 1.0;
}

void estimate_spectra(benchmark::State& s) {
    const auto p = busbar(large);
    const stepcert::extreme_eigenvalue_options defaults;
    double left = 0.0;
    std::size_t products = 0;
    bool converged = false;
    timed(s, "spectra_1e5", [&] {
        stepcert::jacobian_product op(p, p.y0(), 0.0, 100000);
        spectra_products sop{&op};
        Spectra::SymEigsSolver<spectra_products> solver(sop, static_cast<Eigen::Index>(defaults.count),
                                                        static_cast<Eigen::Index>(defaults.krylov_dimension));
        solver.init();
        solver.compute(Spectra::SortRule::SmallestAlge, 1000, defaults.tolerance, Spectra::SortRule::SmallestAlge);
        converged = solver.info() == Spectra::CompInfo::Successful;
        left = converged ? solver.eigenvalues()[0] : 0.0;
        products = op.products();
    });
    s.counters["products"] = static_cast<double>(products);
    s.counters["converged"] = converged;
    s.counters["leftmost_error"] = left / -largest_magnitude(large) - 1.0;
    figures()["spectra_1e5_products"] = static_cast<double>(products);
    figures()["spectra_1e5_converged"] = converged;
}

void summarize() {
    auto& t = seconds();
    auto& f = figures();
    auto have = [&](const char* k) { return t.count(k) > 0; };
    std::printf("\nSummary (one run):\n");
    if (have("check_1e5") && have("certify_step_count_1e5")) {
        std::printf("busbar 10^5, RK4, 800 steps: check at 9 states %.3f s (%.0f evaluations, step limit / closed form %.6f); "
                    "certify_step_count with its defaults %.3f s (%.0f evaluations, issued %s)\n",
                    t["check_1e5"], f["check_1e5_evaluations"], f["check_1e5_limit_ratio"], t["certify_step_count_1e5"],
                    f["certify_step_count_1e5_evaluations"], f["certify_step_count_1e5_issued"] > 0 ? "yes" : "NO");
        std::printf("  check / certification: %.1f %% of the time, %.1f %% of the evaluations (target: at most 20 %%)\n",
                    100.0 * t["check_1e5"] / t["certify_step_count_1e5"],
                    100.0 * f["check_1e5_evaluations"] / f["certify_step_count_1e5_evaluations"]);
        if (have("certify_step_count_1e5_no_check"))
            std::printf("  certification without the check %.3f s: the check adds %.1f %%\n", t["certify_step_count_1e5_no_check"],
                        100.0 * (t["certify_step_count_1e5"] / t["certify_step_count_1e5_no_check"] - 1.0));
    }
    if (have("certify_1e5") && have("certify_1e5_no_check"))
        std::printf("busbar 10^5 mode 20000, certify with its defaults: %.3f s, %.0f evaluations, %.0f steps, issued %s; the same "
                    "ladder without the check: %.3f s, %.0f evaluations, %.0f steps\n"
                    "  the check's share of the certification: %.1f %% of the time, %.1f %% of the evaluations (target: at most "
                    "20 %%)\n",
                    t["certify_1e5"], f["certify_1e5_evaluations"], f["certify_1e5_steps"], f["certify_1e5_issued"] > 0 ? "yes" : "NO",
                    t["certify_1e5_no_check"], f["certify_1e5_no_check_evaluations"], f["certify_1e5_no_check_steps"],
                    100.0 * (1.0 - t["certify_1e5_no_check"] / t["certify_1e5"]),
                    100.0 * (1.0 - f["certify_1e5_no_check_evaluations"] / f["certify_1e5_evaluations"]));
    if (have("dense_1000") && have("matrix_free_1000"))
        std::printf("busbar 1000, one state: dense %.3f s, matrix-free %.5f s (%.0fx); step limit / closed form: dense %.9f, "
                    "matrix-free %.6f (agreement %.3f %%)\n",
                    t["dense_1000"], t["matrix_free_1000"], t["dense_1000"] / t["matrix_free_1000"], f["dense_1000_limit_ratio"],
                    f["matrix_free_1000_limit_ratio"],
                    100.0 * std::abs(f["matrix_free_1000_limit_ratio"] / f["dense_1000_limit_ratio"] - 1.0));
    for (const int n : {100, 200, 400, 800})
        if (t.count("dense_" + std::to_string(n)) && t.count("matrix_free_" + std::to_string(n)))
            std::printf("threshold, %d unknowns: dense %.4f s, matrix-free %.5f s per state\n", n, t["dense_" + std::to_string(n)],
                        t["matrix_free_" + std::to_string(n)]);
    if (have("lanczos_1e5") && have("spectra_1e5"))
        std::printf("one estimate at 10^5: Lanczos %.4f s (%.0f products, leftmost error %.2e), Spectra SymEigsSolver %.4f s "
                    "(%.0f products, converged %s): %.0fx\n",
                    t["lanczos_1e5"], f["lanczos_1e5_products"], f["lanczos_1e5_error"], t["spectra_1e5"],
                    f["spectra_1e5_products"], f["spectra_1e5_converged"] > 0 ? "yes" : "NO", t["spectra_1e5"] / t["lanczos_1e5"]);
}

} // namespace

BENCHMARK(check_large)->Name("busbar_1e5/check_9_states")->Unit(benchmark::kMillisecond)->Iterations(3);
BENCHMARK(certify_with_check)->Name("busbar_1e5/certify_step_count")->Unit(benchmark::kMillisecond)->Iterations(2);
BENCHMARK(certify_without_check)->Name("busbar_1e5/certify_step_count_no_check")->Unit(benchmark::kMillisecond)->Iterations(2);
BENCHMARK(certify_full_with_check)->Name("busbar_1e5_mode20000/certify")->Unit(benchmark::kMillisecond)->Iterations(2);
BENCHMARK(certify_full_without_check)->Name("busbar_1e5_mode20000/certify_no_check_same_ladder")->Unit(benchmark::kMillisecond)->Iterations(2);
BENCHMARK(dense_state)->Name("one_state/dense")->Arg(100)->Arg(200)->Arg(400)->Arg(800)->Arg(1000)->Unit(benchmark::kMillisecond)->Iterations(2);
BENCHMARK(matrix_free_state)->Name("one_state/matrix_free")->Arg(100)->Arg(200)->Arg(400)->Arg(800)->Arg(1000)->Unit(benchmark::kMillisecond)->Iterations(20);
BENCHMARK(estimate_lanczos)->Name("estimate_1e5/lanczos")->Unit(benchmark::kMillisecond)->Iterations(5);
BENCHMARK(estimate_spectra)->Name("estimate_1e5/spectra_symmetric")->Unit(benchmark::kMillisecond)->Iterations(2);

int main(int argc, char** argv) {
    benchmark::Initialize(&argc, argv);
    if (benchmark::ReportUnrecognizedArguments(argc, argv)) return 1;
    benchmark::RunSpecifiedBenchmarks();
    benchmark::Shutdown();
    summarize();
    return 0;
}
