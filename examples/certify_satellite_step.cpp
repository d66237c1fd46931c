// Which step may the orbit propagator of a small satellite (our own scenario, invented data:
// J2 gravity of an invented planet, problems/small_satellite.hpp) run with, so that the position
// and velocity stay within a tolerance over a few orbits? stepcert certifies the largest uniform
// step of the chosen method, says how it knows (reference-verified, or estimated when
// --no-reference is given), checks the step's linear stability along the orbit, and prints the
// certificate for a verification report; --json stores it for a CI check (see
// certificate_guard_gtest.cpp).
//   certify_satellite_step [--method rk4|dp5|midpoint] [--orbits K] [--atol A] [--rtol R]
//                          [--output-times G] [--no-reference] [--json FILE]
// Units: planet radii and sqrt(R^3/GM) (about 810 s); --atol 1.6e-6 is about 10 m.
#include <cstdio>
#include <fstream>
#include <iostream>
#include <map>
#include <string>

#include <CLI/CLI.hpp>

#include "stepcert/certify/certify_fixed_step.hpp"
#include "stepcert/methods/classic_rk4.hpp"
#include "stepcert/methods/dormand_prince54.hpp"
#include "stepcert/methods/explicit_midpoint.hpp"
#include "stepcert/problems/small_satellite.hpp"
#include "stepcert/report/certificate_json.hpp"
#include "stepcert/report/certificate_text.hpp"

int main(int argc, char** argv) {
    CLI::App app{"Certify the largest uniform step of a satellite orbit propagator for a tolerance"};
    std::string method = "rk4";
    double orbits = 3.0, atol = 1.6e-6, rtol = 0.0;
    std::size_t output_times = 24;
    bool no_reference = false;
    std::string json_path;
    app.add_option("--method", method, "integrator: rk4 (classic RK4), dp5 (Dormand-Prince 5th order, fixed step), midpoint")
        ->check(CLI::IsMember({"rk4", "dp5", "midpoint"}));
    app.add_option("--orbits", orbits, "length of the run in orbits (one orbit is about 8.8 time units)")->check(CLI::PositiveNumber);
    app.add_option("--atol", atol, "absolute tolerance on every state component (planet radii; 1.6e-6 is about 10 m)")
        ->check(CLI::NonNegativeNumber);
    app.add_option("--rtol", rtol, "relative tolerance on every state component")->check(CLI::NonNegativeNumber);
    app.add_option("--output-times", output_times, "evenly spaced times at which the error is measured")->check(CLI::PositiveNumber);
    app.add_flag("--no-reference", no_reference, "do not verify against the multiprecision reference (level: estimated)");
    app.add_option("--json", json_path, "also write the certificate as JSON to this file");
    CLI11_PARSE(app, argc, argv);
    try {
        using namespace stepcert;
        const auto satellite = problems::small_satellite(orbits * 8.8);
        const weighted_norm tolerance{atol, rtol, norm_kind::max};
        certify_options opt;
        opt.output_times = output_times;
        opt.verify_with_reference = !no_reference;
        step_certificate c;
        if (method == "rk4") c = certify(satellite, classic_rk4, tolerance, opt);
        if (method == "dp5") c = certify(satellite, dormand_prince54, tolerance, opt);
        if (method == "midpoint") c = certify(satellite, explicit_midpoint, tolerance, opt);
        write_certificate_text(std::cout, c);
        if (!json_path.empty()) {
            std::ofstream out(json_path);
            out << to_json(c).dump(2) << '\n';
            if (!out) throw invalid_input("cannot write '" + json_path + "'.");
            std::printf("\ncertificate written to %s\n", json_path.c_str());
        }
        return c.issued() ? 0 : 2;
    } catch (const stepcert::error& e) {
        std::fprintf(stderr, "certify_satellite_step: %s\n", e.what());
        return 1;
    }
}
