#pragma once
// CSV export of a cost–accuracy sweep. Line 1 is a comment, "# " and estimate_caution (skip
// lines that start with '#'); line 2 the header; then one row per point in the sweep's order.
// Fields as report/detail/csv_fields.hpp: round-trip precision, NaN empty, infinities
// "inf"/"-inf" (a failed point's error is "inf"), text quoted when needed. A fixed-step row leaves
// atol and rtol empty; an adaptive row leaves step_count empty.
#include <ostream>
#include <sstream>
#include <string>

#include "stepcert/report/detail/csv_fields.hpp"
#include "stepcert/report/estimate_caution.hpp"
#include "stepcert/sweep/sweep_point.hpp"

namespace stepcert {

inline constexpr const char* sweep_csv_header =
    "problem,method,method_index,declared_order,kind,step_count,atol,rtol,error,evaluations,steps,rejected,"
    "seconds_median,seconds_min,seconds_max,repeats,status,message";

/// The caution line, the header line and one row per point.
inline void write_sweep_csv(std::ostream& os, const sweep_result& r) {
    using detail::csv_number;
    using detail::csv_text;
    os << "# " << estimate_caution << "\n" << sweep_csv_header << "\n";
    for (const sweep_point& p : r.points) {
        const bool fixed = p.setting.kind == sweep_kind::fixed_step;
        os << csv_text(r.problem) << ',' << csv_text(p.method) << ',' << p.method_index << ',' << p.declared_order << ','
           << to_string(p.setting.kind) << ',' << (fixed ? std::to_string(p.setting.steps) : std::string()) << ','
           << (fixed ? std::string() : csv_number(p.setting.tolerance.atol)) << ','
           << (fixed ? std::string() : csv_number(p.setting.tolerance.rtol)) << ',' << csv_number(p.error) << ',' << p.evaluations
           << ',' << p.steps << ',' << p.rejected << ',' << csv_number(p.seconds_median) << ',' << csv_number(p.seconds_min) << ','
           << csv_number(p.seconds_max) << ',' << p.repeats << ',' << to_string(p.status) << ',' << csv_text(p.message) << "\n";
    }
}

inline std::string sweep_csv(const sweep_result& r) {
    std::ostringstream os;
    write_sweep_csv(os, r);
    return os.str();
}

} // namespace stepcert
