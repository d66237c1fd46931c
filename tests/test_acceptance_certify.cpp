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
// scenarios without a closed form. Those two are judged a second time against a truth computed
// outside stepcert's reference code: Boost.Odeint's Bulirsch–Stoer run directly in long double
// (independent_truth below), its precision measured by a run at a 100x tighter tolerance and,
// where the build has float128, by a float128 run as well.
#include "stepcert/reference/odeint_multiprecision.hpp"  // before odeint: float128 states (Boost 1.81)

#include <algorithm>
#include <array>
#include <cmath>
#include <cstddef>
#include <cstdio>
#include <functional>
#include <limits>
#include <optional>
#include <string>
#include <tuple>
#include <vector>

#include <boost/numeric/odeint/integrate/integrate_times.hpp>
#include <boost/numeric/odeint/stepper/bulirsch_stoer.hpp>
#include <gtest/gtest.h>
#if defined(STEPCERT_HAVE_FLOAT128)  // GCC
#include <boost/multiprecision/float128.hpp>
#endif

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
    int judged_independently = 0;  ///< issued certificates also judged against independent_truth
    double worst_independent = 0.0;  ///< largest error (of the tolerance) against it
    std::vector<double> sharpness, cost, search_cost;
    std::vector<std::string> refusals;
};

/// The grid times t0 + j (t1 - t0) / grid, j = 0..grid, in R (for both scenario problems exact in
/// binary: 10 j / 8 and 1.5 j / 8).
template <class R, class P>
std::vector<R> grid_times(const P& p) {
    std::vector<R> times;
    for (std::size_t j = 0; j <= grid; ++j)
        times.push_back(R(p.t0()) + (R(p.t1()) - R(p.t0())) * static_cast<R>(j) / static_cast<R>(grid));
    return times;
}

/// Boost.Odeint's Bulirsch–Stoer (controlled; integrate_times steps to each grid time, no
/// interpolation) in scalar R, from the double problem's own y0 (the problem the certified runs
/// solve) and its right-hand side evaluated in R. No stepcert reference code is involved.
template <class R, class P>
std::vector<std::array<R, std::tuple_size_v<typename P::state_type>>> bulirsch_stoer_truth(const P& p, R tol) {
    namespace odeint = boost::numeric::odeint;
    using S = std::array<R, std::tuple_size_v<typename P::state_type>>;
    S y;
    for (std::size_t i = 0; i < y.size(); ++i) y[i] = R(p.y0()[i]);
    const std::vector<R> times = grid_times<R>(p);
    const auto rhs = p.rhs();
    std::vector<S> out;
    odeint::integrate_times(odeint::bulirsch_stoer<S, R>(tol, tol), [&rhs](const S& x, S& dxdt, R t) { rhs(x, dxdt, t); }, y,
                            times.begin(), times.end(), R(1) / R(100), [&out](const S& x, R) { out.push_back(x); });
    out.erase(out.begin());  // the state at t0
    EXPECT_EQ(out.size(), grid) << p.name();
    return out;
}

/// Largest |a - b| over the grid and the components, subtracted in the wider of the two scalars.
template <class A, class B>
long double largest_difference(const A& a, const B& b) {
    using std::abs;
    long double worst = 0.0L;
    for (std::size_t j = 0; j < std::min(a.size(), b.size()); ++j)
        for (std::size_t i = 0; i < a[j].size(); ++i) worst = std::max(worst, static_cast<long double>(abs(a[j][i] - b[j][i])));
    return worst;
}

/// The truth of a scenario problem computed outside stepcert's reference code, and how far from
/// the true solution it may be (max norm over the grid, absolute).
template <class P>
struct independent_truth {
    std::vector<std::array<long double, std::tuple_size_v<typename P::state_type>>> states;
    long double precision = 0.0L;
};

// Precision of the independent truth (measured, g++ 12 at -O1, Boost 1.81): long double
// Bulirsch–Stoer at tolerance 1e-15 differs from the run at 1e-17 (100x tighter) by 2.1e-16
// (satellite) and 5.2e-16 (rig), and from float128 runs at 1e-22 .. 1e-28 (which agree with each
// other to 1.6e-22) by 1.7e-16 and 5.1e-16: the 100x-tighter run measures the error faithfully.
// The run at 1e-17 is itself within 3.8e-17 of float128 (long double round-off keeps tighter
// tolerances from doing better: 1e-18 gave 2.1e-16). We claim 1e-15 and assert it below.
// Cost: about 3,300 + 3,600 (satellite) and 7,200 + 10,000 (rig) evaluations in long double;
// the float128 pair 7,000 + 9,300 and 23,000 + 32,000 (0.05 s and 0.6 s).
constexpr long double independent_precision = 1e-15L;

template <class P>
independent_truth<P> independent_truth_of(const P& p, const std::vector<typename P::state_type>& stepcert_truth) {
    independent_truth<P> out{bulirsch_stoer_truth<long double>(p, 1e-15L), independent_precision};
    const auto tighter = bulirsch_stoer_truth<long double>(p, 1e-17L);
    const long double step_estimate = largest_difference(out.states, tighter);
    EXPECT_LE(step_estimate, independent_precision) << p.name() << ": long double Bulirsch-Stoer at 1e-15 against 1e-17";
    std::printf("[ figures ] %s: independent truth (long double Bulirsch-Stoer 1e-15) against 1e-17: %.2Le", p.name().c_str(),
                step_estimate);
#if defined(STEPCERT_HAVE_FLOAT128)
    using boost::multiprecision::float128;
    const auto quad = bulirsch_stoer_truth<float128>(p, float128("1e-22"));
    const auto quad_tighter = bulirsch_stoer_truth<float128>(p, float128("1e-24"));
    const long double quad_estimate = largest_difference(quad, quad_tighter);
    const long double against_quad = largest_difference(out.states, quad_tighter);
    EXPECT_LE(quad_estimate, 1e-20L) << p.name() << ": float128 Bulirsch-Stoer at 1e-22 against 1e-24";
    EXPECT_LE(against_quad, independent_precision) << p.name() << ": long double truth against float128";
    std::printf("; against float128 (1e-24): %.2Le; float128 1e-22 against 1e-24: %.2Le", against_quad, quad_estimate);
#endif
    // stepcert's reference, rounded to double as the judging uses it, agrees with the independent
    // truth to that precision plus the rounding (half an ulp of each component: below eps max|y|).
    long double scale = 0.0L;
    for (const auto& y : out.states)
        for (const long double x : y) scale = std::max(scale, std::abs(x));
    const long double against_stepcert = largest_difference(stepcert_truth, out.states);
    EXPECT_LE(against_stepcert, independent_precision + std::numeric_limits<double>::epsilon() * scale) << p.name();
    std::printf("; stepcert's reference (rounded to double) against it: %.2Le\n", against_stepcert);
    return out;
}

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

template <class P, class M, class S>
double true_error(const P& p, const M& m, std::size_t n, const std::vector<S>& truth, const stepcert::weighted_norm& tol) {
    const auto run = stepcert::run_uniform(p, m, n, n / grid);
    double worst = 0.0;
    for (std::size_t j = 1; j < run.states.size(); ++j) worst = std::max(worst, tol(run.states[j], truth[j - 1]));
    return std::isfinite(worst) ? worst : INFINITY;
}

template <class P, class M>
void certify_and_judge(const P& p, const M& m, const std::vector<typename P::state_type>& truth, tally& t, bool with_reference,
                       const independent_truth<P>* independent) {
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
        if (independent) {
            // The independent truth is within `precision` of the solution (max norm); every weight
            // is at least atol, so the error it shows is within precision / atol of the true one.
            const double ei = true_error(p, m, c.steps, independent->states, tol);
            const double uncertainty = static_cast<double>(independent->precision) / tol.atol;
            ++t.judged_independently;
            t.worst_independent = std::max(t.worst_independent, ei);
            if (!(ei + uncertainty <= 1.0)) {
                ++t.false_certificates;
                ADD_FAILURE() << "false certificate against the independent truth: " << p.name() << " / " << m.name() << " / tol "
                              << tol_value << ": N = " << c.steps << ", error " << ei << " (+ " << uncertainty
                              << ") of the tolerance; " << c.basis;
            }
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
    std::optional<independent_truth<P>> independent;
    if constexpr (!P::has_exact) independent = independent_truth_of(p, truth);
    const independent_truth<P>* second = independent ? &*independent : nullptr;
    static const auto kutta3 = stepcert::tableau_method(stepcert::tableaus::kutta3<double>());
    for (bool with_reference : {false, true}) {
        tally& t = with_reference ? verified : estimated;
        certify_and_judge(p, stepcert::explicit_midpoint, truth, t, with_reference, second);
        certify_and_judge(p, kutta3, truth, t, with_reference, second);
        certify_and_judge(p, stepcert::classic_rk4, truth, t, with_reference, second);
        certify_and_judge(p, stepcert::dormand_prince54, truth, t, with_reference, second);
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
    std::printf("  judged also against the independent truth (satellite, rig): %d, largest error %.6f of the tolerance\n",
                t.judged_independently, t.worst_independent);
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
        // The second judging ran: every issued certificate of the two scenario problems (at most
        // 2 problems x 4 methods x 3 tolerances = 24 per level).
        EXPECT_GT(t->judged_independently, 0);
        EXPECT_LE(t->judged_independently, 24);
    }
}
