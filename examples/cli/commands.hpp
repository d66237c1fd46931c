#pragma once
// What each subcommand of stepcert_cli is asked to do (filled in by the option parser), and the
// functions that do it. Each command lives in its own translation unit (examples/cli/*.cpp), so
// changing one does not recompile the (problem x method) instantiations of the others.
// Exit status of every command: 0 done, 1 done with a negative finding (no step certified, a
// tableau below its claimed order with --fail-if-below-claim, a target error no method reached),
// 2 bad arguments or a library error (printed by main, one line on stderr).
#include <cstddef>
#include <string>
#include <vector>

namespace stepcert_cli {

/// Error norm / tolerance: error_i / (atol + rtol |y_i|), max over the components.
struct tolerance_request {
    double atol = 0.0;
    double rtol = 0.0;
};

struct order_study_request {
    std::string problem, method;
    double t_end = 0.0;  ///< <= 0: the problem's own interval
    tolerance_request norm;
    std::size_t coarsest_steps = 0;  ///< fixed step; 0: the problem's default
    double coarsest_tolerance = 1e-3;  ///< adaptive
    double ratio = 0.0;               ///< 0: 2 (fixed step) or 10 (adaptive)
    std::size_t levels = 6;
    std::string format = "text";  ///< text | json | csv
    std::string output;           ///< empty: stdout
};

struct certify_request {
    std::string problem, method;
    double t_end = 0.0;
    tolerance_request tolerance;
    std::size_t output_times = 8;
    bool no_reference = false;
    std::string format = "text";  ///< text | json
    std::string output;
};

struct check_tableau_request {
    std::string file;
    bool fail_if_below_claim = false;
    std::string format = "text";  ///< text | svg (stability region picture)
    std::string output;
};

struct compare_request {
    std::string problem;
    std::vector<std::string> methods;
    double t_end = 0.0;
    tolerance_request norm;
    std::size_t output_times = 8;
    std::size_t points = 6;        ///< ladder points per method
    std::size_t coarsest_steps = 0;    ///< fixed step; 0: the problem's default, doubled per point
    double coarsest_tolerance = 1e-3;  ///< adaptive; divided by 10 per point
    std::size_t repeats = 1;
    std::size_t threads = 0;
    double target_error = 0.0;     ///< > 0: answer the cheapest method for it
    bool progress = false;
    std::string format = "text";  ///< text | json | csv | svg
    std::string output;
};

int run_order_study(const order_study_request& r);
int run_certify(const certify_request& r);
int run_check_tableau(const check_tableau_request& r);
int run_compare(const compare_request& r);

} // namespace stepcert_cli
