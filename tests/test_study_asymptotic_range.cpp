// Asymptotic-range detection on constructed error sequences (all values derived from the
// stated formulas; the sequences mimic the measured shapes of real studies).
// Source of every check: derived (constructed sequences error = C h^p plus stated floors); the
// detection rules themselves are ours, documented in study/asymptotic_range.hpp.
#include <cmath>
#include <limits>
#include <string>
#include <vector>

#include <gtest/gtest.h>

#include "stepcert/study/asymptotic_range.hpp"

namespace {

const double not_a_number = std::numeric_limits<double>::quiet_NaN();
const double infinity = std::numeric_limits<double>::infinity();

// Points with h_k = h0 / 2^k and local orders log2(e_{k-1}/e_k), floor fixed.
std::vector<stepcert::convergence_point> halving(const std::vector<double>& e, double floor = 1e-15, double h0 = 0.1) {
    std::vector<stepcert::convergence_point> p;
    for (std::size_t k = 0; k < e.size(); ++k) {
        const double h = h0 / std::pow(2.0, static_cast<double>(k));
        double q = not_a_number;
        if (k > 0 && std::isfinite(e[k - 1]) && std::isfinite(e[k]) && e[k - 1] > 0 && e[k] > 0) q = std::log2(e[k - 1] / e[k]);
        p.push_back({h, e[k], q, floor});
    }
    return p;
}

using stepcert::level_status;

} // namespace

TEST(AsymptoticRange, DropsPreAsymptoticStartAndRoundOffPlateau) {
    // e = 1e3 h^4 (1 + (h/0.01)^3) for levels 0..8 (h = 0.1 / 2^k): local orders
    // 4 + log2 of the bracket ratios = 6.99, 6.92, 6.49, 5.25, 4.27, 4.038, 4.005, 4.0006 (derived);
    // then a plateau that wanders around 1e-11.
    std::vector<double> e;
    for (int k = 0; k <= 8; ++k) {
        const double h = 0.1 / std::pow(2.0, k);
        e.push_back(1e3 * std::pow(h, 4) * (1.0 + std::pow(h / 0.01, 3)));
    }
    for (double plateau : {9e-12, 2e-11, 6e-12, 1.5e-11}) e.push_back(plateau);
    const auto pts = halving(e);
    const auto r = stepcert::find_asymptotic_range(pts);
    ASSERT_TRUE(r.found) << r.verdict;
    EXPECT_EQ(r.first, 4u);  // orders 4.27 .. 4.0006 agree within 0.3; 5.25 does not
    EXPECT_EQ(r.last, 8u);
    EXPECT_NEAR(r.median_order, (4.038 + 4.005) / 2, 0.002);
    for (std::size_t k = 0; k < 4; ++k) EXPECT_EQ(r.status[k], level_status::pre_asymptotic) << k;
    for (std::size_t k = 4; k <= 8; ++k) EXPECT_EQ(r.status[k], level_status::in_range) << k;
    for (std::size_t k = 9; k < e.size(); ++k) EXPECT_EQ(r.status[k], level_status::round_off_plateau) << k;
    EXPECT_NE(r.notes[9].find("collapsed"), std::string::npos) << r.notes[9];
}

TEST(AsymptoticRange, NaNAndInfinityNeverCountAsSmall) {
    // Second order (e = h^2) at levels 2..6 and 8..9, non-finite at 0, 1 and 7.
    std::vector<double> e{infinity, not_a_number};
    for (int k = 2; k <= 6; ++k) e.push_back(std::pow(0.1 / std::pow(2.0, k), 2));
    e.push_back(not_a_number);
    for (int k = 8; k <= 9; ++k) e.push_back(std::pow(0.1 / std::pow(2.0, k), 2));
    const auto r = stepcert::find_asymptotic_range(halving(e));
    ASSERT_TRUE(r.found) << r.verdict;
    EXPECT_EQ(r.first, 2u);
    EXPECT_EQ(r.last, 6u);
    EXPECT_EQ(r.status[0], level_status::non_finite);
    EXPECT_EQ(r.status[1], level_status::non_finite);
    EXPECT_EQ(r.status[7], level_status::non_finite);
    EXPECT_NEAR(r.median_order, 2.0, 1e-12);
}

TEST(AsymptoticRange, AllNonFiniteGivesAVerdictNotAnException) {
    const auto r = stepcert::find_asymptotic_range(halving({not_a_number, infinity, not_a_number, infinity}));
    EXPECT_FALSE(r.found);
    EXPECT_NE(r.verdict.find("no asymptotic range found"), std::string::npos) << r.verdict;
    for (auto s : r.status) EXPECT_EQ(s, level_status::non_finite);
}

TEST(AsymptoticRange, ErraticErrorsGiveNoRange) {
    const auto r = stepcert::find_asymptotic_range(halving({1e-3, 2e-3, 5e-4, 3e-3, 1e-3, 8e-4, 2e-4, 9e-4}));
    EXPECT_FALSE(r.found);
    EXPECT_EQ(r.size(), 0u);
    EXPECT_NE(r.verdict.find("no asymptotic range found"), std::string::npos) << r.verdict;
}

TEST(AsymptoticRange, NeedsThreeLevels) {
    // Two intervals of order 4 (three points) are enough ...
    const auto three = stepcert::find_asymptotic_range(halving({1.0, 1.0 / 16, 1.0 / 256}));
    ASSERT_TRUE(three.found) << three.verdict;
    EXPECT_EQ(three.size(), 3u);
    // ... one interval is not, and nothing is fitted through two points.
    const auto two = stepcert::find_asymptotic_range(halving({1.0, 1.0 / 16, not_a_number}));
    EXPECT_FALSE(two.found);
    EXPECT_NE(two.verdict.find("need 3"), std::string::npos) << two.verdict;
}

TEST(AsymptoticRange, ErrorsAtOrBelowTheFloorAreRoundOff) {
    // Order 2 down to 1.6e-6, then an exact zero and a value below the floor 1e-9.
    auto pts = halving({1e-4, 2.5e-5, 6.25e-6, 1.5625e-6, 0.0, 5e-10}, 1e-9);
    const auto r = stepcert::find_asymptotic_range(pts);
    ASSERT_TRUE(r.found) << r.verdict;
    EXPECT_EQ(r.last, 3u);
    EXPECT_EQ(r.status[4], level_status::round_off_plateau);
    EXPECT_EQ(r.status[5], level_status::round_off_plateau);
    EXPECT_NE(r.notes[4].find("round-off floor"), std::string::npos) << r.notes[4];
}

TEST(AsymptoticRange, StalledErrorIsNotConvergence) {
    // A constant error agrees perfectly with itself (local order 0) but is not converging.
    const auto r = stepcert::find_asymptotic_range(halving({1e-6, 1e-6, 1e-6, 1e-6, 1e-6}));
    EXPECT_FALSE(r.found);
}

TEST(AsymptoticRange, DeclaredOrderPlaysNoPart) {
    // A clean first-order sequence is found at order 1, whatever a method may claim.
    const auto r = stepcert::find_asymptotic_range(halving({0.8, 0.4, 0.2, 0.1, 0.05}));
    ASSERT_TRUE(r.found);
    EXPECT_NEAR(r.median_order, 1.0, 1e-12);
    EXPECT_EQ(r.size(), 5u);
}

TEST(AsymptoticRange, HighOrdersMayDifferByTheRelativeSpread) {
    // Local orders 7.8, 8.0, 8.18: spread 0.38 exceeds 0.3 but not 5% of 8.0 (= 0.40).
    std::vector<double> e{1.0};
    for (double q : {7.8, 8.0, 8.18}) e.push_back(e.back() / std::pow(2.0, q));
    const auto pts = halving(e, 0.0);
    EXPECT_TRUE(stepcert::find_asymptotic_range(pts).found);
    stepcert::range_settings strict;
    strict.relative_order_spread = 0.0;
    const auto r = stepcert::find_asymptotic_range(pts, strict);
    // Without the relative part only two of the three intervals agree: no range of 4 points,
    // but a run of 3 points (two intervals) still qualifies.
    ASSERT_TRUE(r.found);
    EXPECT_EQ(r.size(), 3u);
}

TEST(AsymptoticRange, RejectsSettingsThatWouldFitTwoPoints) {
    stepcert::range_settings s;
    s.min_points = 2;
    EXPECT_THROW((void)stepcert::find_asymptotic_range(halving({1.0, 0.5, 0.25}), s), stepcert::invalid_input);
    s = {};
    s.order_spread = 0.0;
    EXPECT_THROW((void)stepcert::find_asymptotic_range(halving({1.0, 0.5, 0.25}), s), stepcert::invalid_input);
}

namespace {
// Points with step ratio rho and the given local orders (errors built from them; derived).
std::vector<stepcert::convergence_point> with_orders(double rho, const std::vector<double>& orders) {
    std::vector<stepcert::convergence_point> p{{0.1, 1e-2, not_a_number, 0.0}};
    for (double q : orders) {
        const auto& prev = p.back();
        p.push_back({prev.h / rho, prev.error / std::pow(rho, q), q, 0.0});
    }
    return p;
}
} // namespace

TEST(AsymptoticRange, SmallStepRatiosWidenTheAllowedSpread) {
    // Noisy orders (as adaptive levels give): spread 0.6. With ratio 2 they do not all agree
    // within 0.3; with ratio 1.26 the allowance is 0.3 * ln 2 / ln 1.26 = 0.90.
    const std::vector<double> noisy{5.4, 5.0, 5.6, 5.1, 5.3};
    const auto halving_run = stepcert::find_asymptotic_range(with_orders(2.0, noisy));
    ASSERT_TRUE(halving_run.found);
    EXPECT_LT(halving_run.size(), 6u);
    const auto small_ratio = stepcert::find_asymptotic_range(with_orders(1.26, noisy));
    ASSERT_TRUE(small_ratio.found);
    EXPECT_EQ(small_ratio.size(), 6u);
}

TEST(AsymptoticRange, CoarseEndDriftIsTrimmed) {
    // Ratio 1.5 allows a spread of 0.3 * ln 2 / ln 1.5 = 0.51, so 4.45 .. 4.03 form one run; but 4.45
    // differs from the median 4.09 of the finer orders by more than 0.3: it is still settling.
    const auto r = stepcert::find_asymptotic_range(with_orders(1.5, {4.45, 4.25, 4.12, 4.06, 4.03}));
    ASSERT_TRUE(r.found) << r.verdict;
    EXPECT_EQ(r.first, 1u);
    EXPECT_EQ(r.last, 5u);
    EXPECT_EQ(r.status[0], level_status::pre_asymptotic);
}

TEST(AsymptoticRange, ErrorsAboveTheCeilingArePreAsymptotic) {
    // A clean first-order sequence, but the first four errors are >= the ceiling 0.1 (no correct
    // digit of a solution of size 1): only the last three levels may form the range.
    auto pts = halving({0.8, 0.4, 0.2, 0.1, 0.05, 0.025, 0.0125});
    EXPECT_EQ(stepcert::find_asymptotic_range(pts).size(), 7u);
    for (auto& p : pts) p.ceiling = 0.1;
    const auto r = stepcert::find_asymptotic_range(pts);
    ASSERT_TRUE(r.found) << r.verdict;
    EXPECT_EQ(r.first, 4u);
    EXPECT_EQ(r.last, 6u);
    for (std::size_t k = 0; k < 4; ++k) {
        EXPECT_EQ(r.status[k], level_status::pre_asymptotic) << k;
        EXPECT_NE(r.notes[k].find("no correct digit"), std::string::npos) << r.notes[k];
    }
}
