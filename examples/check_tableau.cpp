// Checks a team's own Butcher tableau from a file before any simulation runs: its exact order
// (every rooted-tree order condition in rational arithmetic), the first condition that fails,
// its principal error coefficients, and its linear stability intervals.
//   check_tableau                                   the bundled example, data/team_rk3.json
//   check_tableau path/to/tableau.json [--fail-if-below-claim] [--svg region.svg]
// The file layout is described in include/stepcert/tableau/tableau_json.hpp.
#include <cmath>
#include <cstdio>
#include <fstream>
#include <string>

#include <CLI/CLI.hpp>
#include <boost/multiprecision/cpp_int.hpp>

#include "stepcert/report/stability_svg.hpp"
#include "stepcert/tableau/error_coefficients.hpp"
#include "stepcert/tableau/order_conditions.hpp"
#include "stepcert/tableau/stability.hpp"
#include "stepcert/tableau/tableau_json.hpp"

#ifndef STEPCERT_EXAMPLE_DATA_DIR
#define STEPCERT_EXAMPLE_DATA_DIR "examples/data"
#endif

namespace {

std::string interval_text(double x) {
    if (std::isinf(x)) return "unbounded";
    char buf[32];
    std::snprintf(buf, sizeof buf, "%.6f", x);
    return buf;
}

int report(const stepcert::tableau<boost::multiprecision::cpp_rational>& t, bool strict, const std::string& svg_path) {
    const auto order = stepcert::check_order_conditions(t);
    std::printf("tableau '%s': %zu stages, %s\n", t.name.c_str(), t.stages(), t.is_explicit() ? "explicit" : "implicit");
    std::printf("claimed order %d; algebraic order %d (exact rational arithmetic, %zu conditions checked up to order %d)\n",
                t.claimed_order, order.main.algebraic_order, order.main.conditions_checked, order.main.checked_up_to);
    if (order.main.first_failure)
        std::printf("lowest-order failing condition: tree %s of order %d, sum b_i Phi_i - 1/gamma = %.6g (gamma = %llu)\n",
                    order.main.first_failure->tree.c_str(), order.main.first_failure->order, order.main.first_failure->residual,
                    static_cast<unsigned long long>(order.main.first_failure->density));
    if (order.embedded)
        std::printf("embedded weights: claimed order %d, algebraic order %d\n", t.claimed_embedded_order, order.embedded->algebraic_order);
    for (std::size_t row : order.row_sum_mismatches) std::printf("note: c_%zu differs from the sum of row %zu of A\n", row + 1, row + 1);
    const auto e = stepcert::error_coefficients_of_order(t, order.main.algebraic_order + 1);
    std::printf("principal error coefficients (trees of order %d, tau = (Phi - 1/gamma)/sigma): 2-norm %.4e, max %.4e\n", e.order,
                e.norm2, e.norm_max);
    const auto s = stepcert::stability_summary_of(stepcert::stability_function_of(t));
    std::printf("stability: real interval [-%s, 0], imaginary interval [-%s i, %s i], %s (%s)\n", interval_text(s.real_interval).c_str(),
                interval_text(s.imaginary_interval).c_str(), interval_text(s.imaginary_interval).c_str(),
                s.a_stable ? "A-stable" : "not A-stable", s.a_stability_note.c_str());
    if (!svg_path.empty()) {
        const auto r = stepcert::stability_function_of(t);
        std::ofstream(svg_path) << stepcert::stability_svg(stepcert::stability_region_of(r, stepcert::default_plane_box(s), 400, 400, t.name));
        std::printf("stability region picture written to %s\n", svg_path.c_str());
    }
    const bool ok = order.meets_claim();
    std::printf("verdict: %s\n", ok ? "the algebra supports the claimed order" : "the algebra does NOT support the claimed order");
    return strict && !ok ? 1 : 0;
}

} // namespace

int main(int argc, char** argv) {
    CLI::App app{"Check a Butcher tableau file: exact order, error coefficients, stability intervals."};
    std::string path = std::string(STEPCERT_EXAMPLE_DATA_DIR) + "/team_rk3.json";
    bool strict = false;
    std::string svg_path;
    app.add_option("file", path, "tableau file (stepcert.tableau JSON)");
    app.add_flag("--fail-if-below-claim", strict, "exit with status 1 when the algebraic order is below the claimed one");
    app.add_option("--svg", svg_path, "write a picture of the stability region to this SVG file");
    CLI11_PARSE(app, argc, argv);
    try {
        std::ifstream in(path);
        if (!in) {
            std::fprintf(stderr, "check_tableau: cannot open '%s'\n", path.c_str());
            return 2;
        }
        return report(stepcert::read_tableau_json<boost::multiprecision::cpp_rational>(in), strict, svg_path);
    } catch (const stepcert::error& e) {
        std::fprintf(stderr, "check_tableau: %s\n", e.what());
        return 2;
    }
}
