#pragma once
// CSV export of error estimates. Line 1 is a comment, "# " and estimate_caution (skip lines that
// start with '#', or drop the first line); line 2 the header; then one row per step (local error
// profile) or grid time (global error estimate). Fields as report/detail/csv_fields.hpp: round-trip
// precision, NaN empty, infinities "inf"/"-inf".
#include <cstddef>
#include <ostream>
#include <sstream>
#include <string>

#include "stepcert/core/error.hpp"
#include "stepcert/estimate/global_error.hpp"
#include "stepcert/estimate/local_error.hpp"
#include "stepcert/report/detail/csv_fields.hpp"
#include "stepcert/report/estimate_caution.hpp"

namespace stepcert {

inline constexpr const char* local_error_csv_header = "t,h,estimate,principal,uncertainty";
inline constexpr const char* global_error_csv_header = "t,estimate";

/// The caution line, the header line and one row per step.
inline void write_local_error_csv(std::ostream& os, const local_error_profile& p) {
    using detail::csv_number;
    os << "# " << estimate_caution << "\n" << local_error_csv_header << "\n";
    for (const local_error_step& s : p.steps)
        os << csv_number(s.t) << ',' << csv_number(s.h) << ',' << csv_number(s.estimate) << ',' << csv_number(s.principal) << ','
           << csv_number(s.uncertainty) << "\n";
}

/// The caution line, the header line and one row per grid time (t, its estimate).
inline void write_global_error_csv(std::ostream& os, const global_error_estimate& g) {
    using detail::csv_number;
    if (g.estimate.size() != g.times.size())
        throw invalid_input("stepcert::write_global_error_csv: the estimate holds " + std::to_string(g.estimate.size()) +
                            " values for " + std::to_string(g.times.size()) + " grid times; pass an estimate as "
                            "richardson_global_error or true_global_error make it.");
    os << "# " << estimate_caution << "\n" << global_error_csv_header << "\n";
    for (std::size_t k = 0; k < g.times.size(); ++k) os << csv_number(g.times[k]) << ',' << csv_number(g.estimate[k]) << "\n";
}

inline std::string local_error_csv(const local_error_profile& p) {
    std::ostringstream os;
    write_local_error_csv(os, p);
    return os.str();
}

inline std::string global_error_csv(const global_error_estimate& g) {
    std::ostringstream os;
    write_global_error_csv(os, g);
    return os.str();
}

} // namespace stepcert
