// A CI guard for a certified step. The satellite propagator's step was certified once, and the
// certificate stored next to the code:
//   certify_satellite_step --json examples/data/satellite_rk4.certificate.json
// This test re-judges the stored step against today's model (check_certificate: the runs with N,
// 2N and 4N steps, the stability check and, as the stored level demands, the multiprecision
// reference) and fails the build when a change of the model invalidates it. The second test
// shows such a failure: the same propagator started on a lower orbit (our own invented change).
#include <array>
#include <cmath>
#include <cstdio>
#include <fstream>
#include <string>

#include <gtest/gtest.h>

#include "stepcert/certify/check_certificate.hpp"
#include "stepcert/methods/classic_rk4.hpp"
#include "stepcert/problems/small_satellite.hpp"
#include "stepcert/report/certificate_json.hpp"

namespace {

stepcert::step_certificate stored_certificate() {
    const std::string path = std::string(STEPCERT_EXAMPLE_DATA_DIR) + "/satellite_rk4.certificate.json";
    std::ifstream in(path);
    if (!in) throw stepcert::invalid_input("cannot read " + path + "; create it with certify_satellite_step --json " + path);
    return stepcert::read_step_certificate_json(in);
}

} // namespace

TEST(SatelliteStepCertificate, StillHoldsForTheCurrentModel) {
    const auto stored = stored_certificate();
    ASSERT_TRUE(stored.issued());
    const auto satellite = stepcert::problems::small_satellite(stored.t1);
    const auto check = stepcert::check_certificate(stored, satellite, stepcert::classic_rk4);
    std::printf("%s\n", check.why.c_str());
    EXPECT_TRUE(check.holds) << check.why;
}

TEST(SatelliteStepCertificate, ALowerOrbitInvalidatesTheStoredStep) {
    const auto stored = stored_certificate();
    const auto satellite = stepcert::problems::small_satellite(stored.t1);
    // Perigee at 1.05 planet radii instead of 1.2, with the same speed ratio: a faster, closer orbit.
    std::array<double, 6> y0 = satellite.y0();
    const double shrink = 1.05 / 1.2;
    y0[0] *= shrink;
    for (int i = 3; i < 6; ++i) y0[i] /= std::sqrt(shrink);
    const auto lower = stepcert::make_problem(satellite.name(), satellite.rhs(), y0, satellite.t0(), satellite.t1());
    const auto check = stepcert::check_certificate(stored, lower, stepcert::classic_rk4);
    std::printf("%s\n", check.why.c_str());
    EXPECT_FALSE(check.holds) << "the lower orbit should need a smaller step";
}
