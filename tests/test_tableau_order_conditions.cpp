// Rooted trees and the order conditions of Butcher tableaus: tree counts and weights against
// published values, every catalogue tableau's claimed order decided exactly (cpp_rational) and
// in floating point (double, cpp_bin_float_50), and one wrong coefficient caught and named.
#include <cstdint>
#include <string>
#include <vector>

#include <gtest/gtest.h>

#include <boost/multiprecision/cpp_bin_float.hpp>
#include <boost/multiprecision/cpp_int.hpp>

#include "stepcert/tableau/catalogue.hpp"
#include "stepcert/tableau/order_conditions.hpp"

namespace {
using boost::multiprecision::cpp_rational;
using mp50 = boost::multiprecision::cpp_bin_float_50;

TEST(RootedTrees, CountsPerOrderAreOeisA000081) {
    // Number of rooted trees with n vertices, n = 1..10: OEIS A000081 (N. J. A. Sloane, The
    // On-Line Encyclopedia of Integer Sequences).
    const std::vector<std::size_t> published{1, 1, 2, 4, 9, 20, 48, 115, 286, 719};
    const stepcert::rooted_tree_table trees(10);
    for (int n = 1; n <= 10; ++n) EXPECT_EQ(trees.count_of_order(n), published[static_cast<std::size_t>(n - 1)]) << "order " << n;
    EXPECT_EQ(trees.size(), 1205u);
    // Conditions for order p = 1..8: 1, 2, 4, 8, 17, 37, 85, 200 (J. C. Butcher, Numerical Methods
    // for Ordinary Differential Equations, Wiley; from memory for the chapter).
    const std::vector<std::size_t> cumulative{1, 2, 4, 8, 17, 37, 85, 200};
    for (int p = 1; p <= 8; ++p) EXPECT_EQ(trees.end_of_order(p), cumulative[static_cast<std::size_t>(p - 1)]) << "order " << p;
}

TEST(RootedTrees, DensityAndSymmetryOfSmallTrees) {
    // Trees up to order 4 with gamma and sigma: E. Hairer, S. P. Nørsett, G. Wanner, Solving ODEs I,
    // Table II.2.2 (from memory): t (1,1); [t] (2,1); [t^2] (3,2); [[t]] (6,1); [t^3] (4,6);
    // [t,[t]] (8,1); [[t^2]] (12,2); [[[t]]] (24,1).
    const stepcert::rooted_tree_table trees(4);
    struct expected { std::string notation; std::uint64_t gamma, sigma; };
    const std::vector<expected> table{{"t", 1, 1},       {"[t]", 2, 1},     {"[t^2]", 3, 2},    {"[[t]]", 6, 1},
                                      {"[t^3]", 4, 6},   {"[t,[t]]", 8, 1}, {"[[t^2]]", 12, 2}, {"[[[t]]]", 24, 1}};
    ASSERT_EQ(trees.size(), table.size());
    for (std::size_t i = 0; i < table.size(); ++i) {
        EXPECT_EQ(trees[i].notation, table[i].notation) << i;
        EXPECT_EQ(trees[i].density, table[i].gamma) << trees[i].notation;
        EXPECT_EQ(trees[i].symmetry, table[i].sigma) << trees[i].notation;
    }
}

TEST(RootedTrees, LabelingsSumToFactorial) {
    // alpha(t) = |t|! / (sigma(t) gamma(t)) counts the increasing labelings of t, and over all
    // trees of order n they add up to (n-1)! (the recursive trees on n vertices; Hairer, Nørsett,
    // Wanner I, §II.2, from memory). Checks gamma and sigma of all 1205 trees at once.
    const stepcert::rooted_tree_table trees(10);
    std::uint64_t factorial = 1;  // (n-1)!
    for (int n = 1; n <= 10; ++n) {
        if (n > 1) factorial *= static_cast<std::uint64_t>(n - 1);
        const std::uint64_t n_factorial = factorial * static_cast<std::uint64_t>(n);
        std::uint64_t sum = 0;
        for (std::size_t i = trees.first_of_order(n); i < trees.end_of_order(n); ++i) {
            ASSERT_EQ(n_factorial % (trees[i].symmetry * trees[i].density), 0u) << trees[i].notation;
            sum += n_factorial / (trees[i].symmetry * trees[i].density);
        }
        EXPECT_EQ(sum, factorial) << "order " << n;
    }
}

TEST(RootedTrees, RejectsOrdersOutsideTheTable) {
    EXPECT_THROW(stepcert::rooted_tree_table(0), stepcert::invalid_input);
    EXPECT_THROW(stepcert::rooted_tree_table(13), stepcert::invalid_input);
}

// Every catalogue tableau, with the order its source claims (see tableau/catalogue.hpp).
template <class T>
std::vector<stepcert::tableau<T>> catalogue() {
    namespace tb = stepcert::tableaus;
    return {tb::explicit_euler<T>(), tb::explicit_midpoint<T>(), tb::heun2<T>(),           tb::ralston2<T>(),
            tb::kutta3<T>(),         tb::ssp_rk3<T>(),           tb::classic_rk4<T>(),     tb::three_eighths_rule<T>(),
            tb::bogacki_shampine32<T>(), tb::fehlberg45<T>(),    tb::cash_karp54<T>(),     tb::dormand_prince54<T>(),
            tb::fehlberg78<T>(),     tb::backward_euler<T>(),    tb::implicit_midpoint<T>(), tb::sdirk4<T>()};
}

template <class T>
class CatalogueOrders : public ::testing::Test {};
using Scalars = ::testing::Types<cpp_rational, double, mp50>;
TYPED_TEST_SUITE(CatalogueOrders, Scalars);

TYPED_TEST(CatalogueOrders, EveryTableauHasItsPublishedOrderExactly) {
    // Exactly the claimed order: every condition up to it holds, and one of the next order fails
    // (none of these methods has a higher order than its source states).
    for (const auto& t : catalogue<TypeParam>()) {
        const auto r = stepcert::check_order_conditions(t);
        EXPECT_EQ(r.exact, std::numeric_limits<TypeParam>::is_exact);
        EXPECT_EQ(r.main.algebraic_order, t.claimed_order) << t.name;
        ASSERT_TRUE(r.main.first_failure.has_value()) << t.name;
        EXPECT_EQ(r.main.first_failure->order, t.claimed_order + 1) << t.name;
        EXPECT_TRUE(r.meets_claim()) << t.name;
        EXPECT_TRUE(r.row_sum_mismatches.empty()) << t.name;
        if (t.has_embedded()) {
            ASSERT_TRUE(r.embedded.has_value());
            EXPECT_EQ(r.embedded->algebraic_order, t.claimed_embedded_order) << t.name << " (embedded)";
        }
    }
}

TEST(OrderConditions, EveryExplicitTableauLosesItsOrderToOneChangedCoefficient) {
    // For each explicit catalogue tableau of order >= 2: add 1/1000 to the last nonzero a_ij of a
    // stage with b_i != 0. Its row sum no longer equals c_i (reported), and sum_i b_i sum_j a_ij,
    // the elementary weight of the tree [t], moves off 1/2 by b_i/1000 (derived), so the order
    // falls to 1 and the first failure is [t] of order 2.
    std::size_t checked = 0;
    for (const auto& original : catalogue<cpp_rational>()) {
        if (!original.is_explicit() || original.claimed_order < 2) continue;
        ++checked;
        auto t = original;
        std::size_t row = 0, col = 0;
        for (std::size_t i = 0; i < t.stages(); ++i)
            for (std::size_t j = 0; j < i; ++j)
                if (t.b[i] != 0 && t.a[i][j] != 0) row = i, col = j;
        ASSERT_GT(row, 0u) << t.name;
        t.a[row][col] += cpp_rational(1, 1000);
        const auto r = stepcert::check_order_conditions(t);
        EXPECT_EQ(r.main.algebraic_order, 1) << t.name;
        ASSERT_TRUE(r.main.first_failure.has_value()) << t.name;
        EXPECT_EQ(r.main.first_failure->tree, "[t]") << t.name;
        EXPECT_EQ(r.main.first_failure->order, 2) << t.name;
        EXPECT_DOUBLE_EQ(r.main.first_failure->residual, static_cast<double>(cpp_rational(t.b[row] / 1000))) << t.name;
        EXPECT_FALSE(r.meets_claim()) << t.name;
        ASSERT_EQ(r.row_sum_mismatches.size(), 1u) << t.name;
        EXPECT_EQ(r.row_sum_mismatches[0], row) << t.name;
    }
    EXPECT_EQ(checked, 12u);  // Heun, Ralston, midpoint, Kutta 3, SSP 3, RK4, 3/8, BS 3(2), F 4(5), CK, DP, F 7(8)
}

TEST(OrderConditions, ConditionCountsOfClassicRk4) {
    // Checking order 4 + 1: 1 + 1 + 2 + 4 + 9 = 17 conditions; RK4 fails some of the 9 of order 5.
    const auto r = stepcert::check_order_conditions(stepcert::tableaus::classic_rk4<cpp_rational>());
    EXPECT_EQ(r.main.checked_up_to, 5);
    EXPECT_EQ(r.main.conditions_checked, 17u);
    EXPECT_FALSE(r.main.failures.empty());
    for (const auto& f : r.main.failures) EXPECT_EQ(f.order, 5);
}

TEST(OrderConditions, OneWrongWeightIsCaughtAndNamed) {
    // RK4 with b2 = 1/3 + 1/100 and b3 = 1/3 - 1/100: the weights still sum to 1 and satisfy
    // sum b c = 1/2 and sum b c^2 = 1/3, but sum b_i a_ij c_j = 1/6 - 1/400 (derived): order 2,
    // first failure at the tree [[t]] of order 3.
    auto t = stepcert::tableaus::classic_rk4<cpp_rational>();
    t.b[1] = cpp_rational(1, 3) + cpp_rational(1, 100);
    t.b[2] = cpp_rational(1, 3) - cpp_rational(1, 100);
    const auto r = stepcert::check_order_conditions(t);
    EXPECT_EQ(r.main.algebraic_order, 2);
    ASSERT_TRUE(r.main.first_failure.has_value());
    EXPECT_EQ(r.main.first_failure->tree, "[[t]]");
    EXPECT_EQ(r.main.first_failure->order, 3);
    EXPECT_DOUBLE_EQ(r.main.first_failure->residual, -1.0 / 400.0);
    EXPECT_FALSE(r.meets_claim());
}

TEST(OrderConditions, OneMistypedCoefficientOfDormandPrince) {
    // a_{5,3} = 64448/6561 typed as 64448/6651: the stage no longer sums to c5 = 8/9 (reported),
    // and the order falls to 1 (the stage feeds the condition sum b_i c_i through row sums).
    auto t = stepcert::tableaus::dormand_prince54<cpp_rational>();
    t.a[4][2] = cpp_rational(64448, 6651);
    const auto r = stepcert::check_order_conditions(t);
    EXPECT_EQ(r.main.algebraic_order, 1);
    ASSERT_TRUE(r.main.first_failure.has_value());
    EXPECT_EQ(r.main.first_failure->tree, "[t]");  // sum_i b_i (sum_j a_ij) = 1/2, with b5 = -2187/6784 != 0
    ASSERT_EQ(r.row_sum_mismatches.size(), 1u);
    EXPECT_EQ(r.row_sum_mismatches[0], 4u);
}

TEST(OrderConditions, FloatingToleranceIsStated) {
    // In double, RK4's b1 off by 1e-10 is far above 64 eps: order 0.
    auto t = stepcert::tableaus::classic_rk4<double>();
    t.b[0] += 1e-10;
    EXPECT_EQ(stepcert::check_order_conditions(t).main.algebraic_order, 0);
    // ... while an offset of 2 eps is round-off: still order 4.
    auto u = stepcert::tableaus::classic_rk4<double>();
    u.b[0] += 2 * std::numeric_limits<double>::epsilon();
    EXPECT_EQ(stepcert::check_order_conditions(u).main.algebraic_order, 4);
    stepcert::order_condition_options bad;
    bad.eps_multiple = 0;
    EXPECT_THROW(stepcert::check_order_conditions(u, bad), stepcert::invalid_input);
}

TEST(TableauInput, ShapeErrorsAreTyped) {
    auto t = stepcert::tableaus::classic_rk4<double>();
    auto wrong_row = t;
    wrong_row.a[2].pop_back();
    EXPECT_THROW(wrong_row.validate_shape(), stepcert::invalid_input);
    auto wrong_c = t;
    wrong_c.c.push_back(1.0);
    EXPECT_THROW(wrong_c.validate_shape(), stepcert::invalid_input);
    auto empty = t;
    empty.b.clear();
    EXPECT_THROW(empty.validate_shape(), stepcert::invalid_input);
    auto no_order = t;
    no_order.claimed_order = 0;
    EXPECT_THROW(stepcert::check_order_conditions(no_order), stepcert::invalid_input);
    EXPECT_TRUE(t.is_explicit());
    EXPECT_FALSE(stepcert::tableaus::implicit_midpoint<double>().is_explicit());
}

TEST(TableauInput, ExactNumbersParseOrSayWhy) {
    EXPECT_EQ(stepcert::exact_number<cpp_rational>("-22/7"), cpp_rational(-22, 7));
    EXPECT_EQ(stepcert::exact_number<cpp_rational>("0.25"), cpp_rational(1, 4));
    EXPECT_EQ(stepcert::exact_number<cpp_rational>("1.5/3"), cpp_rational(1, 2));
    EXPECT_EQ(stepcert::exact_number<double>("1/3"), 1.0 / 3.0);
    for (const char* bad : {"", "1/0", "abc", "1//2", "1/", "--1", "1e5", "0.1.2"})
        EXPECT_THROW((void)stepcert::exact_number<cpp_rational>(bad), stepcert::invalid_input) << "'" << bad << "'";
}

} // namespace
