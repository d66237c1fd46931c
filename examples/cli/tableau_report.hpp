#pragma once
// The readable check of a Butcher tableau read from a file: exact order (every rooted-tree order
// condition in rational arithmetic), the first condition that fails, the principal error
// coefficients, the linear stability intervals, and a verdict against the claimed order.
// Shared by check_tableau and stepcert_cli check-tableau.
#include <cmath>
#include <cstdio>
#include <fstream>
#include <ostream>
#include <string>

#include <boost/multiprecision/cpp_int.hpp>

#include "stepcert/core/error.hpp"
#include "stepcert/report/stability_svg.hpp"
#include "stepcert/tableau/error_coefficients.hpp"
#include "stepcert/tableau/order_conditions.hpp"
#include "stepcert/tableau/stability.hpp"
#include "stepcert/tableau/tableau_json.hpp"

namespace stepcert_cli {

using exact_tableau = stepcert::tableau<boost::multiprecision::cpp_rational>;

namespace tableau_report_detail {
inline std::string interval_text(double x) {
    if (std::isinf(x)) return "unbounded";
    char buf[32];
    std::snprintf(buf, sizeof buf, "%.6f", x);
    return buf;
}
inline std::string format_line(const char* fmt, auto... args) {
    char buf[512];
    std::snprintf(buf, sizeof buf, fmt, args...);
    return buf;
}
} // namespace tableau_report_detail

/// Reads a stepcert.tableau file in exact rational arithmetic; an unreadable file or a malformed
/// one throws invalid_input saying which.
inline exact_tableau read_tableau_file(const std::string& path) {
    std::ifstream in(path);
    if (!in) throw stepcert::invalid_input("cannot open tableau file '" + path + "'; check the path and that it is readable.");
    return stepcert::read_tableau_json<boost::multiprecision::cpp_rational>(in);
}

/// Writes the check as text; returns whether the algebra supports the claimed order.
inline bool write_tableau_report(std::ostream& os, const exact_tableau& t) {
    using tableau_report_detail::format_line;
    using tableau_report_detail::interval_text;
    const auto order = stepcert::check_order_conditions(t);
    os << format_line("tableau '%s': %zu stages, %s\n", t.name.c_str(), t.stages(), t.is_explicit() ? "explicit" : "implicit");
    os << format_line("claimed order %d; algebraic order %d (exact rational arithmetic, %zu conditions checked up to order %d)\n",
                      t.claimed_order, order.main.algebraic_order, order.main.conditions_checked, order.main.checked_up_to);
    if (order.main.first_failure)
        os << format_line("lowest-order failing condition: tree %s of order %d, sum b_i Phi_i - 1/gamma = %.6g (gamma = %llu)\n",
                          order.main.first_failure->tree.c_str(), order.main.first_failure->order, order.main.first_failure->residual,
                          static_cast<unsigned long long>(order.main.first_failure->density));
    if (order.embedded)
        os << format_line("embedded weights: claimed order %d, algebraic order %d\n", t.claimed_embedded_order,
                          order.embedded->algebraic_order);
    for (std::size_t row : order.row_sum_mismatches) os << format_line("note: c_%zu differs from the sum of row %zu of A\n", row + 1, row + 1);
    const auto e = stepcert::error_coefficients_of_order(t, order.main.algebraic_order + 1);
    os << format_line("principal error coefficients (trees of order %d, tau = (Phi - 1/gamma)/sigma): 2-norm %.4e, max %.4e\n", e.order,
                      e.norm2, e.norm_max);
    const auto s = stepcert::stability_summary_of(stepcert::stability_function_of(t));
    os << "stability: real interval [-" << interval_text(s.real_interval) << ", 0], imaginary interval [-"
       << interval_text(s.imaginary_interval) << " i, " << interval_text(s.imaginary_interval) << " i], "
       << (s.a_stable ? "A-stable" : "not A-stable") << " (" << s.a_stability_note << ")\n";
    const bool ok = order.meets_claim();
    os << "verdict: " << (ok ? "the algebra supports the claimed order" : "the algebra does NOT support the claimed order") << "\n";
    return ok;
}

/// The stability region of the tableau's stability function as an SVG picture.
inline std::string tableau_stability_svg(const exact_tableau& t) {
    const auto r = stepcert::stability_function_of(t);
    const auto s = stepcert::stability_summary_of(r);
    return stepcert::stability_svg(stepcert::stability_region_of(r, stepcert::default_plane_box(s), 400, 400, t.name));
}

} // namespace stepcert_cli
