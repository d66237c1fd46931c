#pragma once
// Fixed-width text table of an order study: a header saying what was studied and concluded,
// then one row per level (h, steps, evaluations, errors, local order, range mark, why not).
#include <cmath>
#include <cstdio>
#include <ostream>
#include <sstream>
#include <string>
#include <string_view>

#include "stepcert/core/number_text.hpp"
#include "stepcert/study/study_result.hpp"

namespace stepcert {

/// The caution every study report carries.
inline constexpr std::string_view study_caution =
    "caution: this concerns discretization error only (not model, data or round-off error in general); "
    "an observed order is estimated from finitely many runs, not proven; where results feed safety-relevant "
    "decisions, follow the verification-and-validation standard of the field and have them reviewed by a licensed "
    "professional.";

namespace detail {
inline std::string table_number(double x, const char* fmt = "%.3e") { return formatted_number(x, fmt, "-"); }
inline std::string_view range_mark(level_status s) {
    switch (s) {
    case level_status::in_range: return "* in range";
    case level_status::pre_asymptotic: return "  pre-asymptotic";
    case level_status::round_off_plateau: return "  round-off plateau";
    case level_status::non_finite: return "  non-finite";
    case level_status::unsettled: return "  unsettled";
    case level_status::baseline: return "  baseline";
    }
    return "  ?";
}
inline std::string pad_left(const std::string& s, std::size_t w) { return s.size() >= w ? s : std::string(w - s.size(), ' ') + s; }
inline std::string pad_right(const std::string& s, std::size_t w) { return s.size() >= w ? s : s + std::string(w - s.size(), ' '); }
} // namespace detail

/// Writes the study as a readable table.
inline void write_study_table(std::ostream& os, const order_study_result& r) {
    using detail::pad_left;
    using detail::table_number;
    const bool adaptive = r.control == step_control::adaptive;
    const bool diffs = r.basis == error_basis::successive_differences;
    os << "order study: problem '" << r.problem << "', method '" << r.method << "' (";
    if (r.variable_order)
        os << "variable order";
    else
        os << "declared order " << r.declared_order;
    if (r.stage_order > 0) os << ", stage order " << r.stage_order;
    os << ", " << detail::step_control_text(r.control) << " step)\n";
    os << "levels: " << r.ladder << "; output grid: " << r.grid_points << (r.grid_points == 1 ? " time (the final one)" : " times") << "; working precision: " << r.working_digits
       << " digits\n";
    os << "error basis: " << to_string(r.basis) << " - " << r.basis_detail << "\n";
    os << "reference digits: " << (std::isnan(r.reference_digits) ? std::string("none") : table_number(r.reference_digits, "%.1f"))
       << "; norm: " << (r.norm.kind == norm_kind::max ? "max" : "rms") << " with atol " << table_number(r.norm.atol, "%g")
       << ", rtol " << table_number(r.norm.rtol, "%g") << "; fit on: "
       << (r.fit_measure == error_measure::final_time ? "error at the final time" : "max error over the output grid") << "\n";
    os << "fitted order: ";
    if (r.fitted()) {
        os << table_number(r.fit.order, "%.3f");
        if (r.fit.has_interval())
            os << " (" << table_number(100.0 * r.fit.confidence, "%g") << "% CI " << table_number(r.fit.lower, "%.3f") << " .. "
               << table_number(r.fit.upper, "%.3f") << ", standard error " << table_number(r.fit.standard_error, "%.2g") << ")";
        else
            os << " (confidence interval unavailable: " << r.fit.points << " points)";
        os << " over levels " << r.range_first << ".." << r.range_last << "\n";
    } else {
        os << "none\n";
    }
    os << "verdict: " << to_string(r.verdict) << " - " << r.verdict_text << "\n";
    os << study_caution << "\n";

    const std::string e_final = diffs ? "diff(final)" : "error(final)";
    const std::string e_grid = diffs ? "diff(grid)" : "error(grid)";
    os << pad_left("level", 5) << pad_left("h", 11);
    if (adaptive) os << pad_left("tolerance", 11);
    os << pad_left("steps", 11);
    if (adaptive) os << pad_left("rejected", 9);
    os << pad_left("evaluations", 13) << pad_left(e_final, 14) << pad_left(e_grid, 14) << pad_left("local order", 13)
       << "  range\n";
    for (const study_level& lv : r.levels) {
        os << pad_left(std::to_string(lv.index), 5) << pad_left(table_number(lv.h), 11);
        if (adaptive) os << pad_left(table_number(lv.tolerance, "%.1e"), 11);
        os << pad_left(std::to_string(lv.steps), 11);
        if (adaptive) os << pad_left(std::to_string(lv.rejected), 9);
        os << pad_left(std::to_string(lv.evaluations), 13) << pad_left(table_number(lv.error_final), 14)
           << pad_left(table_number(lv.error_grid), 14) << pad_left(table_number(lv.local_order, "%.3f"), 13) << "  "
           << detail::pad_right(std::string(detail::range_mark(lv.status)), 20);
        if (!lv.note.empty()) os << " " << lv.note;
        os << "\n";
    }
    os << "total evaluations: " << r.total_evaluations;
    if (r.reference_evaluations > 0)
        os << (r.reference_shared ? " (plus a shared reference computed once: " : " (of which reference: ") << r.reference_evaluations << ")";
    os << "\n";
}

/// The table as a string.
inline std::string study_table(const order_study_result& r) {
    std::ostringstream os;
    write_study_table(os, r);
    return os.str();
}

} // namespace stepcert
