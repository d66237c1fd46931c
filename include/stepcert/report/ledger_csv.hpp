#pragma once
// CSV export of the error ledger (needs Eigen through the ledger): the steps
// (t,h,fresh,propagated,global,contribution,share) and the time windows
// (t_begin,t_end,first_step,step_count,contribution,share,fresh). Line 1 is a comment, "# " and
// estimate_caution; line 2 the header; then one row per step or window. Fields as
// report/detail/csv_fields.hpp: round-trip precision, NaN (a share when e_N = 0) empty.
#include <ostream>
#include <sstream>
#include <string>
#include <vector>

#include "stepcert/report/detail/csv_fields.hpp"
#include "stepcert/report/estimate_caution.hpp"
#include "stepcert/transport/error_ledger.hpp"
#include "stepcert/transport/ledger_windows.hpp"

namespace stepcert {

inline constexpr const char* ledger_csv_header = "t,h,fresh,propagated,global,contribution,share";
inline constexpr const char* ledger_windows_csv_header = "t_begin,t_end,first_step,step_count,contribution,share,fresh";

/// The caution line, the header line and one row per step of the ledger.
inline void write_ledger_csv(std::ostream& os, const error_ledger& l) {
    using detail::csv_number;
    os << "# " << estimate_caution << "\n" << ledger_csv_header << "\n";
    for (const ledger_step& s : l.steps)
        os << csv_number(s.t) << ',' << csv_number(s.h) << ',' << csv_number(s.fresh) << ',' << csv_number(s.propagated) << ','
           << csv_number(s.global) << ',' << csv_number(s.contribution) << ',' << csv_number(s.share) << "\n";
}

/// The caution line, the header line and one row per window.
inline void write_ledger_windows_csv(std::ostream& os, const std::vector<ledger_window>& windows) {
    using detail::csv_number;
    os << "# " << estimate_caution << "\n" << ledger_windows_csv_header << "\n";
    for (const ledger_window& w : windows)
        os << csv_number(w.t_begin) << ',' << csv_number(w.t_end) << ',' << w.first_step << ',' << w.step_count << ','
           << csv_number(w.contribution) << ',' << csv_number(w.share) << ',' << csv_number(w.fresh) << "\n";
}

inline std::string ledger_csv(const error_ledger& l) {
    std::ostringstream os;
    write_ledger_csv(os, l);
    return os.str();
}

inline std::string ledger_windows_csv(const std::vector<ledger_window>& windows) {
    std::ostringstream os;
    write_ledger_windows_csv(os, windows);
    return os.str();
}

} // namespace stepcert
