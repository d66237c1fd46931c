// stepcert_cli check-tableau: the exact order, error coefficients and stability of a tableau file.
#include <sstream>

#include "commands.hpp"
#include "output.hpp"
#include "tableau_report.hpp"

namespace stepcert_cli {

int run_check_tableau(const check_tableau_request& q) {
    const exact_tableau t = read_tableau_file(q.file);
    std::ostringstream text;
    const bool ok = write_tableau_report(text, t);
    deliver(q.format == "svg" ? tableau_stability_svg(t) : text.str(), q.output);
    return q.fail_if_below_claim && !ok ? 1 : 0;
}

} // namespace stepcert_cli
