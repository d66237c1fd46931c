// JSON and CSV exports of error estimates and of the error ledger: our own format tags and
// version, the caution, exact round trips (NaN and infinities included), the documented layout,
// and rejection of malformed documents with invalid_input naming the field. The objects are real:
// RK4 (Kutta 1901; common practice, no source) on the 3x3 linear system of the problem catalogue.
// JSON has no NaN or infinity (RFC 8259, section 6; from memory), hence null and "inf"/"-inf".
// CSV quoting follows RFC 4180 (from memory): a field with a comma, quote or line break is quoted,
// its quotes doubled.
#include <algorithm>
#include <cmath>
#include <cstddef>
#include <functional>
#include <initializer_list>
#include <limits>
#include <set>
#include <sstream>
#include <string>
#include <vector>

#include <gtest/gtest.h>
#include <nlohmann/json.hpp>

#include "stepcert/estimate/effectivity.hpp"
#include "stepcert/estimate/richardson_global.hpp"
#include "stepcert/estimate/step_doubling.hpp"
#include "stepcert/estimate/true_global_error.hpp"
#include "stepcert/methods/classic_rk4.hpp"
#include "stepcert/problems/linear_system.hpp"
#include "stepcert/report/estimate_csv.hpp"
#include "stepcert/report/estimate_json.hpp"
#include "stepcert/report/ledger_csv.hpp"
#include "stepcert/report/ledger_json.hpp"
#include "stepcert/run/run.hpp"
#include "test_report_support.hpp"

namespace {

using report_test::lines_of;
using report_test::expect_rejected;
using nlohmann::json;

constexpr std::size_t n_steps = 16;
constexpr double not_a_number = std::numeric_limits<double>::quiet_NaN();
constexpr double infinite = std::numeric_limits<double>::infinity();

const auto& problem() {
    static const auto p = stepcert::problems::linear_system(4.0);
    return p;
}

const stepcert::local_error_profile& profile() {
    static const auto p = [] {
        stepcert::local_error_options o;
        o.keep_vectors = true;
        return stepcert::step_doubling_profile(problem(), stepcert::classic_rk4, n_steps, o);
    }();
    return p;
}

stepcert::global_error_options global_options() {
    stepcert::global_error_options o;
    o.grid_points = 4;
    o.keep_vectors = true;
    return o;
}

const stepcert::global_error_estimate& global_estimate() {
    static const auto g = stepcert::richardson_global_error(problem(), stepcert::classic_rk4, n_steps, global_options());
    return g;
}

const stepcert::error_ledger& ledger() {
    static const auto l =
        stepcert::build_error_ledger(problem(), stepcert::run_uniform(problem(), stepcert::classic_rk4, n_steps, 1), profile());
    return l;
}

bool same_number_or_nan(double a, double b) { return (std::isnan(a) && std::isnan(b)) || a == b; }

bool same_numbers(const std::vector<double>& a, const std::vector<double>& b) {
    return a.size() == b.size() && std::equal(a.begin(), a.end(), b.begin(), same_number_or_nan);
}

bool same_rows(const std::vector<std::vector<double>>& a, const std::vector<std::vector<double>>& b) {
    return a.size() == b.size() && std::equal(a.begin(), a.end(), b.begin(), same_numbers);
}

void expect_same(const stepcert::weighted_norm& a, const stepcert::weighted_norm& b) {
    EXPECT_EQ(a.atol, b.atol);
    EXPECT_EQ(a.rtol, b.rtol);
    EXPECT_EQ(a.kind, b.kind);
}

void expect_same(const stepcert::run_stats& a, const stepcert::run_stats& b) {
    EXPECT_EQ(a.steps, b.steps);
    EXPECT_EQ(a.rejected, b.rejected);
    EXPECT_EQ(a.evaluations, b.evaluations);
}

std::set<std::string> keys_of(const json& j) {
    std::set<std::string> out;
    for (const auto& [k, v] : j.items()) out.insert(k);
    return out;
}

/// The caution every export carries: discretization only, an estimate is no proof, defer to
/// verification-and-validation standards and licensed review.
void expect_caution(const std::string& text) {
    for (const char* part : {"discretization error only", "not a proof", "verification-and-validation", "licensed"})
        EXPECT_NE(text.find(part), std::string::npos) << "caution lacks '" << part << "': " << text;
}

void expect_document(const json& j, const char* format) {
    EXPECT_EQ(j.at("format"), format);
    EXPECT_EQ(j.at("format_version"), 1);
    expect_caution(j.at("caution").get<std::string>());
}

/// Field `k` (0-based) of a CSV line without quoted fields.
std::string csv_field(const std::string& line, std::size_t k) {
    std::istringstream row(line);
    std::string field;
    for (std::size_t i = 0; i <= k; ++i) std::getline(row, field, ',');
    return field;
}

/// A round trip through text, as a file would make it.
json through_text(const json& j) { return json::parse(j.dump(2)); }

} // namespace

// ---- local error profile ----------------------------------------------------------------------

TEST(ReportEstimates, LocalProfileDocumentLayout) {
    const auto& p = profile();
    ASSERT_EQ(p.steps.size(), n_steps);
    ASSERT_EQ(p.vectors.size(), n_steps);
    const json j = stepcert::to_json(p);
    expect_document(j, "stepcert.local_error_profile");
    EXPECT_EQ(keys_of(j), (std::set<std::string>{"format", "format_version", "caution", "problem", "method", "estimator", "order",
                                                 "power", "norm", "steps", "vectors", "cost"}));
    EXPECT_EQ(j.at("estimator"), "step doubling");
    EXPECT_EQ(j.at("order"), 4);
    EXPECT_EQ(j.at("power"), 5);
    EXPECT_EQ(keys_of(j.at("steps").at(0)), (std::set<std::string>{"t", "h", "estimate", "principal", "uncertainty"}));
    EXPECT_EQ(j.at("steps").size(), n_steps);
    EXPECT_EQ(j.at("vectors").size(), n_steps);
    EXPECT_EQ(j.at("vectors").at(0).size(), 3u);
    EXPECT_EQ(keys_of(j.at("norm")), (std::set<std::string>{"atol", "rtol", "kind"}));
    EXPECT_EQ(keys_of(j.at("cost")), (std::set<std::string>{"steps", "rejected", "evaluations"}));
}

TEST(ReportEstimates, LocalProfileRoundTripsExactly) {
    auto p = profile();
    p.steps[0].principal = not_a_number;
    p.steps[1].estimate = infinite;
    p.steps[2].uncertainty = -infinite;
    p.vectors[3][1] = not_a_number;
    p.vectors[4][2] = -infinite;
    const json j = stepcert::to_json(p);
    EXPECT_TRUE(j.at("steps").at(0).at("principal").is_null());
    EXPECT_EQ(j.at("steps").at(1).at("estimate"), "inf");
    EXPECT_EQ(j.at("steps").at(2).at("uncertainty"), "-inf");
    EXPECT_TRUE(j.at("vectors").at(3).at(1).is_null());
    EXPECT_EQ(j.at("vectors").at(4).at(2), "-inf");

    const std::string text = j.dump(2);
    const auto back = stepcert::local_error_profile_from_json(json::parse(text));
    EXPECT_EQ(stepcert::to_json(back).dump(2), text);
    EXPECT_EQ(back.problem, p.problem);
    EXPECT_EQ(back.method, p.method);
    EXPECT_EQ(back.estimator, p.estimator);
    EXPECT_EQ(back.order, p.order);
    EXPECT_EQ(back.power, p.power);
    expect_same(back.norm, p.norm);
    ASSERT_EQ(back.steps.size(), p.steps.size());
    for (std::size_t k = 0; k < p.steps.size(); ++k) {
        const auto &a = p.steps[k], &b = back.steps[k];
        EXPECT_TRUE(same_number_or_nan(a.t, b.t)) << k;
        EXPECT_TRUE(same_number_or_nan(a.h, b.h)) << k;
        EXPECT_TRUE(same_number_or_nan(a.estimate, b.estimate)) << k;
        EXPECT_TRUE(same_number_or_nan(a.principal, b.principal)) << k;
        EXPECT_TRUE(same_number_or_nan(a.uncertainty, b.uncertainty)) << k;
    }
    EXPECT_TRUE(same_rows(back.vectors, p.vectors));
    expect_same(back.cost, p.cost);
}

TEST(ReportEstimates, TextAndStreamReadersRoundTrip) {
    const std::string local = stepcert::to_json(profile()).dump(2);
    EXPECT_EQ(stepcert::to_json(stepcert::parse_local_error_profile_json(local)).dump(2), local);
    std::istringstream global(stepcert::to_json(global_estimate()).dump());
    EXPECT_EQ(stepcert::to_json(stepcert::read_global_error_estimate_json(global)), stepcert::to_json(global_estimate()));
    const std::string ledger_text = stepcert::to_json(ledger()).dump();
    EXPECT_EQ(stepcert::to_json(stepcert::parse_error_ledger_json(ledger_text)).dump(), ledger_text);
    std::istringstream ledger_stream(ledger_text);
    EXPECT_EQ(stepcert::read_error_ledger_json(ledger_stream).steps.size(), n_steps);
}

TEST(ReportEstimates, EveryEstimatorNameReadsBack) {
    // The list is derived from the enum's own switch; names must be distinct to read back.
    ASSERT_GE(stepcert::all_local_error_estimators.size(), 3u);
    std::set<std::string> names;
    for (auto e : stepcert::all_local_error_estimators) {
        names.insert(stepcert::estimator_name(e));
        auto p = profile();
        p.estimator = e;
        EXPECT_EQ(stepcert::local_error_profile_from_json(through_text(stepcert::to_json(p))).estimator, e) << stepcert::estimator_name(e);
    }
    EXPECT_EQ(names.size(), stepcert::all_local_error_estimators.size());
    EXPECT_EQ(stepcert::all_local_error_estimators[0], stepcert::local_error_estimator::step_doubling);
    EXPECT_EQ(stepcert::all_local_error_estimators[2], stepcert::local_error_estimator::reference_truth);
}

TEST(ReportEstimates, LocalProfileWithoutVectorsRoundTrips) {
    auto p = profile();
    p.vectors.clear();
    const auto back = stepcert::local_error_profile_from_json(through_text(stepcert::to_json(p)));
    EXPECT_TRUE(back.vectors.empty());
    EXPECT_EQ(back.steps.size(), n_steps);
}

// ---- global error estimate and effectivity ---------------------------------------------------

TEST(ReportEstimates, GlobalEstimateDocumentLayout) {
    const auto& g = global_estimate();
    ASSERT_EQ(g.times.size(), 4u);
    const json j = stepcert::to_json(g);
    expect_document(j, "stepcert.global_error_estimate");
    EXPECT_EQ(keys_of(j), (std::set<std::string>{"format", "format_version", "caution", "problem", "method", "steps",
                                                 "declared_order", "order_used", "order_observed", "observed_order",
                                                 "order_consistent", "round_off_limited", "norm", "times", "estimate", "vectors",
                                                 "cost"}));
    EXPECT_EQ(j.at("steps"), n_steps);
    EXPECT_TRUE(j.at("observed_order").is_null());  // not observed: NaN
    EXPECT_EQ(j.at("estimate").size(), 4u);
    EXPECT_EQ(j.at("vectors").size(), 4u);
}

TEST(ReportEstimates, GlobalEstimateRoundTripsExactly) {
    auto g = global_estimate();
    g.estimate[1] = infinite;
    g.vectors[2][0] = not_a_number;
    g.round_off_limited = true;
    g.order_consistent = false;
    const std::string text = stepcert::to_json(g).dump(2);
    const auto back = stepcert::global_error_estimate_from_json(json::parse(text));
    EXPECT_EQ(stepcert::to_json(back).dump(2), text);
    EXPECT_EQ(back.problem, g.problem);
    EXPECT_EQ(back.method, g.method);
    EXPECT_EQ(back.steps, g.steps);
    EXPECT_EQ(back.declared_order, g.declared_order);
    EXPECT_TRUE(same_number_or_nan(back.order_used, g.order_used));
    EXPECT_EQ(back.order_observed, g.order_observed);
    EXPECT_TRUE(same_number_or_nan(back.observed_order, g.observed_order));
    EXPECT_TRUE(std::isnan(back.observed_order));
    EXPECT_EQ(back.order_consistent, g.order_consistent);
    EXPECT_EQ(back.round_off_limited, g.round_off_limited);
    expect_same(back.norm, g.norm);
    EXPECT_TRUE(same_numbers(back.times, g.times));
    EXPECT_TRUE(same_numbers(back.estimate, g.estimate));
    EXPECT_TRUE(same_rows(back.vectors, g.vectors));
    expect_same(back.cost, g.cost);
}

TEST(ReportEstimates, EffectivitySummaryDocument) {
    const auto truth = stepcert::true_global_error(problem(), stepcert::classic_rk4, n_steps, global_options());
    auto s = stepcert::effectivity(global_estimate(), truth);
    ASSERT_EQ(s.per_step.size(), 4u);
    s.per_step[0] = not_a_number;  // as for a grid time whose true error is at the floor
    const json j = stepcert::to_json(s);
    expect_document(j, "stepcert.effectivity_summary");
    EXPECT_EQ(keys_of(j), (std::set<std::string>{"format", "format_version", "caution", "per_step", "counted", "smallest",
                                                 "median", "largest"}));
    EXPECT_TRUE(j.at("per_step").at(0).is_null());
    EXPECT_EQ(j.at("per_step").at(1).get<double>(), s.per_step[1]);
    EXPECT_EQ(j.at("counted"), s.counted);
    EXPECT_EQ(j.at("median").get<double>(), s.median);
    EXPECT_EQ(through_text(j).at("largest").get<double>(), s.largest);
}

// ---- error ledger, windows, schedule ---------------------------------------------------------

TEST(ReportEstimates, LedgerDocumentLayout) {
    const auto& l = ledger();
    ASSERT_EQ(l.steps.size(), n_steps);
    const json j = stepcert::to_json(l);
    expect_document(j, "stepcert.error_ledger");
    EXPECT_EQ(keys_of(j), (std::set<std::string>{"format", "format_version", "caution", "problem", "method", "local_source",
                                                 "jacobian_how", "order", "power", "norm", "steps", "contributions",
                                                 "final_error", "final_state", "final_size", "cost"}));
    EXPECT_EQ(keys_of(j.at("steps").at(0)),
              (std::set<std::string>{"t", "h", "fresh", "propagated", "global", "contribution", "share"}));
    EXPECT_EQ(j.at("contributions").size(), n_steps);
    EXPECT_EQ(j.at("final_state").size(), 3u);
    EXPECT_EQ(j.at("local_source"), "step doubling");
}

TEST(ReportEstimates, LedgerRoundTripsExactly) {
    auto l = ledger();
    l.steps[0].share = not_a_number;  // what the ledger writes when e_N is exactly 0
    l.steps[1].global = infinite;
    l.steps[2].contribution = -infinite;
    l.contributions[5][1] = not_a_number;
    l.final_size = infinite;
    const std::string text = stepcert::to_json(l).dump(2);
    const auto back = stepcert::error_ledger_from_json(json::parse(text));
    EXPECT_EQ(stepcert::to_json(back).dump(2), text);
    EXPECT_EQ(back.problem, l.problem);
    EXPECT_EQ(back.method, l.method);
    EXPECT_EQ(back.local_source, l.local_source);
    EXPECT_EQ(back.jacobian_how, l.jacobian_how);
    EXPECT_EQ(back.order, l.order);
    EXPECT_EQ(back.power, l.power);
    expect_same(back.norm, l.norm);
    ASSERT_EQ(back.steps.size(), l.steps.size());
    for (std::size_t k = 0; k < l.steps.size(); ++k) {
        const auto &a = l.steps[k], &b = back.steps[k];
        EXPECT_TRUE(same_number_or_nan(a.t, b.t)) << k;
        EXPECT_TRUE(same_number_or_nan(a.h, b.h)) << k;
        EXPECT_TRUE(same_number_or_nan(a.fresh, b.fresh)) << k;
        EXPECT_TRUE(same_number_or_nan(a.propagated, b.propagated)) << k;
        EXPECT_TRUE(same_number_or_nan(a.global, b.global)) << k;
        EXPECT_TRUE(same_number_or_nan(a.contribution, b.contribution)) << k;
        EXPECT_TRUE(same_number_or_nan(a.share, b.share)) << k;
    }
    EXPECT_TRUE(std::isnan(back.steps[0].share));
    EXPECT_TRUE(same_rows(back.contributions, l.contributions));
    EXPECT_TRUE(same_numbers(back.final_error, l.final_error));
    EXPECT_TRUE(same_numbers(back.final_state, l.final_state));
    EXPECT_TRUE(same_number_or_nan(back.final_size, l.final_size));
    expect_same(back.cost, l.cost);
    // What was read back is a working ledger: the windows come out the same.
    const auto wa = stepcert::ledger_windows(ledger(), 4);
    const auto wb = stepcert::ledger_windows(stepcert::error_ledger_from_json(through_text(stepcert::to_json(ledger()))), 4);
    ASSERT_EQ(wa.size(), wb.size());
    for (std::size_t w = 0; w < wa.size(); ++w) EXPECT_EQ(wa[w].contribution, wb[w].contribution) << w;
}

TEST(ReportEstimates, WindowsAndScheduleDocuments) {
    const auto windows = stepcert::ledger_windows(ledger(), 4);
    const json wj = through_text(stepcert::ledger_windows_to_json(windows));
    expect_document(wj, "stepcert.ledger_windows");
    ASSERT_EQ(wj.at("windows").size(), 4u);
    EXPECT_EQ(keys_of(wj.at("windows").at(0)),
              (std::set<std::string>{"t_begin", "t_end", "first_step", "step_count", "contribution", "share", "fresh"}));
    for (std::size_t w = 0; w < 4; ++w) {
        const auto& x = wj.at("windows").at(w);
        EXPECT_EQ(x.at("step_count"), windows[w].step_count) << w;
        EXPECT_EQ(x.at("contribution").get<double>(), windows[w].contribution) << w;
        EXPECT_EQ(x.at("share").get<double>(), windows[w].share) << w;
    }

    const auto schedule = stepcert::equidistributing_schedule(ledger());
    const json sj = through_text(stepcert::to_json(schedule));
    expect_document(sj, "stepcert.step_schedule");
    EXPECT_EQ(keys_of(sj), (std::set<std::string>{"format", "format_version", "caution", "times", "current_sum", "predicted_sum",
                                                  "smallest_step", "largest_step", "how"}));
    EXPECT_EQ(sj.at("times").size(), schedule.times.size());
    EXPECT_EQ(sj.at("times").back().get<double>(), schedule.times.back());
    EXPECT_EQ(sj.at("predicted_sum").get<double>(), schedule.predicted_sum);
    EXPECT_EQ(sj.at("how"), schedule.how);
}

// ---- malformed documents: one case each ------------------------------------------------------

TEST(ReportEstimatesRejects, AnotherFormat) {
    const json global = stepcert::to_json(global_estimate());
    expect_rejected([&] { (void)stepcert::local_error_profile_from_json(global); },
                    {"stepcert.local_error_profile", "stepcert.global_error_estimate"});
    expect_rejected([&] { (void)stepcert::error_ledger_from_json(stepcert::to_json(profile())); },
                    {"stepcert.error_ledger", "stepcert.local_error_profile"});
}

TEST(ReportEstimatesRejects, NoFormatOrNotAnObject) {
    expect_rejected([] { (void)stepcert::global_error_estimate_from_json(json::parse(R"({"times": []})")); }, {"no \"format\""});
    expect_rejected([] { (void)stepcert::error_ledger_from_json(json::parse("[1, 2]")); }, {"got a JSON array"});
}

TEST(ReportEstimatesRejects, TextThatIsNotJson) {
    std::string text = stepcert::to_json(ledger()).dump();
    text.resize(text.size() / 2);
    expect_rejected([&] { (void)stepcert::parse_error_ledger_json(text); }, {"error-ledger", "not valid JSON"});
    std::istringstream in("{\"format\": ");
    expect_rejected([&] { (void)stepcert::read_local_error_profile_json(in); }, {"local-error-profile", "not valid JSON"});
}

TEST(ReportEstimatesRejects, AnotherVersion) {
    json j = stepcert::to_json(profile());
    j["format_version"] = 2;
    expect_rejected([&] { (void)stepcert::local_error_profile_from_json(j); }, {"format_version 2"});
    j["format_version"] = 0;
    expect_rejected([&] { (void)stepcert::local_error_profile_from_json(j); }, {"format_version 0"});
}

TEST(ReportEstimatesRejects, MissingField) {
    json j = stepcert::to_json(ledger());
    j.erase("final_state");
    expect_rejected([&] { (void)stepcert::error_ledger_from_json(j); }, {"error-ledger", "'final_state'", "missing"});
    j = stepcert::to_json(profile());
    j["steps"][3].erase("principal");
    expect_rejected([&] { (void)stepcert::local_error_profile_from_json(j); }, {"local-error-profile", "in 'steps[3]'", "'principal'", "missing"});
}

TEST(ReportEstimatesRejects, StringWhereANumberBelongs) {
    json j = stepcert::to_json(profile());
    j["steps"][2]["h"] = "0.25 s";
    expect_rejected([&] { (void)stepcert::local_error_profile_from_json(j); }, {"in 'steps[2]'", "'h'", "'0.25 s'", "expected a number"});
}

TEST(ReportEstimatesRejects, StringWhereACountBelongs) {
    json j = stepcert::to_json(global_estimate());
    j["cost"]["evaluations"] = "many";
    expect_rejected([&] { (void)stepcert::global_error_estimate_from_json(j); }, {"in 'cost'", "'evaluations'", "string", "whole number"});
}

TEST(ReportEstimatesRejects, NegativeCount) {
    json j = stepcert::to_json(global_estimate());
    j["steps"] = -16;
    expect_rejected([&] { (void)stepcert::global_error_estimate_from_json(j); }, {"'steps'", ">= 0"});
}

TEST(ReportEstimatesRejects, StepThatIsNotAnObject) {
    json j = stepcert::to_json(ledger());
    j["steps"][0] = 3;
    expect_rejected([&] { (void)stepcert::error_ledger_from_json(j); }, {"in 'steps[0]'", "got a number"});
}

TEST(ReportEstimatesRejects, NormOfNoWidth) {
    json j = stepcert::to_json(profile());
    j["norm"]["atol"] = 0.0;
    j["norm"]["rtol"] = 0.0;
    expect_rejected([&] { (void)stepcert::local_error_profile_from_json(j); }, {"in 'norm'", "not both zero"});
}

TEST(ReportEstimatesRejects, UnknownEstimator) {
    json j = stepcert::to_json(profile());
    j["estimator"] = "guesswork";
    expect_rejected([&] { (void)stepcert::local_error_profile_from_json(j); }, {"'guesswork'", "'step doubling'"});
}

TEST(ReportEstimatesRejects, UnknownNormKind) {
    json j = stepcert::to_json(ledger());
    j["norm"]["kind"] = "euclidean";
    expect_rejected([&] { (void)stepcert::error_ledger_from_json(j); }, {"in 'norm'", "'kind'", "euclidean"});
}

TEST(ReportEstimatesRejects, ContributionOfTheWrongLength) {
    json j = stepcert::to_json(ledger());
    j["contributions"][3].push_back(0.0);
    expect_rejected([&] { (void)stepcert::error_ledger_from_json(j); }, {"contributions[3]", "4 components", "final_state 3"});
}

TEST(ReportEstimatesRejects, FinalErrorOfTheWrongLength) {
    json j = stepcert::to_json(ledger());
    j["final_error"].erase(0);
    expect_rejected([&] { (void)stepcert::error_ledger_from_json(j); }, {"final_error", "2 components", "final_state 3"});
}

TEST(ReportEstimatesRejects, ContributionsForAnotherNumberOfSteps) {
    json j = stepcert::to_json(ledger());
    j["contributions"].erase(0);
    expect_rejected([&] { (void)stepcert::error_ledger_from_json(j); }, {"15 vectors for 16 steps"});
}

TEST(ReportEstimatesRejects, LocalErrorVectorOfTheWrongLength) {
    json j = stepcert::to_json(profile());
    j["vectors"][5] = json::array({1.0, 2.0});
    expect_rejected([&] { (void)stepcert::local_error_profile_from_json(j); }, {"vectors[5]", "2 components"});
}

TEST(ReportEstimatesRejects, GlobalVectorsForAnotherNumberOfTimes) {
    json j = stepcert::to_json(global_estimate());
    j["vectors"].erase(0);
    expect_rejected([&] { (void)stepcert::global_error_estimate_from_json(j); }, {"3 vectors for 4 times"});
}

TEST(ReportEstimatesRejects, EstimatesForAnotherNumberOfTimes) {
    json j = stepcert::to_json(global_estimate());
    j["estimate"].push_back(1e-9);
    expect_rejected([&] { (void)stepcert::global_error_estimate_from_json(j); }, {"'estimate'", "5 values for 4 times"});
}

TEST(ReportEstimatesRejects, SharedNumberReaderNamesTheField) {
    // The reader json.hpp shares: a string or a boolean where a number belongs names the field.
    expect_rejected([] { (void)stepcert::detail::number_from_json(json::parse(R"({"ratio": "two"})"), "ratio"); },
                    {"'ratio'", "'two'"});
    expect_rejected([] { (void)stepcert::detail::number_from_json(json::parse(R"({"ratio": true})"), "ratio"); },
                    {"'ratio'", "boolean"});
}

// ---- CSV ---------------------------------------------------------------------------------------

TEST(ReportEstimatesCsv, LocalProfileCautionHeaderAndRows) {
    auto p = profile();
    p.steps[1].principal = not_a_number;
    p.steps[2].estimate = infinite;
    const auto lines = lines_of(stepcert::local_error_csv(p));
    ASSERT_EQ(lines.size(), n_steps + 2);
    ASSERT_EQ(lines[0].rfind("# caution:", 0), 0u) << lines[0];
    expect_caution(lines[0]);
    EXPECT_EQ(lines[1], "t,h,estimate,principal,uncertainty");
    for (std::size_t k = 2; k < lines.size(); ++k) EXPECT_EQ(std::count(lines[k].begin(), lines[k].end(), ','), 4) << lines[k];
    EXPECT_EQ(csv_field(lines[3], 3), "");      // NaN: empty field
    EXPECT_EQ(csv_field(lines[4], 2), "inf");
    // Round-trip precision.
    EXPECT_EQ(std::stod(csv_field(lines[2], 0)), p.steps[0].t);
    EXPECT_EQ(std::stod(csv_field(lines[2], 1)), p.steps[0].h);
    EXPECT_EQ(std::stod(csv_field(lines[7], 2)), p.steps[5].estimate);
    EXPECT_EQ(std::stod(csv_field(lines[7], 3)), p.steps[5].principal);
}

TEST(ReportEstimatesCsv, GlobalEstimateCautionHeaderAndRows) {
    const auto& g = global_estimate();
    const auto lines = lines_of(stepcert::global_error_csv(g));
    ASSERT_EQ(lines.size(), g.times.size() + 2);
    expect_caution(lines[0]);
    EXPECT_EQ(lines[1], "t,estimate");
    for (std::size_t k = 0; k < g.times.size(); ++k) {
        EXPECT_EQ(std::stod(csv_field(lines[k + 2], 0)), g.times[k]) << k;
        EXPECT_EQ(std::stod(csv_field(lines[k + 2], 1)), g.estimate[k]) << k;
    }
}

TEST(ReportEstimatesCsv, GlobalEstimateOfMismatchedLengthsIsRejected) {
    auto g = global_estimate();
    g.estimate.pop_back();
    std::ostringstream os;
    expect_rejected([&] { stepcert::write_global_error_csv(os, g); }, {"3 values for 4 grid times"});
}

TEST(ReportEstimatesCsv, LedgerStepsAndWindows) {
    auto l = ledger();
    l.steps[4].share = not_a_number;
    const auto lines = lines_of(stepcert::ledger_csv(l));
    ASSERT_EQ(lines.size(), n_steps + 2);
    expect_caution(lines[0]);
    EXPECT_EQ(lines[1], "t,h,fresh,propagated,global,contribution,share");
    for (std::size_t k = 2; k < lines.size(); ++k) EXPECT_EQ(std::count(lines[k].begin(), lines[k].end(), ','), 6) << lines[k];
    EXPECT_EQ(csv_field(lines[6], 6), "");  // NaN share of step 4: empty field
    EXPECT_EQ(std::stod(csv_field(lines[5], 5)), l.steps[3].contribution);
    EXPECT_EQ(std::stod(csv_field(lines[5], 6)), l.steps[3].share);

    const auto windows = stepcert::ledger_windows(ledger(), 4);
    const auto wl = lines_of(stepcert::ledger_windows_csv(windows));
    ASSERT_EQ(wl.size(), windows.size() + 2);
    expect_caution(wl[0]);
    EXPECT_EQ(wl[1], "t_begin,t_end,first_step,step_count,contribution,share,fresh");
    for (std::size_t w = 0; w < windows.size(); ++w) {
        EXPECT_EQ(csv_field(wl[w + 2], 3), std::to_string(windows[w].step_count)) << w;
        EXPECT_EQ(std::stod(csv_field(wl[w + 2], 4)), windows[w].contribution) << w;
    }
}

TEST(ReportEstimatesCsv, SharedTextQuoting) {
    // The quoting helper shared with the study CSV (RFC 4180 style).
    EXPECT_EQ(stepcert::detail::csv_text("plain"), "plain");
    EXPECT_EQ(stepcert::detail::csv_text("a, b"), "\"a, b\"");
    EXPECT_EQ(stepcert::detail::csv_text("say \"hi\""), "\"say \"\"hi\"\"\"");
    EXPECT_EQ(stepcert::detail::csv_text("two\nlines"), "\"two\nlines\"");
    EXPECT_EQ(stepcert::detail::csv_number(not_a_number), "");
    EXPECT_EQ(stepcert::detail::csv_number(-infinite), "-inf");
    EXPECT_EQ(stepcert::detail::csv_number(0.1), "0.10000000000000001");  // %.17g of the double nearest 0.1
}
