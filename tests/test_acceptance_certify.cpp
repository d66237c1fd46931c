// Issue 5's acceptance of the fixed-step certification, on 10 problems x 4 methods x 3
// tolerances, at the estimated level (Richardson x safety factor, no reference consulted) and at
// the reference-verified level (the default):
//  * no false certificates: every issued step meets the tolerance against the exact solution or
//    stepcert's multiprecision reference (any miss fails);
//  * sharp: the certified h is at least 0.5 x the largest uniform h that truly meets it (the
//    fewest steps found by bisection against the truth);
//  * cost, estimated level, in right-hand-side evaluations (counted, so exact; bench/
//    bench_certify.cpp adds wall time): relative to one production run at the certified step it
//    is printed; relative to one production run of the finest run the evidence needed (the
//    certified run, or the finer run a pre-asymptotic one is measured from) it is at most 3.
//    The first cannot be held to 3 everywhere: the order must be seen, on runs that can be far
//    finer than the step the tolerance needs.
// Ground truth: exact solutions (Kepler's equation; linear systems by their eigen-decomposition;
// Prothero and Robinson 1974), and reference solutions in cpp_bin_float_38 for the two
// scenarios without a closed form.
#include <algorithm>
#include <cmath>
#include <cstddef>
#include <cstdio>
#include <functional>
#include <string>
#include <vector>

#include <gtest/gtest.h>

#include "test_certify_support.hpp"

#include "stepcert/certify/certify_fixed_step.hpp"
#include "stepcert/methods/classic_rk4.hpp"
#include "stepcert/methods/dormand_prince54.hpp"
#include "stepcert/methods/explicit_midpoint.hpp"
#include "stepcert/methods/tableau_method.hpp"
#include "stepcert/problems/dahlquist.hpp"
#include "stepcert/problems/harmonic_oscillator.hpp"
#include "stepcert/problems/kepler.hpp"
#include "stepcert/problems/linear_system.hpp"
#include "stepcert/problems/prothero_robinson.hpp"
#include "stepcert/problems/small_satellite.hpp"
#include "stepcert/problems/suspension_rig.hpp"
#include "stepcert/reference/reference_solution.hpp"
#include "stepcert/run/run.hpp"
#include "stepcert/tableau/catalogue.hpp"

namespace test_acceptance_certify {

constexpr std::size_t grid = 8;

double median(std::vector<double> v) {
    std::sort(v.begin(), v.end());
    return v.empty() ? NAN : v[v.size() / 2];
}

struct tally {
    int issued = 0, refused = 0, false_certificates = 0;
    std::vector<double> sharpness, cost, search_cost;
    std::vector<std::string> refusals;
};

/// The truth at the grid times, in double, for a problem (exact or reference).
template <class P>
std::vector<typename P::state_type> truth_of(const P& p) {
    std::vector<typename P::state_type> out;
    if constexpr (P::has_exact) {
        auto y = p.y0();
        for (std::size_t j = 1; j <= grid; ++j) {
            const double t = p.t0() + (p.t1() - p.t0()) * static_cast<double>(j) / static_cast<double>(grid);
            p.exact()(t, y);
            out.push_back(y);
        }
    } else {
        const auto ref = stepcert::reference_solution(p, 20, stepcert::uniform_times{grid});
        EXPECT_TRUE(ref.vouches_requested()) << p.name();
        for (const auto& y : ref.states) out.push_back(stepcert::convert_state<typename P::state_type>(y));
    }
    return out;
}

template <class P, class M>
double true_error(const P& p, const M& m, std::size_t n, const std::vector<typename P::state_type>& truth,
                  const stepcert::weighted_norm& tol) {
    const auto run = stepcert::run_uniform(p, m, n, n / grid);
    double worst = 0.0;
    for (std::size_t j = 1; j < run.states.size(); ++j) worst = std::max(worst, tol(run.states[j], truth[j - 1]));
    return std::isfinite(worst) ? worst : INFINITY;
}

template <class P, class M>
void certify_and_judge(const P& p, const M& m, const std::vector<typename P::state_type>& truth, tally& t, bool with_reference) {
    stepcert::certify_options opt;
    opt.output_times = grid;
    opt.verify_with_reference = with_reference;
    for (double tol_value : {1e-3, 1e-5, 1e-7}) {
        const stepcert::weighted_norm tol{tol_value, tol_value, stepcert::norm_kind::max};
        const auto c = stepcert::certify(p, m, tol, opt);
        if (!c.issued()) {
            ++t.refused;
            t.refusals.push_back(p.name() + " / " + std::string(m.name()) + " / " + std::to_string(tol_value) + ": " +
                                 std::string(stepcert::to_string(c.reason)));
            continue;
        }
        ++t.issued;
        const double e = true_error(p, m, c.steps, truth, tol);
        if (!(e <= 1.0)) {
            ++t.false_certificates;
            ADD_FAILURE() << "false certificate: " << p.name() << " / " << m.name() << " / tol " << tol_value << ": N = "
                          << c.steps << ", true error " << e << " of the tolerance; " << c.basis;
        }
        // Fewest steps meeting the tolerance: bisection on multiples of the grid below N.
        std::size_t lo = 0, hi = c.steps / grid;
        while (hi - lo > 1) {
            const std::size_t mid = (lo + hi) / 2;
            (true_error(p, m, mid * grid, truth, tol) <= 1.0 ? hi : lo) = mid;
        }
        t.sharpness.push_back(static_cast<double>(hi * grid) / static_cast<double>(c.steps));
        const double production = static_cast<double>(stepcert::run_uniform(p, m, c.steps).stats.evaluations);
        t.cost.push_back(static_cast<double>(c.evaluations) / production);
        const std::size_t finest = test_certify_support::finest_run_of_evidence(c);
        t.search_cost.push_back(static_cast<double>(c.evaluations) /
                                static_cast<double>(stepcert::run_uniform(p, m, finest).stats.evaluations));
        if (!with_reference) {
            EXPECT_LE(t.search_cost.back(), 3.0) << p.name() << " / " << m.name() << " / tol " << tol_value << ": N = "
                                                 << c.steps << ", finest run " << finest;
        }
        if (with_reference) {
            EXPECT_EQ(c.level, stepcert::evidence_level::reference_verified) << p.name() << " / " << m.name();
        }
        EXPECT_GE(t.sharpness.back(), 0.5) << p.name() << " / " << m.name() << " / tol " << tol_value << ": N = " << c.steps
                                       << ", fewest meeting " << hi * grid;
    }
}

template <class P>
void all_methods(const P& p, tally& estimated, tally& verified) {
    const auto truth = truth_of(p);
    static const auto kutta3 = stepcert::tableau_method(stepcert::tableaus::kutta3<double>());
    for (bool with_reference : {false, true}) {
        tally& t = with_reference ? verified : estimated;
        certify_and_judge(p, stepcert::explicit_midpoint, truth, t, with_reference);
        certify_and_judge(p, kutta3, truth, t, with_reference);
        certify_and_judge(p, stepcert::classic_rk4, truth, t, with_reference);
        certify_and_judge(p, stepcert::dormand_prince54, truth, t, with_reference);
    }
}

void print(const char* what, const tally& t) {
    std::printf("%s: %d issued, %d refused, %d false; sharpness (fewest meeting N / certified N) median %.3f, min %.3f; "
                "cost (certifying / one production run at the certified step, evaluations) median %.2f, max %.2f, "
                "at most 3 in %d; (certifying / one production run of the finest run needed) median %.2f, max %.2f\n",
                what, t.issued, t.refused, t.false_certificates, median(t.sharpness),
                *std::min_element(t.sharpness.begin(), t.sharpness.end()), median(t.cost),
                *std::max_element(t.cost.begin(), t.cost.end()),
                static_cast<int>(std::count_if(t.cost.begin(), t.cost.end(), [](double x) { return x <= 3.0; })),
                median(t.search_cost), *std::max_element(t.search_cost.begin(), t.search_cost.end()));
    for (const auto& r : t.refusals) std::printf("  refused: %s\n", r.c_str());
}

} // namespace test_acceptance_certify

using namespace test_acceptance_certify;

// Both levels: no false certificate, and sharp. Estimated level: the search within 3 production
// runs of the finest run it needed.
TEST(CertifyAcceptance, NoFalseCertificatesAndSharpSteps) {
    namespace pr = stepcert::problems;
    tally estimated, verified;
    all_methods(pr::kepler(0.5, 20.0), estimated, verified);
    all_methods(pr::kepler(0.2, 10.0), estimated, verified);
    all_methods(pr::harmonic_oscillator(2.0, 10.0), estimated, verified);
    all_methods(pr::dahlquist(-1.0, 5.0), estimated, verified);
    all_methods(pr::dahlquist(-40.0, 1.0), estimated, verified);
    all_methods(pr::linear_system(4.0), estimated, verified);
    all_methods(pr::prothero_robinson(-10.0, 2.0), estimated, verified);
    all_methods(pr::prothero_robinson(-300.0, 1.0), estimated, verified);
    all_methods(pr::small_satellite(10.0), estimated, verified);
    all_methods(pr::suspension_rig(1.5), estimated, verified);
    print("estimated level", estimated);
    print("reference-verified level", verified);
    for (const tally* t : {&estimated, &verified}) {
        EXPECT_EQ(t->false_certificates, 0);
        EXPECT_EQ(t->issued + t->refused, 120);
        // Refusals are allowed (budget, round-off) but must stay the exception on this suite.
        EXPECT_GE(t->issued, 100);
    }
}
