// CSV export of order studies: a header line, one row per level, RFC 4180-style quoting.
#include <array>
#include <cmath>
#include <sstream>
#include <string>
#include <vector>

#include <gtest/gtest.h>

#include "stepcert/methods/classic_rk4.hpp"
#include "stepcert/report/csv.hpp"
#include "stepcert/study/order_study.hpp"
#include "test_report_support.hpp"

namespace {

using report_test::lines_of;

// y' = -y + cos t on [0, 4] (a cooling fin driven by a slow heat pulse), exact
// y = (cos t + sin t - e^-t)/2 for y(0) = 0 (derived by variation of constants).
auto fin_study() {
    const auto p = stepcert::make_problem("cooling fin",
                                          [](const auto& y, auto& dydt, auto t) {
                                              using std::cos;
                                              dydt[0] = -y[0] + cos(t);
                                          },
                                          std::array<double, 1>{0.0}, 0.0, 4.0)
                       .with_exact([](double t, std::array<double, 1>& y) { y[0] = (std::cos(t) + std::sin(t) - std::exp(-t)) / 2; });
    return stepcert::order_study(p, stepcert::classic_rk4, stepcert::step_ladder{8, 2.0, 7});
}

} // namespace

TEST(ReportCsv, HeaderLineThenOneRowPerLevel) {
    const auto r = fin_study();
    ASSERT_TRUE(r.fitted()) << r.verdict_text;
    EXPECT_NEAR(r.fit.order, 4.0, 0.2);  // classic RK4 (Kutta 1901), common practice
    const auto lines = lines_of(stepcert::study_csv(r));
    ASSERT_EQ(lines.size(), r.levels.size() + 1);
    EXPECT_EQ(lines[0], "level,h,tolerance,steps,rejected,evaluations,error_final,error_grid,local_order,round_off_floor,status,note");
    // Level 0: no local order (empty field), fixed step (empty tolerance), 8 steps of 0.5.
    EXPECT_EQ(lines[1].rfind("0,0.5,,8,0,32,", 0), 0u) << lines[1];
    for (std::size_t k = 1; k < lines.size(); ++k) {
        EXPECT_EQ(std::count(lines[k].begin(), lines[k].end(), ','), 11) << lines[k];
        EXPECT_EQ(lines[k].rfind(std::to_string(k - 1) + ",", 0), 0u) << lines[k];
    }
    // Numbers are written with round-trip precision.
    std::istringstream row(lines[3]);
    std::string field;
    for (int i = 0; i < 8; ++i) std::getline(row, field, ',');
    EXPECT_EQ(std::stod(field), r.levels[2].error_grid);
}

TEST(ReportCsv, QuotesTextAndWritesNonFiniteValues) {
    auto r = fin_study();
    r.levels[1].note = "a note, with a comma and a \"quote\"";
    r.levels[2].error_grid = std::numeric_limits<double>::infinity();
    const auto lines = lines_of(stepcert::study_csv(r));
    EXPECT_NE(lines[2].find(",\"a note, with a comma and a \"\"quote\"\"\""), std::string::npos) << lines[2];
    EXPECT_NE(lines[3].find(",inf,"), std::string::npos) << lines[3];
}
