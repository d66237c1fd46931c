// Text table of order studies: header facts, caution, one aligned row per level.
#include <array>
#include <cmath>
#include <sstream>
#include <string>
#include <vector>

#include <gtest/gtest.h>

#include "stepcert/methods/classic_rk4.hpp"
#include "stepcert/report/study_table.hpp"
#include "stepcert/study/order_study.hpp"
#include "test_report_support.hpp"

namespace {

using report_test::lines_of;

// A trolley on a spring, q'' = -4 q: y = (q, q'), y(0) = (0, 2), exact (sin 2t, 2 cos 2t).
auto trolley() {
    return stepcert::make_problem("spring trolley",
                                  [](const auto& y, auto& dydt, auto) {
                                      dydt[0] = y[1];
                                      dydt[1] = -4.0 * y[0];
                                  },
                                  std::array<double, 2>{0.0, 2.0}, 0.0, 3.0)
        .with_exact([](double t, std::array<double, 2>& y) { y = {std::sin(2 * t), 2 * std::cos(2 * t)}; });
}

} // namespace

TEST(ReportTable, HeaderStatesWhatWasStudiedAndConcluded) {
    const auto r = stepcert::order_study(trolley(), stepcert::classic_rk4, stepcert::step_ladder{12, 2.0, 8});
    ASSERT_TRUE(r.fitted()) << r.verdict_text;
    const std::string t = stepcert::study_table(r);
    for (const char* part : {"problem 'spring trolley'", "method 'classic RK4'", "declared order 4", "error basis: exact_solution",
                             "reference digits: 15.0", "fitted order: ", "95% CI", "verdict: order_fitted",
                             "caution: this concerns discretization error only"})
        EXPECT_NE(t.find(part), std::string::npos) << "missing '" << part << "' in\n" << t;
    char fitted[64];
    std::snprintf(fitted, sizeof fitted, "fitted order: %.3f (95%% CI %.3f .. %.3f", r.fit.order, r.fit.lower, r.fit.upper);
    EXPECT_NE(t.find(fitted), std::string::npos) << fitted << "\n" << t;
}

TEST(ReportTable, OneAlignedRowPerLevel) {
    const auto r = stepcert::order_study(trolley(), stepcert::classic_rk4, stepcert::step_ladder{12, 2.0, 8});
    const auto lines = lines_of(stepcert::study_table(r));
    std::size_t header = 0;
    while (header < lines.size() && lines[header].rfind("level ", 0) != 0) ++header;
    ASSERT_LT(header + r.levels.size(), lines.size());
    const std::size_t range_col = lines[header].find("range");
    ASSERT_NE(range_col, std::string::npos);
    for (const auto& lv : r.levels) {
        const std::string& row = lines[header + 1 + lv.index];
        char lead[16];
        std::snprintf(lead, sizeof lead, "%5zu ", lv.index);
        EXPECT_EQ(row.rfind(lead, 0), 0u) << row;
        EXPECT_EQ(row.find(std::to_string(lv.steps)) != std::string::npos, true) << row;
        // The range mark starts in the same column for every row.
        const bool in = lv.status == stepcert::level_status::in_range;
        EXPECT_EQ(row.substr(range_col, 10) == "* in range", in) << row;
    }
    EXPECT_EQ(lines[header + 1 + r.levels.size()].rfind("total evaluations: ", 0), 0u);
}

TEST(ReportTable, SaysWhenNoRangeWasFound) {
    stepcert::study_options o;
    o.basis = stepcert::error_basis::successive_differences;
    const auto r = stepcert::order_study(trolley(), stepcert::classic_rk4, stepcert::step_ladder{12, 2.0, 3}, o);
    const std::string t = stepcert::study_table(r);
    EXPECT_NE(t.find("fitted order: none"), std::string::npos) << t;
    EXPECT_NE(t.find("verdict: no_asymptotic_range - no asymptotic range found"), std::string::npos) << t;
    EXPECT_NE(t.find("diff(grid)"), std::string::npos) << t;
    EXPECT_NE(t.find("reference digits: none"), std::string::npos) << t;
}
