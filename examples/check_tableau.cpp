// Checks a team's own Butcher tableau from a file before any simulation runs: its exact order
// (every rooted-tree order condition in rational arithmetic), the first condition that fails,
// its principal error coefficients, and its linear stability intervals.
//   check_tableau                                   the bundled example, data/team_rk3.json
//   check_tableau path/to/tableau.json [--fail-if-below-claim] [--svg region.svg]
// The file layout is described in include/stepcert/tableau/tableau_json.hpp. The check itself is
// shared with `stepcert_cli check-tableau` (cli/tableau_report.hpp).
#include <cstdio>
#include <fstream>
#include <iostream>
#include <string>

#include <CLI/CLI.hpp>

#include "cli/tableau_report.hpp"

#ifndef STEPCERT_EXAMPLE_DATA_DIR
#define STEPCERT_EXAMPLE_DATA_DIR "examples/data"
#endif

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
        const auto t = stepcert_cli::read_tableau_file(path);
        const bool ok = stepcert_cli::write_tableau_report(std::cout, t);
        if (!svg_path.empty()) {
            std::ofstream(svg_path) << stepcert_cli::tableau_stability_svg(t);
            std::printf("stability region picture written to %s\n", svg_path.c_str());
        }
        return strict && !ok ? 1 : 0;
    } catch (const stepcert::error& e) {
        std::fprintf(stderr, "check_tableau: %s\n", e.what());
        return 2;
    }
}
