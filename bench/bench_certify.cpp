// What a step certification costs against one production run at the step it certifies, on the
// suite of tests/test_acceptance_certify.cpp (10 problems x 4 methods x 3 tolerances), at the
// estimated level (Richardson x safety factor, no reference consulted; 8 output times).
// Per case, certify/<case> runs stepcert::certify and reports cost_ratio (its right-hand-side
// evaluations / those of one production run at the certified step N), steps (N) and issued;
// production/<case> times that one production run, so the wall-time ratio comes from the same
// program run. The summary at the end gives median, 90th percentile and max of both ratios, the
// share within the acceptance target (at most 3x the evaluations of one production run), the
// ratio against one run of the finest run the evidence needed (search_ratio: where the order only
// shows on runs finer than the certified one, the search cannot cost less than those), and, for
// the worst cases, the certificate's basis and the runs its search made, traced by certifying once
// more with a right-hand side that logs its calls (which also checks certificate.evaluations).
// Run from a Release build (about 25 s here) with
//   --benchmark_min_time=0.05
#include <algorithm>
#include <cmath>
#include <cstddef>
#include <cstdio>
#include <deque>
#include <functional>
#include <limits>
#include <map>
#include <memory>
#include <string>
#include <utility>
#include <vector>

#include <unistd.h>

#include <benchmark/benchmark.h>

#include "stepcert/certify/certify_fixed_step.hpp"
#include "stepcert/methods/classic_rk4.hpp"
#include "stepcert/methods/dormand_prince54.hpp"
#include "stepcert/methods/explicit_midpoint.hpp"
#include "stepcert/methods/tableau_method.hpp"
#include "stepcert/problems/dahlquist.hpp"
#include "stepcert/problems/harmonic_oscillator.hpp"
#include "stepcert/problems/kepler.hpp"
#include "stepcert/problems/linear_system.hpp"
#include "stepcert/problems/prothero_robinson.hpp"
#include "stepcert/problems/small_satellite.hpp"
#include "stepcert/problems/suspension_rig.hpp"
#include "stepcert/run/run.hpp"
#include "stepcert/tableau/catalogue.hpp"

namespace {

constexpr double cost_target = 3.0;  // the project's acceptance target, in evaluations

stepcert::certify_options estimated_level() {
    stepcert::certify_options opt;
    opt.output_times = 8;
    opt.verify_with_reference = false;
    return opt;
}

/// The runs of one certification in order (steps), and its evaluations by where they went, in
/// production runs at the certified N.
struct search_trace {
    std::string runs;
    double coarser = 0.0, at_n = 0.0, finer = 0.0, stability = 0.0;
    double blown_up = 0.0;      ///< runs stopped by NaN or infinity (part of coarser)
    double total = 0.0;         ///< everything the right-hand side was called for
    double uncounted = 0.0;     ///< total - certificate.evaluations
    std::size_t below = 0;      ///< complete runs coarser than N
    std::size_t creeping = 0;   ///< of those, runs at most 1.3x finer than the run before
    std::size_t finer_runs = 0;
};

/// One case of the suite, filled by its certify benchmark (or by its production one when the
/// certify benchmark was filtered out).
struct case_record {
    std::string label;  ///< problem/method/tol
    bool done = false;
    bool issued = false;
    std::size_t steps = 0, certify_evaluations = 0, production_evaluations = 0;
    double cost_ratio = std::numeric_limits<double>::quiet_NaN();
    /// Evaluations / one production run of the finest run the evidence needed: the certified run,
    /// or the finer run a pre-asymptotic one was judged from ("from the run with M steps").
    double search_ratio = std::numeric_limits<double>::quiet_NaN();
    std::size_t evidence_steps = 0;
    std::string basis;  ///< the certificate's basis, or its refusal
    std::function<search_trace(const case_record&)> trace;  ///< certifies once more, traced
};

/// A deque: records keep their addresses (the benchmarks hold references) while cases are added.
std::deque<case_record>& cases() {
    static std::deque<case_record> all;
    return all;
}

template <class P, class M>
void record(case_record& r, const P& p, const M& m, const stepcert::step_certificate& c) {
    r.done = true;
    r.issued = c.issued();
    r.steps = c.steps;
    r.certify_evaluations = c.evaluations;
    if (r.issued) {
        r.production_evaluations = stepcert::run_uniform(p, m, c.steps).stats.evaluations;
        r.cost_ratio = static_cast<double>(c.evaluations) / static_cast<double>(r.production_evaluations);
        r.basis = c.basis;
        const std::string key = "from the run with ";
        const auto at = c.basis.find(key);
        r.evidence_steps = at == std::string::npos ? c.steps : std::stoul(c.basis.substr(at + key.size()));
        r.search_ratio = static_cast<double>(c.evaluations) /
                         static_cast<double>(stepcert::run_uniform(p, m, r.evidence_steps).stats.evaluations);
    } else {
        r.basis = std::string(stepcert::to_string(c.reason));
        r.basis += ": ";
        r.basis += c.reason_detail;
    }
}

/// The right-hand-side calls of one certification, cut into segments: a run starts at (t0, y0)
/// exactly; any other call after time went backwards begins a stability check (central-difference
/// Jacobians at sample states, never at y0 itself). The four methods' stage times never decrease.
struct call_log {
    double t0 = 0.0;
    std::vector<double> y0;
    double last_t = -std::numeric_limits<double>::infinity();
    struct segment {
        bool run;
        std::size_t evaluations;
        double last_t;
    };
    std::vector<segment> segments;

    template <class S>
    void note(const S& y, double t) {
        bool start = t == t0 && stepcert::state_size(y) == y0.size();
        for (std::size_t i = 0; start && i < y0.size(); ++i) start = static_cast<double>(y[i]) == y0[i];
        if (start || segments.empty() || t < last_t) segments.push_back({start, 0, t});
        ++segments.back().evaluations;
        segments.back().last_t = last_t = t;
    }
};

template <class Rhs>
struct traced_rhs {
    Rhs inner;
    call_log* log;
    template <class S, class T>
    void operator()(const S& y, S& dydt, T t) const {
        log->note(y, static_cast<double>(t));
        inner(y, dydt, t);
    }
};

/// Certifies a traced copy of p (same right-hand side and Jacobian) and reads off the runs; a
/// run's steps come from its evaluations, a n + b with a and b measured at N and 2N (coarser runs
/// may blow up). A run that ends short of t1 stopped at NaN or infinity (checked at output times).
template <class P, class M>
search_trace trace_search(const P& p, const M& m, const stepcert::weighted_norm& tol, const case_record& r) {
    call_log log;
    log.t0 = static_cast<double>(p.t0());
    for (std::size_t i = 0; i < p.dimension(); ++i) log.y0.push_back(static_cast<double>(p.y0()[i]));
    using traced = stepcert::problem<typename P::state_type, traced_rhs<typename P::rhs_type>, stepcert::none_given,
                                     typename P::jacobian_type>;
    const traced q(p.name(), traced_rhs<typename P::rhs_type>{p.rhs(), &log}, p.y0(), p.t0(), p.t1(), {}, p.jacobian(),
                   p.separable());
    const auto c = stepcert::certify(q, m, tol, estimated_level());
    const double n = static_cast<double>(r.steps), production = static_cast<double>(r.production_evaluations);
    const double a = static_cast<double>(stepcert::run_uniform(p, m, 2 * r.steps).stats.evaluations - r.production_evaluations) / n;
    const double b = production - a * n;
    const double t1 = static_cast<double>(p.t1()), span = t1 - log.t0;
    search_trace out;
    double previous = 0.0;
    std::size_t calls = 0;
    for (const auto& seg : log.segments) {
        const double e = static_cast<double>(seg.evaluations) / production;
        calls += seg.evaluations;
        if (!seg.run) {
            out.stability += e;
            continue;
        }
        const double steps = (static_cast<double>(seg.evaluations) - b) / a;
        char buf[96];
        if (seg.last_t < t1 - 0.75 * span / steps) {
            std::snprintf(buf, sizeof buf, "blew up by t = %.3g", seg.last_t);
            out.blown_up += e;
            out.coarser += e;
        } else {
            std::snprintf(buf, sizeof buf, steps == std::floor(steps) ? "%.0f%s" : "~%.1f%s", steps, steps == n ? " (N)" : "");
            (steps < n ? out.coarser : steps > n ? out.finer : out.at_n) += e;
            if (steps < n) {
                ++out.below;
                if (previous > 0.0 && steps <= 1.3 * previous) ++out.creeping;
            }
            if (steps > n) ++out.finer_runs;
            previous = steps;
        }
        if (!out.runs.empty()) out.runs += ", ";
        out.runs += buf;
    }
    out.total = static_cast<double>(calls) / production;
    out.uncounted = (static_cast<double>(calls) - static_cast<double>(c.evaluations)) / production;
    if (c.steps != r.steps) out.runs += " [the traced certificate differs: N = " + std::to_string(c.steps) + "]";
    return out;
}

template <class P, class M>
void add_cases(std::shared_ptr<const P> p, const std::string& problem_label, std::shared_ptr<const M> m,
               const std::string& method_label) {
    for (double tol_value : {1e-3, 1e-5, 1e-7}) {
        char tol_text[16];
        std::snprintf(tol_text, sizeof tol_text, "%.0e", tol_value);
        case_record& r = cases().emplace_back();
        r.label = problem_label;
        r.label += '/';
        r.label += method_label;
        r.label += "/tol:";
        r.label += tol_text;
        const stepcert::weighted_norm tol{tol_value, tol_value, stepcert::norm_kind::max};
        r.trace = [p, m, tol](const case_record& done) { return trace_search(*p, *m, tol, done); };
        benchmark::RegisterBenchmark(("certify/" + r.label).c_str(), [p, m, tol, &r](benchmark::State& s) {
            const auto opt = estimated_level();
            stepcert::step_certificate c;
            for (auto _ : s) {
                c = stepcert::certify(*p, *m, tol, opt);
                benchmark::DoNotOptimize(c.steps);
            }
            record(r, *p, *m, c);
            s.counters["cost_ratio"] = r.cost_ratio;
            s.counters["search_ratio"] = r.search_ratio;
            s.counters["steps"] = static_cast<double>(r.steps);
            s.counters["issued"] = r.issued ? 1.0 : 0.0;
        })->Unit(benchmark::kMicrosecond);
        benchmark::RegisterBenchmark(("production/" + r.label).c_str(), [p, m, tol, &r](benchmark::State& s) {
            if (!r.done) record(r, *p, *m, stepcert::certify(*p, *m, tol, estimated_level()));
            if (!r.issued) {
                s.SkipWithError("not certified: no production step");
                return;
            }
            for (auto _ : s) {
                auto run = stepcert::run_uniform(*p, *m, r.steps);
                benchmark::DoNotOptimize(run.states.back());
            }
            s.counters["steps"] = static_cast<double>(r.steps);
            s.counters["evaluations"] = static_cast<double>(r.production_evaluations);
        })->Unit(benchmark::kMicrosecond);
    }
}

template <class P>
void add_problem(P problem, const std::string& label) {
    using midpoint_t = std::decay_t<decltype(stepcert::explicit_midpoint)>;
    using kutta3_t = decltype(stepcert::tableau_method(stepcert::tableaus::kutta3<double>()));
    using rk4_t = std::decay_t<decltype(stepcert::classic_rk4)>;
    using dp54_t = std::decay_t<decltype(stepcert::dormand_prince54)>;
    static const auto midpoint = std::make_shared<const midpoint_t>(stepcert::explicit_midpoint);
    static const auto kutta3 = std::make_shared<const kutta3_t>(stepcert::tableau_method(stepcert::tableaus::kutta3<double>()));
    static const auto rk4 = std::make_shared<const rk4_t>(stepcert::classic_rk4);
    static const auto dp54 = std::make_shared<const dp54_t>(stepcert::dormand_prince54);
    const auto p = std::make_shared<const P>(std::move(problem));
    add_cases(p, label, midpoint, "midpoint");
    add_cases(p, label, kutta3, "kutta3");
    add_cases(p, label, rk4, "rk4");
    add_cases(p, label, dp54, "dopri54");
}

/// Prints as usual (counters inline: the two kinds of benchmark carry different ones, and a
/// table would repeat its header at every change) and keeps each run's times per iteration.
class timing_reporter : public benchmark::ConsoleReporter {
public:
    timing_reporter() : ConsoleReporter(isatty(STDOUT_FILENO) ? OO_Color : OO_None) {}
    std::map<std::string, std::vector<double>> real_us, cpu_us;  ///< every benchmark here runs in microseconds
    void ReportRuns(const std::vector<Run>& reports) override {
        for (const auto& run : reports)
            if (run.run_type == Run::RT_Iteration && !run.error_occurred) {
                real_us[run.benchmark_name()].push_back(run.GetAdjustedRealTime());
                cpu_us[run.benchmark_name()].push_back(run.GetAdjustedCPUTime());
            }
        ConsoleReporter::ReportRuns(reports);
    }
};

double median(std::vector<double> v) {
    std::sort(v.begin(), v.end());
    const std::size_t n = v.size();
    return n == 0 ? std::nan("") : n % 2 ? v[n / 2] : 0.5 * (v[n / 2 - 1] + v[n / 2]);
}

/// Nearest-rank percentile.
double percentile(std::vector<double> v, double q) {
    if (v.empty()) return std::nan("");
    std::sort(v.begin(), v.end());
    const auto rank = static_cast<std::size_t>(std::ceil(q * static_cast<double>(v.size())));
    return v[std::clamp<std::size_t>(rank, 1, v.size()) - 1];
}

void print_distribution(const char* what, const std::vector<double>& v) {
    const auto within = std::count_if(v.begin(), v.end(), [](double x) { return x <= cost_target; });
    std::printf("%-34s median %6.2f   p90 %6.2f   max %7.2f   within %.0fx: %ld of %zu (%.0f %%)\n", what, median(v),
                percentile(v, 0.9), v.empty() ? std::nan("") : *std::max_element(v.begin(), v.end()), cost_target,
                static_cast<long>(within), v.size(),
                v.empty() ? 0.0 : 100.0 * static_cast<double>(within) / static_cast<double>(v.size()));
}

/// Why a case costs what it does: the runs its search made, and where the evaluations went.
std::string explain(const search_trace& t) {
    std::string out = "runs made, in order (steps): " + t.runs;
    char buf[400];
    std::snprintf(buf, sizeof buf,
                  "\n   in production runs at N: coarser runs %.2f + the run at N %.2f + finer runs %.2f + stability "
                  "check %.2f = %.2f",
                  t.coarser, t.at_n, t.finer, t.stability, t.total);
    out += buf;
    if (t.creeping >= 3) {
        std::snprintf(buf, sizeof buf,
                      "\n   why: %zu of the %zu complete runs below N were at most 1.3x finer than the one before: the "
                      "ladder aimed at a prediction more than once (a ladder of 1.25x steps costs up to 4 N below N; "
                      "doubling: up to 1 N)",
                      t.creeping, t.below);
        out += buf;
    }
    if (t.finer_runs > 0) {
        std::snprintf(buf, sizeof buf,
                      "\n   why: %zu run(s) finer than N (%.2f production runs): the declared order first showed on three "
                      "levels reaching above N; N is judged by its difference from the finest of them plus that run's band",
                      t.finer_runs, t.finer);
        out += buf;
    }
    if (t.blown_up > 0.0) {
        std::snprintf(buf, sizeof buf, "\n   runs that blew up cost %.2f production runs", t.blown_up);
        out += buf;
    }
    if (std::abs(t.uncounted) > 1e-12) {
        std::snprintf(buf, sizeof buf, "\n   certificate.evaluations leaves out %.2f production runs%s", t.uncounted,
                      std::abs(t.uncounted - t.blown_up) < 1e-9 ? " (the runs that blew up)" : "");
        out += buf;
    }
    return out;
}

/// Median cost_ratio and share within the target, over the cases whose label contains key.
void print_group(const std::vector<const case_record*>& issued, const std::string& key) {
    std::vector<double> v;
    for (const auto* r : issued)
        if (r->label.find(key) != std::string::npos) v.push_back(r->cost_ratio);
    const auto within = std::count_if(v.begin(), v.end(), [](double x) { return x <= cost_target; });
    std::printf("  %-10s median %5.2f  max %5.2f  within %.0fx: %2ld of %2zu\n", key.c_str() + (key[0] == '/' ? 1 : 0), median(v),
                v.empty() ? std::nan("") : *std::max_element(v.begin(), v.end()), cost_target, static_cast<long>(within), v.size());
}

void summarize(const timing_reporter& rep) {
    std::vector<double> cost, search, traced_cost, wall, cpu;
    std::vector<const case_record*> issued;
    std::map<const case_record*, std::pair<double, double>> times;  // certify, production (us)
    std::map<const case_record*, search_trace> traces;
    int refused = 0, not_run = 0, undercounted = 0, untraced = 0;
    for (const auto& r : cases()) {
        if (!r.done) {
            ++not_run;
            continue;
        }
        if (!r.issued) {
            ++refused;
            continue;
        }
        issued.push_back(&r);
        cost.push_back(r.cost_ratio);
        search.push_back(r.search_ratio);
        try {
            const auto& t = traces[&r] = r.trace(r);
            traced_cost.push_back(t.total);
            if (t.uncounted > 1e-12) ++undercounted;
        } catch (const stepcert::error&) {
            traces.erase(&r);
            ++untraced;
        }
        const auto ci = rep.real_us.find("certify/" + r.label), pi = rep.real_us.find("production/" + r.label);
        if (ci != rep.real_us.end() && pi != rep.real_us.end()) {
            times[&r] = {median(ci->second), median(pi->second)};
            wall.push_back(times[&r].first / times[&r].second);
            cpu.push_back(median(rep.cpu_us.at("certify/" + r.label)) / median(rep.cpu_us.at("production/" + r.label)));
        }
    }
    std::printf("\nCertification at the estimated level against one production run at the certified step N\n"
                "(%zu cases run: %zu issued, %d refused%s; ratios over the issued ones; p90 by nearest rank)\n",
                cases().size() - static_cast<std::size_t>(not_run), issued.size(), refused,
                not_run ? ", the rest filtered out" : "");
    print_distribution("evaluations (cost_ratio):", cost);
    print_distribution("evaluations, traced:", traced_cost);
    print_distribution("evaluations / finest run needed:", search);
    print_distribution("wall time (certify / production):", wall);
    print_distribution("CPU time (certify / production):", cpu);
    const auto missed = std::count_if(cost.begin(), cost.end(), [](double x) { return x > cost_target; });
    std::printf("target (at most %.0fx the evaluations of one production run): %s (missed on %ld of %zu issued cases)\n",
                cost_target, missed == 0 ? "met" : "NOT met", static_cast<long>(missed), cost.size());
    std::printf("traced = every right-hand-side call, counted outside certify; certificate.evaluations is lower in %d "
                "case(s)%s\n",
                undercounted, untraced ? " (some could not be traced)" : "");
    std::printf("cost_ratio by method and tolerance:\n");
    for (const char* key : {"/midpoint/", "/kutta3/", "/rk4/", "/dopri54/", "tol:1e-03", "tol:1e-05", "tol:1e-07"}) print_group(issued, key);

    std::sort(issued.begin(), issued.end(), [](const case_record* x, const case_record* y) { return x->cost_ratio > y->cost_ratio; });
    std::printf("\nWorst cases by cost_ratio:\n");
    for (std::size_t i = 0; i < std::min<std::size_t>(5, issued.size()); ++i) {
        const auto& r = *issued[i];
        const auto t = traces.find(&r);
        std::printf("%zu. %s: cost_ratio %.2f (%zu / %zu evaluations), N = %zu\n   basis: %s\n   %s\n", i + 1, r.label.c_str(),
                    r.cost_ratio, r.certify_evaluations, r.production_evaluations, r.steps, r.basis.c_str(),
                    t == traces.end() ? "no trace" : explain(t->second).c_str());
    }
    std::vector<const case_record*> short_counted;
    for (const auto& [r, t] : traces)
        if (t.uncounted > 1e-12) short_counted.push_back(r);
    if (!short_counted.empty()) {
        std::printf("\nCases whose certificate.evaluations leaves calls out:\n");
        for (const auto* r : short_counted) {
            const auto& t = traces.at(r);
            std::printf("  %s: cost_ratio %.2f, traced %.2f; runs: %s\n", r->label.c_str(), r->cost_ratio, t.total, t.runs.c_str());
        }
    }

    // Wall time above the evaluations: what certify spends besides stepping (the stability
    // check's eigenvalues, storing and comparing runs), taking a run's time as its evaluations'.
    std::vector<const case_record*> by_wall;
    for (const auto& [r, t] : times) by_wall.push_back(r);
    std::sort(by_wall.begin(), by_wall.end(), [&](const case_record* x, const case_record* y) {
        return times[x].first / times[x].second > times[y].first / times[y].second;
    });
    std::printf("\nWorst cases by wall-time ratio (besides stepping = certify time - cost_ratio x production time):\n");
    for (std::size_t i = 0; i < std::min<std::size_t>(5, by_wall.size()); ++i) {
        const auto& r = *by_wall[i];
        const auto [cert, prod] = times[&r];
        std::printf("%zu. %s: %.1f us / %.2f us = %.1f (cost_ratio %.2f, N = %zu); besides stepping %.1f us (%.0f %%)\n", i + 1,
                    r.label.c_str(), cert, prod, cert / prod, r.cost_ratio, r.steps, cert - r.cost_ratio * prod,
                    100.0 * (cert - r.cost_ratio * prod) / cert);
    }
    if (refused > 0) {
        std::printf("\nRefused (no production step; not in the ratios):\n");
        for (const auto& r : cases())
            if (r.done && !r.issued)
                std::printf("  %s: %zu evaluations spent; %s\n", r.label.c_str(), r.certify_evaluations, r.basis.c_str());
    }
}

} // namespace

int main(int argc, char** argv) {
    namespace pr = stepcert::problems;
    add_problem(pr::kepler(0.5, 20.0), "kepler_e0.5");
    add_problem(pr::kepler(0.2, 10.0), "kepler_e0.2");
    add_problem(pr::harmonic_oscillator(2.0, 10.0), "oscillator");
    add_problem(pr::dahlquist(-1.0, 5.0), "dahlquist_-1");
    add_problem(pr::dahlquist(-40.0, 1.0), "dahlquist_-40");
    add_problem(pr::linear_system(4.0), "linear_system");
    add_problem(pr::prothero_robinson(-10.0, 2.0), "prothero_robinson_-10");
    add_problem(pr::prothero_robinson(-300.0, 1.0), "prothero_robinson_-300");
    add_problem(pr::small_satellite(10.0), "small_satellite");
    add_problem(pr::suspension_rig(1.5), "suspension_rig");

    benchmark::Initialize(&argc, argv);
    if (benchmark::ReportUnrecognizedArguments(argc, argv)) return 1;
    timing_reporter reporter;
    benchmark::RunSpecifiedBenchmarks(&reporter);
    benchmark::Shutdown();
    summarize(reporter);
    return 0;
}
