// stepcert_cli: try stepcert from the shell on the built-in problems and on tableau files,
// without writing code.
//   stepcert_cli problems | methods                       the catalogue, one line each
//   stepcert_cli order-study --problem kepler --method rk4 observed order of convergence
//   stepcert_cli certify --problem rig --method rk4 --atol 1e-6
//   stepcert_cli check-tableau examples/data/team_rk3.json
//   stepcert_cli compare --problem kepler --method rk4 --method dopri5 --format svg -o chart.svg
// Every subcommand has --help. Exit status: 0 done, 1 a negative finding (see cli/commands.hpp),
// 2 bad arguments or a library error, printed as one line on stderr.
#include <cerrno>
#include <cstdio>
#include <cstdlib>
#include <exception>
#include <functional>
#include <iostream>
#include <string>
#include <utility>
#include <vector>

#include <CLI/CLI.hpp>

#include "stepcert/core/error.hpp"

#include "cli/commands.hpp"
#include "cli/registry.hpp"

namespace {

using namespace stepcert_cli;

// ---- validators: each failure is one line naming the option and what to give instead ---------

CLI::Validator one_of(std::vector<std::string> allowed, const std::string& what) {
    std::string list;
    for (const auto& a : allowed) {
        if (!list.empty()) list += ", ";
        list += a;
    }
    return CLI::Validator(
        [allowed, list, what](std::string& value) -> std::string {
            for (const auto& a : allowed)
                if (value == a) return {};
            std::string m = "unknown ";
            m += what;
            m += " '";
            m += value;
            m += "'; choose one of: ";
            m += list;
            return m;
        },
        "", what);
}

CLI::Validator problem_name() {
    return CLI::Validator([](std::string& v) { return unknown_problem_message(v); }, "", "problem");
}

CLI::Validator method_name() {
    return CLI::Validator([](std::string& v) { return unknown_method_message(v); }, "", "method");
}

/// A finite number > 0 (strictly_positive) or >= 0.
CLI::Validator number_at_least_zero(bool strictly_positive) {
    return CLI::Validator(
        [strictly_positive](std::string& v) -> std::string {
            char* end = nullptr;
            errno = 0;
            const double x = std::strtod(v.c_str(), &end);
            const bool parsed = !v.empty() && end == v.c_str() + v.size() && errno == 0 && x == x && x < HUGE_VAL;
            if (parsed && (strictly_positive ? x > 0.0 : x >= 0.0)) return {};
            std::string m = "must be a finite number ";
            m += strictly_positive ? "> 0" : ">= 0";
            m += " (got '";
            m += v;
            m += "')";
            return m;
        },
        "", strictly_positive ? "positive" : "non-negative");
}

/// CLI::Range without its "TYPE in [lo - hi]" note in --help (the option's text gives the range).
template <class T>
CLI::Validator in_range(T lo, T hi) {
    return CLI::Range(lo, hi).description("");
}

// ---- options shared by several subcommands ---------------------------------------------------

struct tolerance_options {
    CLI::Option* tolerance = nullptr;
    CLI::Option* atol = nullptr;
    CLI::Option* rtol = nullptr;
    double both = 0.0;
};

/// --tolerance T sets atol = rtol = T; --atol / --rtol given explicitly win over it.
void add_tolerance_options(CLI::App* sub, tolerance_options& o, tolerance_request& t, const std::string& role) {
    o.tolerance = sub->add_option("--tolerance", o.both, "shorthand for --atol T --rtol T")
                      ->type_name("T")
                      ->check(number_at_least_zero(true));
    o.atol = sub->add_option("--atol", t.atol, "absolute part of the " + role + ", in state units")
                 ->type_name("A")
                 ->capture_default_str()
                 ->check(number_at_least_zero(false));
    o.rtol = sub->add_option("--rtol", t.rtol, "relative part of the " + role + ", times |y_i|")
                 ->type_name("R")
                 ->capture_default_str()
                 ->check(number_at_least_zero(false));
}

void settle_tolerance(const tolerance_options& o, tolerance_request& t) {
    if (o.tolerance->count() > 0) {
        if (o.atol->count() == 0) t.atol = o.both;
        if (o.rtol->count() == 0) t.rtol = o.both;
    }
    if (t.atol == 0.0 && t.rtol == 0.0)
        throw stepcert::invalid_input("--atol and --rtol are both zero; give at least one of them > 0 (e.g. --atol 1e-6).");
}

void add_problem_option(CLI::App* sub, std::string& problem, double& t_end) {
    sub->add_option("-p,--problem", problem, "catalogue problem (see 'stepcert_cli problems')")
        ->type_name("NAME")
        ->required()
        ->check(problem_name());
    sub->add_option("--t-end", t_end, "end of the time interval (the problem's own time unit); default: the problem's own")
        ->type_name("T")
        ->check(number_at_least_zero(true));
}

void add_output_options(CLI::App* sub, std::string& format, std::string& output, std::vector<std::string> formats, const std::string& what) {
    std::string list;
    for (const auto& f : formats) {
        if (!list.empty()) list += "|";
        list += f;
    }
    sub->add_option("-f,--format", format, "output format: " + what)->type_name(list)->capture_default_str()->check(one_of(formats, "format"));
    sub->add_option("-o,--output", output, "write the result to FILE instead of standard output")->type_name("FILE");
}

std::string catalogue_lines(bool problems) {
    std::string s;
    auto line = [&s](std::string_view name, std::string_view summary) {
        s += "  ";
        s += name;
        s += std::string(name.size() < 12 ? 12 - name.size() : 1, ' ');
        s += summary;
        s += '\n';
    };
    if (problems)
        for (const auto& e : problem_catalogue) line(e.name, e.summary);
    else
        for (const auto& e : method_catalogue) line(e.name, e.summary);
    return s;
}

} // namespace

int main(int argc, char** argv) {
    CLI::App app{"stepcert_cli: try stepcert's order studies, step certificates, method comparisons and tableau checks on its\n"
                 "built-in problems, without writing code."};
    app.name("stepcert_cli");
    app.require_subcommand(1);
    app.footer("Exit status: 0 done; 1 done with a negative finding (no step certified, tableau below its claimed order with\n"
               "--fail-if-below-claim, target error not met); 2 bad arguments or an error, explained in one line on stderr.\n"
               "Tolerances: a component's error counts as e_i / (atol + rtol |y_i|); the max over components must be <= 1.\n"
               "Run 'stepcert_cli SUBCOMMAND --help' for a subcommand's options.");

    // problems / methods
    app.add_subcommand("problems", "list the built-in problems, one line each")->callback([] { std::cout << catalogue_lines(true); });
    app.add_subcommand("methods", "list the built-in integration methods, one line each")->callback([] { std::cout << catalogue_lines(false); });

    // order-study
    order_study_request study;
    study.norm = {1e-6, 1e-6};
    tolerance_options study_tol;
    auto* s = app.add_subcommand("order-study", "observed order of convergence of a method on a problem, over a ladder of steps or tolerances");
    add_problem_option(s, study.problem, study.t_end);
    s->add_option("-m,--method", study.method, "integration method (see 'stepcert_cli methods')")->type_name("NAME")->required()->check(method_name());
    add_tolerance_options(s, study_tol, study.norm, "error norm's weight");
    s->add_option("--coarsest-steps", study.coarsest_steps,
                  "fixed-step methods: steps over the interval at the coarsest level; default: the problem's own (inside the "
                  "stability limit)")
        ->type_name("N")
        ->check(in_range(std::size_t{1}, std::size_t{100000000}));
    s->add_option("--coarsest-tolerance", study.coarsest_tolerance, "adaptive methods: controller tolerance at the coarsest level")
        ->type_name("TOL")
        ->capture_default_str()
        ->check(number_at_least_zero(true));
    s->add_option("--ratio", study.ratio, "refinement from level to level (> 1); default: 2 in steps, 10 in tolerance")
        ->type_name("R")
        ->check(number_at_least_zero(true));
    s->add_option("--levels", study.levels, "refinement levels, 3 to 64")->type_name("K")->capture_default_str()->check(in_range(3, 64));
    add_output_options(s, study.format, study.output, {"text", "json", "csv"},
                       "text (table with the fitted order and caution), json (stepcert.order_study), csv (one row per level)");
    s->callback([&] { settle_tolerance(study_tol, study.norm); });

    // certify
    certify_request cert;
    cert.tolerance = {1e-6, 0.0};
    tolerance_options cert_tol;
    auto* c = app.add_subcommand("certify", "certify the largest step (or loosest controller tolerance) of a method that meets a tolerance");
    add_problem_option(c, cert.problem, cert.t_end);
    c->add_option("-m,--method", cert.method, "integration method (see 'stepcert_cli methods')")->type_name("NAME")->required()->check(method_name());
    add_tolerance_options(c, cert_tol, cert.tolerance, "tolerance to certify");
    c->add_option("--output-times", cert.output_times, "evenly spaced times (t-end among them) at which the error must meet the tolerance")
        ->type_name("G")
        ->capture_default_str()
        ->check(in_range(std::size_t{1}, std::size_t{100000}));
    c->add_flag("--no-reference", cert.no_reference,
                "do not verify against the exact solution or a multiprecision reference (the certificate stays 'estimated')");
    add_output_options(c, cert.format, cert.output, {"text", "json"}, "text (with the cautions) or json (stepcert.step_certificate)");
    c->callback([&] { settle_tolerance(cert_tol, cert.tolerance); });

    // check-tableau
    check_tableau_request tab;
    auto* t = app.add_subcommand("check-tableau", "check a Butcher tableau file: exact order, error coefficients, stability intervals");
    t->add_option("file", tab.file, "tableau file in stepcert.tableau JSON (layout: include/stepcert/tableau/tableau_json.hpp)")
        ->type_name("FILE")
        ->required();
    t->add_flag("--fail-if-below-claim", tab.fail_if_below_claim, "exit with status 1 when the algebraic order is below the claimed one");
    add_output_options(t, tab.format, tab.output, {"text", "svg"}, "text (the check) or svg (picture of the stability region)");

    // compare
    compare_request cmp;
    cmp.norm = {1.0, 0.0};
    tolerance_options cmp_tol;
    auto* k = app.add_subcommand("compare", "cost-accuracy comparison of several methods on a problem; optionally the cheapest for a target error");
    add_problem_option(k, cmp.problem, cmp.t_end);
    k->add_option("-m,--method", cmp.methods, "integration method; repeat for each method to compare (see 'stepcert_cli methods')")
        ->type_name("NAME")
        ->required()
        ->check(method_name());
    add_tolerance_options(k, cmp_tol, cmp.norm, "error norm's weight");
    k->add_option("--points", cmp.points, "sweep points per method, 2 to 30")->type_name("K")->capture_default_str()->check(in_range(2, 30));
    k->add_option("--coarsest-steps", cmp.coarsest_steps,
                  "fixed-step methods: steps at the coarsest point, doubled from point to point (rounded up to a multiple of "
                  "--output-times); default: the problem's own")
        ->type_name("N")
        ->check(in_range(std::size_t{1}, std::size_t{100000000}));
    k->add_option("--coarsest-tolerance", cmp.coarsest_tolerance, "adaptive methods: controller tolerance at the coarsest point, divided by 10 "
                  "from point to point")
        ->type_name("TOL")
        ->capture_default_str()
        ->check(number_at_least_zero(true));
    k->add_option("--output-times", cmp.output_times, "evenly spaced times (t-end among them) over which the error is the max")
        ->type_name("G")
        ->capture_default_str()
        ->check(in_range(std::size_t{1}, std::size_t{100000}));
    k->add_option("--target-error", cmp.target_error,
                  "answer the cheapest method for this error (same norm), confirmed by one more run; exit 1 if no method meets it. "
                  "With a format other than text the answer goes to standard error")
        ->type_name("E")
        ->check(number_at_least_zero(true));
    k->add_option("--repeats", cmp.repeats, "timed runs per point, 1 to 100 (the median wall time is reported)")
        ->type_name("N")
        ->capture_default_str()
        ->check(in_range(1, 100));
    k->add_option("--threads", cmp.threads, "worker threads; 0: one per hardware thread")->type_name("N")->capture_default_str()->check(in_range(0, 1024));
    k->add_flag("--progress", cmp.progress, "show progress on standard error");
    add_output_options(k, cmp.format, cmp.output, {"text", "json", "csv", "svg"},
                       "text (table, Pareto front, answer), json (stepcert.cost_accuracy_sweep), csv (one row per point), svg (log-log chart)");
    k->callback([&] { settle_tolerance(cmp_tol, cmp.norm); });

    try {
        try {
            app.parse(argc, argv);
        } catch (const CLI::ParseError& e) {
            if (e.get_exit_code() == 0) return app.exit(e);  // --help
            if (app.get_subcommands().empty() && argc > 1 && argv[1][0] != '-') {
                std::string names;
                for (const CLI::App* sub : std::as_const(app).get_subcommands(std::function<bool(const CLI::App*)>{})) {
                    if (!names.empty()) names += ", ";
                    names += sub->get_name();
                }
                std::cerr << "stepcert_cli: unknown subcommand '" << argv[1] << "'; choose one of: " << names << " (see 'stepcert_cli --help')\n";
                return 2;
            }
            std::string where = "stepcert_cli";
            for (const CLI::App* sub : app.get_subcommands()) where += " " + sub->get_name();
            std::cerr << where << ": " << e.what() << " (see '" << where << " --help')\n";
            return 2;
        }
        const CLI::App* chosen = app.get_subcommands().front();
        const std::string name = chosen->get_name();
        if (name == "order-study") return run_order_study(study);
        if (name == "certify") return run_certify(cert);
        if (name == "check-tableau") return run_check_tableau(tab);
        if (name == "compare") return run_compare(cmp);
        return 0;  // problems / methods printed in their callbacks
    } catch (const stepcert::error& e) {
        std::string where = "stepcert_cli";
        for (const CLI::App* sub : app.get_subcommands()) where += " " + sub->get_name();
        std::cerr << where << ": " << e.what() << "\n";
        return 2;
    } catch (const std::exception& e) {
        std::cerr << "stepcert_cli: unexpected error: " << e.what() << "\n";
        return 2;
    }
}
