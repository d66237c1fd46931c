#pragma once
// CSV export of an order study's levels: one header line, then one row per level.
// Numbers use round-trip precision; NaN is an empty field, infinities are "inf"/"-inf";
// text fields are quoted when they contain a comma, a quote or a line break (RFC 4180 style).
#include <ostream>
#include <sstream>
#include <string>

#include "stepcert/report/detail/csv_fields.hpp"
#include "stepcert/study/study_result.hpp"

namespace stepcert {

inline constexpr const char* study_csv_header =
    "level,h,tolerance,steps,rejected,evaluations,error_final,error_grid,local_order,round_off_floor,status,note";

/// Writes the header line and one row per level.
inline void write_study_csv(std::ostream& os, const order_study_result& r) {
    using detail::csv_number;
    os << study_csv_header << "\n";
    for (const study_level& lv : r.levels)
        os << lv.index << ',' << csv_number(lv.h) << ',' << csv_number(lv.tolerance) << ',' << lv.steps << ',' << lv.rejected << ','
           << lv.evaluations << ',' << csv_number(lv.error_final) << ',' << csv_number(lv.error_grid) << ','
           << csv_number(lv.local_order) << ',' << csv_number(lv.round_off_floor) << ',' << to_string(lv.status) << ','
           << detail::csv_text(lv.note) << "\n";
}

inline std::string study_csv(const order_study_result& r) {
    std::ostringstream os;
    write_study_csv(os, r);
    return os.str();
}

} // namespace stepcert
