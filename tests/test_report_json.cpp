// JSON export of order studies: our own format tag and version, exact round trip (NaN and
// infinities included), and rejection of documents that are not ours.
#include <array>
#include <cmath>
#include <string>

#include <gtest/gtest.h>
#include <nlohmann/json.hpp>

#include "stepcert/methods/classic_rk4.hpp"
#include "stepcert/report/json.hpp"
#include "stepcert/study/order_study.hpp"

namespace {

// Prothero–Robinson y' = lambda (y - sin t) + cos t, exact y = sin t (Prothero, Robinson,
// Math. Comp. 28 (1974); from memory). lambda = -2000 makes RK4's coarse runs overflow.
auto overflowing_study() {
    const auto p = stepcert::make_problem("prothero-robinson",
                                          [](const auto& y, auto& dydt, auto t) {
                                              using std::cos;
                                              using std::sin;
                                              dydt[0] = -2000.0 * (y[0] - sin(t)) + cos(t);
                                          },
                                          std::array<double, 1>{0.0}, 0.0, 2.0)
                       .with_exact([](double t, std::array<double, 1>& y) { y[0] = std::sin(t); });
    return stepcert::order_study(p, stepcert::classic_rk4, stepcert::step_ladder{50, 2.0, 13});
}

bool same_number(double a, double b) { return (std::isnan(a) && std::isnan(b)) || a == b; }

} // namespace

TEST(ReportJson, CarriesFormatVersionAndCaution) {
    const auto j = stepcert::study_to_json(overflowing_study());
    EXPECT_EQ(j.at("format"), "stepcert.order_study");
    EXPECT_EQ(j.at("format_version"), 1);
    EXPECT_NE(j.at("caution").get<std::string>().find("discretization error only"), std::string::npos);
    EXPECT_EQ(j.at("basis"), "exact_solution");
    EXPECT_EQ(j.at("verdict"), "order_fitted");
    EXPECT_EQ(j.at("levels").size(), 13u);
    // Non-finite values: NaN as null, infinity as "inf".
    EXPECT_TRUE(j.at("levels").at(0).at("local_order").is_null());
    bool has_inf = false;
    for (const auto& lv : j.at("levels")) has_inf = has_inf || lv.at("error_grid") == "inf";
    EXPECT_TRUE(has_inf);
}

TEST(ReportJson, RoundTripsExactly) {
    const auto r = overflowing_study();
    const std::string text = stepcert::study_to_json(r).dump(2);
    const auto back = stepcert::study_from_json(nlohmann::json::parse(text));
    EXPECT_EQ(stepcert::study_to_json(back).dump(2), text);
    EXPECT_EQ(back.problem, r.problem);
    EXPECT_EQ(back.method, r.method);
    EXPECT_EQ(back.declared_order, r.declared_order);
    EXPECT_EQ(back.basis, r.basis);
    EXPECT_EQ(back.verdict, r.verdict);
    EXPECT_EQ(back.range_first, r.range_first);
    EXPECT_EQ(back.range_last, r.range_last);
    EXPECT_EQ(back.fit.order, r.fit.order);
    EXPECT_EQ(back.fit.lower, r.fit.lower);
    EXPECT_EQ(back.fit.upper, r.fit.upper);
    ASSERT_EQ(back.levels.size(), r.levels.size());
    for (std::size_t k = 0; k < r.levels.size(); ++k) {
        const auto &a = r.levels[k], &b = back.levels[k];
        EXPECT_TRUE(same_number(a.h, b.h)) << k;
        EXPECT_TRUE(same_number(a.tolerance, b.tolerance)) << k;
        EXPECT_TRUE(same_number(a.error_final, b.error_final)) << k;
        EXPECT_TRUE(same_number(a.error_grid, b.error_grid)) << k;
        EXPECT_TRUE(same_number(a.local_order, b.local_order)) << k;
        EXPECT_TRUE(same_number(a.round_off_floor, b.round_off_floor)) << k;
        EXPECT_EQ(a.steps, b.steps);
        EXPECT_EQ(a.evaluations, b.evaluations);
        EXPECT_EQ(a.status, b.status);
        EXPECT_EQ(a.note, b.note);
    }
}

TEST(ReportJson, RejectsOtherDocuments) {
    EXPECT_THROW((void)stepcert::study_from_json(nlohmann::json::parse(R"({"levels": []})")), stepcert::invalid_input);
    auto j = stepcert::study_to_json(overflowing_study());
    j["format_version"] = 99;
    EXPECT_THROW((void)stepcert::study_from_json(j), stepcert::invalid_input);
    j = stepcert::study_to_json(overflowing_study());
    j["levels"][0]["status"] = "excellent";
    EXPECT_THROW((void)stepcert::study_from_json(j), stepcert::invalid_input);
    j = stepcert::study_to_json(overflowing_study());
    j.erase("fit");
    EXPECT_THROW((void)stepcert::study_from_json(j), stepcert::invalid_input);
}
