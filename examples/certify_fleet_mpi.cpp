// A constellation of eight small satellites (our own scenario, invented data: the J2 planet of
// problems/small_satellite.hpp, perigees from 640 to 3200 km altitude, inclinations from
// equatorial to polar) shares one orbit propagator: classic RK4 with a uniform step. Which step
// may each satellite's propagator use so that position and velocity stay within the tolerance
// over a number of orbits? The certifications are independent, so they are spread over MPI ranks
// with Boost.MPI: rank r certifies the satellites i with i % size == r, serializes each
// certificate to a JSON string (report/certificate_json.hpp) and boost::mpi::gather brings them
// to rank 0, which writes one report ("stepcert.fleet_report") in fleet order. Runs without
// mpiexec too (one rank).
//   certify_fleet_mpi [--orbits K] [--atol A] [--budget E] --json FILE          (or: mpiexec -n N certify_fleet_mpi ...)
//   certify_fleet_mpi --compare A.json B.json   same certificates in two reports? (exit 0: yes, 1: no)
// Units: planet radii and sqrt(R^3/GM) (about 810 s); --atol 1.6e-7 is about 1 m.
// Exit: 0 all certified, 2 written but some satellite not certified, 1 error.
#include <array>
#include <chrono>
#include <cmath>
#include <cstddef>
#include <cstdio>
#include <exception>
#include <fstream>
#include <numbers>
#include <string>
#include <vector>

#include <CLI/CLI.hpp>
#include <boost/mpi/collectives/gather.hpp>
#include <boost/mpi/communicator.hpp>
#include <boost/mpi/environment.hpp>
#include <boost/serialization/string.hpp>
#include <boost/serialization/vector.hpp>
#include <nlohmann/json.hpp>

#include "stepcert/certify/certify_fixed_step.hpp"
#include "stepcert/core/problem.hpp"
#include "stepcert/methods/classic_rk4.hpp"
#include "stepcert/problems/small_satellite.hpp"
#include "stepcert/report/certificate_json.hpp"

namespace {

constexpr const char* fleet_report_format = "stepcert.fleet_report";
constexpr int fleet_report_version = 1;

/// One satellite: perigee radius r0 (planet radii), the orbit plane's inclination as an exact
/// (cos, sin) pair (Pythagorean triples), and the perigee speed as a multiple of the circular one.
struct satellite {
    const char* name;
    double perigee_radius;
    double cos_incl, sin_incl;
    double speed_factor;  // >= 1: the start is the perigee
};

// Invented data.
const std::vector<satellite>& fleet() {
    static const std::vector<satellite> sats{
        {"sat-1", 1.1, 3.0 / 5, 4.0 / 5, 1.01},    // 53.1 deg
        {"sat-2", 1.1, 4.0 / 5, 3.0 / 5, 1.01},    // 36.9 deg
        {"sat-3", 1.2, 5.0 / 13, 12.0 / 13, 1.02},  // 67.4 deg
        {"sat-4", 1.2, 0.0, 1.0, 1.02},            // polar
        {"sat-5", 1.35, 12.0 / 13, 5.0 / 13, 1.04}, // 22.6 deg
        {"sat-6", 1.35, 8.0 / 17, 15.0 / 17, 1.04}, // 61.9 deg
        {"sat-7", 1.5, 1.0, 0.0, 1.0},             // equatorial, circular
        {"sat-8", 1.5, 15.0 / 17, 8.0 / 17, 1.05},  // 28.1 deg
    };
    return sats;
}

/// Kepler period 2 pi a^(3/2) of the unperturbed orbit, a = r0 / (2 - f^2) (vis-viva, GM = 1).
double kepler_period(const satellite& s) {
    const double a = s.perigee_radius / (2.0 - s.speed_factor * s.speed_factor);
    return 2.0 * std::numbers::pi * a * std::sqrt(a);
}

stepcert::step_certificate certify_satellite(const satellite& s, double orbits, double atol, std::size_t budget) {
    using namespace stepcert;
    const double v = s.speed_factor / std::sqrt(s.perigee_radius);
    const std::array<double, 6> y0{s.perigee_radius, 0.0, 0.0, 0.0, v * s.cos_incl, v * s.sin_incl};
    std::string name = "constellation ";
    name += s.name;
    const auto p = make_problem(name, problems::small_satellite_rhs<double>{}, y0, 0.0, orbits * kepler_period(s)).as_separable();
    certify_options opt;
    opt.output_times = 24;
    opt.max_evaluations = budget;
    return certify(p, classic_rk4, weighted_norm{atol, 0.0, norm_kind::max}, opt);
}

/// What a rank sends to rank 0 for one satellite: the certificate as JSON text, or the error.
struct fleet_item {
    std::size_t index = 0;
    bool ok = false;
    std::string text;

    template <class Archive>
    void serialize(Archive& ar, const unsigned int /*version*/) {
        ar & index & ok & text;
    }
};

nlohmann::json read_report(const std::string& path) {
    std::ifstream in(path);
    if (!in) throw stepcert::invalid_input("cannot read '" + path + "'; give a report written with --json.");
    nlohmann::json j;
    try {
        j = nlohmann::json::parse(in);
    } catch (const nlohmann::json::exception& e) {
        std::string message = "'" + path + "' is not JSON (";
        message += e.what();
        message += ").";
        throw stepcert::invalid_input(message);
    }
    if (!j.is_object() || !j.contains("format") || j["format"] != fleet_report_format ||
        !j.contains("format_version") || j["format_version"] != fleet_report_version)
        throw stepcert::invalid_input("'" + path + "' is not a stepcert.fleet_report version 1 (field 'format' or 'format_version').");
    if (!j.contains("certificates") || !j["certificates"].is_array())
        throw stepcert::invalid_input("'" + path + "': field 'certificates' is missing or not an array.");
    return j;
}

void check_certificate_entry(const nlohmann::json& entry, const std::string& path, std::size_t i) {
    try {
        (void)stepcert::step_certificate_from_json(entry);
    } catch (const stepcert::invalid_input& e) {
        std::string message = "'" + path + "', certificates[";
        message += std::to_string(i);
        message += "]: ";
        message += e.what();
        throw stepcert::invalid_input(message);
    }
}

/// Exit 0 when both reports hold the same certificates, field for field; the report-level
/// 'ranks' may differ. Every entry must read back as a step certificate.
int compare_reports(const std::string& a_path, const std::string& b_path) {
    const nlohmann::json a = read_report(a_path), b = read_report(b_path);
    const auto& ca = a["certificates"];
    const auto& cb = b["certificates"];
    if (ca.size() != cb.size()) {
        std::printf("different: %zu certificates in %s, %zu in %s\n", ca.size(), a_path.c_str(), cb.size(), b_path.c_str());
        return 1;
    }
    std::size_t differing = 0;
    for (std::size_t i = 0; i < ca.size(); ++i) {
        check_certificate_entry(ca[i], a_path, i);
        check_certificate_entry(cb[i], b_path, i);
        if (ca[i] == cb[i]) continue;
        ++differing;
        std::string fields;
        for (const auto& [key, value] : ca[i].items())
            if (!cb[i].contains(key) || cb[i][key] != value) {
                fields += ' ';
                fields += key;
            }
        std::printf("certificates[%zu] differ in:%s\n", i, fields.c_str());
    }
    std::printf("%zu of %zu certificates identical (%s: %s ranks, %s: %s ranks)\n", ca.size() - differing, ca.size(),
                a_path.c_str(), a.value("ranks", nlohmann::json()).dump().c_str(), b_path.c_str(),
                b.value("ranks", nlohmann::json()).dump().c_str());
    return differing == 0 ? 0 : 1;
}

} // namespace

int main(int argc, char** argv) {
    boost::mpi::environment env(argc, argv);
    boost::mpi::communicator world;
    CLI::App app{"Certify the RK4 step of every satellite of a constellation, spread over MPI ranks"};
    // At 20 orbits two satellites (sat-3, sat-6) find no asymptotic range within the budget.
    double orbits = 10.0, atol = 1.6e-7;
    std::size_t budget = 20'000'000;  // the library's default
    std::string json_path;
    std::vector<std::string> compare_paths;
    app.add_option("--orbits", orbits, "length of each run in orbits of that satellite")->check(CLI::PositiveNumber);
    app.add_option("--atol", atol, "absolute tolerance on every state component (planet radii; 1.6e-7 is about 1 m)")
        ->check(CLI::PositiveNumber);
    app.add_option("--budget", budget, "right-hand-side evaluations each certification may spend")->check(CLI::PositiveNumber);
    auto* json_opt = app.add_option("--json", json_path, "write the fleet report (rank 0) to this file");
    auto* compare_opt = app.add_option("--compare", compare_paths, "compare the certificates of two fleet reports and exit")
                            ->expected(2)
                            ->excludes(json_opt);
    json_opt->excludes(compare_opt);
    CLI11_PARSE(app, argc, argv);
    try {
        if (!compare_paths.empty()) return world.rank() == 0 ? compare_reports(compare_paths[0], compare_paths[1]) : 0;
        if (json_path.empty()) throw stepcert::invalid_input("give --json FILE for the report (or --compare A B).");

        const auto start = std::chrono::steady_clock::now();
        const auto& sats = fleet();
        const auto rank = static_cast<std::size_t>(world.rank());
        const auto size = static_cast<std::size_t>(world.size());
        std::vector<fleet_item> mine;
        for (std::size_t i = rank; i < sats.size(); i += size) {
            fleet_item item;
            item.index = i;
            // A failure is sent like a result: every rank must reach the gather, or rank 0 waits forever.
            try {
                item.text = to_json(certify_satellite(sats[i], orbits, atol, budget)).dump();
                item.ok = true;
            } catch (const std::exception& e) {
                item.text = e.what();
            }
            mine.push_back(std::move(item));
        }
        std::vector<std::vector<fleet_item>> gathered;
        boost::mpi::gather(world, mine, gathered, 0);
        if (world.rank() != 0) return 0;

        std::vector<nlohmann::json> certificates(sats.size());
        bool failed = false, all_issued = true;
        for (const auto& from_rank : gathered)
            for (const auto& item : from_rank) {
                if (!item.ok) {
                    std::fprintf(stderr, "certify_fleet_mpi: %s: %s\n", sats[item.index].name, item.text.c_str());
                    failed = true;
                    continue;
                }
                certificates[item.index] = nlohmann::json::parse(item.text);
            }
        if (failed) return 1;
        const double seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();

        std::printf("%-6s %5s %6s %7s %10s %7s  %-19s %9s\n", "sat", "r0", "incl", "t1", "step h", "steps", "level", "ref err");
        nlohmann::json fleet_json = nlohmann::json::array();
        for (std::size_t i = 0; i < sats.size(); ++i) {
            const stepcert::step_certificate c = stepcert::step_certificate_from_json(certificates[i]);
            const double incl = std::atan2(sats[i].sin_incl, sats[i].cos_incl) * 180.0 / std::numbers::pi;
            std::printf("%-6s %5.2f %6.1f %7.1f %10.3e %7zu  %-19s %9.3e\n", sats[i].name, sats[i].perigee_radius, incl, c.t1,
                        c.step, c.steps, std::string(to_string(c.level)).c_str(), c.reference_error);
            all_issued = all_issued && c.issued();
            fleet_json.push_back({{"name", sats[i].name},
                                  {"perigee_radius", sats[i].perigee_radius},
                                  {"inclination_deg", incl},
                                  {"speed_factor", sats[i].speed_factor}});
        }
        // The certificates carry no timing and no rank; 'ranks' is the only field that depends on the run.
        nlohmann::json report;
        report["format"] = fleet_report_format;
        report["format_version"] = fleet_report_version;
        report["scenario"] = "constellation of small satellites about the J2 planet, classic RK4, uniform step";
        report["orbits"] = orbits;
        report["ranks"] = world.size();
        report["fleet"] = std::move(fleet_json);
        report["certificates"] = std::move(certificates);
        std::ofstream out(json_path);
        out << report.dump(2) << '\n';
        if (!out) throw stepcert::invalid_input("cannot write '" + json_path + "'.");
        std::printf("%zu certificates from %d rank(s) in %.2f s, report written to %s\n", sats.size(), world.size(), seconds,
                    json_path.c_str());
        return all_issued ? 0 : 2;
    } catch (const stepcert::error& e) {
        std::fprintf(stderr, "certify_fleet_mpi: %s\n", e.what());
        return 1;
    }
}
