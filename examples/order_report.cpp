// Main job: an order-of-convergence report for every wrapped method on a scenario problem of
// our own (a quarter-car suspension rig over a road bump, invented data, no closed form).
// Errors are measured against a multiprecision reference computed from the same right-hand side.
//   order_report            the suspension rig (all methods that apply)
//   order_report satellite  a small satellite with J2 flattening (adds the symplectic method)
//   order_report --tables   also print every study's full table
#include <cstdio>
#include <iostream>
#include <string>
#include <string_view>

#include "stepcert/stepcert.hpp"

namespace {

struct summary_printer {
    void header() const {
        std::printf("%-34s %8s %9s %21s %7s %12s  %s\n", "method", "declared", "observed", "95% confidence", "levels",
                    "evaluations", "verdict");
    }
    void row(const stepcert::order_study_result& r) const {
        const std::string declared = r.variable_order ? "variable" : std::to_string(r.declared_order);
        if (r.fitted()) {
            char ci[64] = "n/a";
            if (r.fit.has_interval()) std::snprintf(ci, sizeof ci, "[%.2f, %.2f]", r.fit.lower, r.fit.upper);
            char levels[32];
            std::snprintf(levels, sizeof levels, "%zu..%zu", r.range_first, r.range_last);
            const bool agrees = r.variable_order || (r.fit.lower <= r.declared_order + 0.2 && r.fit.upper >= r.declared_order - 0.2);
            std::printf("%-34s %8s %9.2f %21s %7s %12zu  %s\n", r.method.c_str(), declared.c_str(), r.fit.order, ci, levels,
                        r.total_evaluations,
                        r.variable_order ? "order fitted (no fixed design order)"
                                         : (agrees ? "consistent with declared order" : "NOT consistent with declared order"));
        } else {
            std::printf("%-34s %8s %9s %21s %7s %12zu  %s\n", r.method.c_str(), declared.c_str(), "-", "-", "-", r.total_evaluations,
                        "no asymptotic range found");
        }
    }
};

template <class P>
void report(const P& problem, bool separable_methods, bool tables) {
    using namespace stepcert;
    study_options opt;
    opt.norm = weighted_norm{1e-6, 1e-6, norm_kind::max};  // mixed absolute/relative error, max over components
    std::vector<order_study_result> results;
    // One reference for all studies, at 512 evenly spaced times: every ladder's grid size (its
    // steps' common divisor; 16 for the adaptive ones) divides 512. 20 digits, the default a
    // study in double asks for.
    const auto reference = reference_solution(problem, 20, uniform_times{512});
    // Coarsest steps below the rig's explicit stability limit (eigenvalues up to about 100 1/s);
    // the fine ends reach the round-off plateau of double for the high-order methods, which the
    // study detects and drops.
    results.push_back(order_study(problem, explicit_euler, step_ladder{256, 2.0, 8}, opt, reference));
    results.push_back(order_study(problem, explicit_midpoint, step_ladder{256, 2.0, 7}, opt, reference));
    results.push_back(order_study(problem, classic_rk4, step_ladder{256, 2.0, 6}, opt, reference));
    results.push_back(order_study(problem, adams_bashforth_moulton<4>, step_ladder{512, 2.0, 5}, opt, reference));
    results.push_back(order_study(problem, cash_karp54, step_ladder{256, 1.5, 7}, opt, reference));
    results.push_back(order_study(problem, dormand_prince54, step_ladder{512, 1.5, 7}, opt, reference));
    results.push_back(order_study(problem, fehlberg78, step_ladder{256, 1.25, 8}, opt, reference));
    results.push_back(order_study(problem, rosenbrock4_fixed, step_ladder{256, 2.0, 6}, opt, reference));
    if (separable_methods) results.push_back(order_study(problem, symplectic_rkn, step_ladder{64, 2.0, 8}, opt, reference));
    results.push_back(order_study(problem, dormand_prince54_adaptive, tolerance_ladder{1e-4, 10.0, 7}, opt, reference));
    results.push_back(order_study(problem, bulirsch_stoer_adaptive, tolerance_ladder{1e-5, 10.0, 6}, opt, reference));

    std::printf("stepcert order report: problem '%s', %zu unknowns, t in [%g, %g]\n", problem.name().c_str(), problem.dimension(),
                static_cast<double>(problem.t0()), static_cast<double>(problem.t1()));
    std::printf("errors against: %s\n", results.front().basis_detail.c_str());
    std::printf("reference cost: %zu right-hand-side evaluations, once for all studies\n\n", reference.cost.evaluations);
    summary_printer printer;
    printer.header();
    for (const auto& r : results) printer.row(r);
    std::printf("\n%s\n", std::string(study_caution).c_str());
    if (tables)
        for (const auto& r : results) std::cout << "\n" << study_table(r);
}

} // namespace

int main(int argc, char** argv) {
    bool tables = false;
    std::string which = "rig";
    for (int i = 1; i < argc; ++i) {
        const std::string_view a = argv[i];
        if (a == "--tables")
            tables = true;
        else if (a == "rig" || a == "satellite")
            which = a;
        else {
            std::fprintf(stderr, "order_report: unknown argument '%s'; use [rig|satellite] [--tables]\n", argv[i]);
            return 2;
        }
    }
    try {
        if (which == "rig")
            report(stepcert::problems::suspension_rig(), false, tables);
        else
            report(stepcert::problems::small_satellite(), true, tables);
    } catch (const stepcert::error& e) {
        std::fprintf(stderr, "order_report: %s\n", e.what());
        return 1;
    }
    return 0;
}
