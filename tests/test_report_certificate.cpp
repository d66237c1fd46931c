// Exports of a step certificate: the JSON document (our own format tag and version, exact round
// trips of every field, rejection of malformed documents with invalid_input naming the field) and
// the readable text form (level, step, refusal, cautions). The certificates are an invented
// scenario of our own (a cooling fin with four nodes), written by hand: only the exports are tested.
// JSON has no NaN or infinity (RFC 8259, section 6; from memory), hence null and "inf"/"-inf".
// printf's %e writes at least two exponent digits (ISO C, 7.21.6.1; from memory): 1.25e-3 is
// "1.250e-03" at three decimals.
#include <bit>
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <functional>
#include <initializer_list>
#include <limits>
#include <set>
#include <sstream>
#include <string>
#include <vector>

#include <gtest/gtest.h>
#include <nlohmann/json.hpp>

#include "stepcert/certify/certificate.hpp"
#include "stepcert/report/certificate_caution.hpp"
#include "stepcert/report/certificate_json.hpp"
#include "stepcert/report/certificate_text.hpp"
#include "test_report_support.hpp"

namespace test_report_certificate {

using nlohmann::json;
using report_test::expect_rejected;
using stepcert::step_certificate;

constexpr double not_a_number = std::numeric_limits<double>::quiet_NaN();
constexpr double infinite = std::numeric_limits<double>::infinity();

/// A reference-verified step for the invented cooling fin.
step_certificate certified() {
    step_certificate c;
    c.problem = "cooling fin, 4 nodes";
    c.dimension = 4;
    c.method = "classic RK4";
    c.declared_order = 4;
    c.observed_order = 3.9871234567891234;
    c.t0 = 0.0;
    c.t1 = 2.5;
    c.tolerance.atol = 1e-6;
    c.tolerance.rtol = 1e-4;
    c.tolerance.kind = stepcert::norm_kind::rms;
    c.measured_at = stepcert::error_measured_at::every_output_time;
    c.output_times = 11;
    c.breakpoints = {0.8125, 1.0 / 3.0 + 1.0};
    c.level = stepcert::evidence_level::reference_verified;
    c.reason = stepcert::refusal::none;
    c.steps = 2000;
    c.step = 2.5 / 2000.0;
    c.estimated_error = 0.31724918273645;
    c.safety_factor = 3.0;
    c.evidence = stepcert::order_evidence::above_declared;
    c.limited_by = stepcert::step_limited_by::stability;
    c.error_band = 3.0 * 0.31724918273645;
    c.basis = "Richardson, runs with N and 2N steps";
    c.reference_error = 0.28413370001;
    c.reference_digits = 31.7;
    c.stability.checked = true;
    c.stability.stable = true;
    c.stability.margin = 2.2128;
    c.stability.step_limit = 2.766e-3;
    c.stability.worst_mode = "lambda = -1006.3 (h lambda = -1.258)";
    c.evaluations = 48000;
    c.reference_evaluations = 912345;
    return c;
}

/// A refusal: the observed order never settled.
step_certificate refused() {
    step_certificate c;
    c.problem = "cooling fin, 4 nodes";
    c.dimension = 4;
    c.method = "explicit midpoint";
    c.declared_order = 2;
    c.t1 = 2.5;
    c.measured_at = stepcert::error_measured_at::final_time;
    c.output_times = 1;
    c.level = stepcert::evidence_level::not_certified;
    c.reason = stepcert::refusal::outside_asymptotic_range;
    c.reason_detail = "observed orders 0.7, 1.1, 1.4 never came near 2; start the ladder from a smaller step";
    c.evaluations = 123456;
    return c;
}

std::uint64_t bits(double x) { return std::bit_cast<std::uint64_t>(x); }

/// Every field equal; doubles bit for bit (NaN read back as the quiet NaN the struct starts with).
void expect_same(const step_certificate& a, const step_certificate& b) {
    EXPECT_EQ(a.problem, b.problem);
    EXPECT_EQ(a.dimension, b.dimension);
    EXPECT_EQ(a.method, b.method);
    EXPECT_EQ(a.declared_order, b.declared_order);
    EXPECT_EQ(bits(a.observed_order), bits(b.observed_order));
    EXPECT_EQ(bits(a.t0), bits(b.t0));
    EXPECT_EQ(bits(a.t1), bits(b.t1));
    EXPECT_EQ(bits(a.tolerance.atol), bits(b.tolerance.atol));
    EXPECT_EQ(bits(a.tolerance.rtol), bits(b.tolerance.rtol));
    EXPECT_EQ(a.tolerance.kind, b.tolerance.kind);
    EXPECT_EQ(a.measured_at, b.measured_at);
    EXPECT_EQ(a.output_times, b.output_times);
    ASSERT_EQ(a.breakpoints.size(), b.breakpoints.size());
    for (std::size_t i = 0; i < a.breakpoints.size(); ++i) EXPECT_EQ(bits(a.breakpoints[i]), bits(b.breakpoints[i])) << i;
    EXPECT_EQ(a.level, b.level);
    EXPECT_EQ(a.evidence, b.evidence);
    EXPECT_EQ(a.limited_by, b.limited_by);
    EXPECT_EQ(a.reason, b.reason);
    EXPECT_EQ(a.reason_detail, b.reason_detail);
    EXPECT_EQ(a.steps, b.steps);
    EXPECT_EQ(bits(a.step), bits(b.step));
    EXPECT_EQ(bits(a.controller_atol), bits(b.controller_atol));
    EXPECT_EQ(bits(a.controller_rtol), bits(b.controller_rtol));
    EXPECT_EQ(bits(a.estimated_error), bits(b.estimated_error));
    EXPECT_EQ(bits(a.safety_factor), bits(b.safety_factor));
    EXPECT_EQ(bits(a.error_band), bits(b.error_band));
    EXPECT_EQ(a.basis, b.basis);
    EXPECT_EQ(bits(a.bound), bits(b.bound));
    EXPECT_EQ(bits(a.reference_error), bits(b.reference_error));
    EXPECT_EQ(bits(a.reference_digits), bits(b.reference_digits));
    EXPECT_EQ(a.stability.checked, b.stability.checked);
    EXPECT_EQ(a.stability.stable, b.stability.stable);
    EXPECT_EQ(bits(a.stability.margin), bits(b.stability.margin));
    EXPECT_EQ(bits(a.stability.step_limit), bits(b.stability.step_limit));
    EXPECT_EQ(a.stability.worst_mode, b.stability.worst_mode);
    EXPECT_EQ(a.evaluations, b.evaluations);
    EXPECT_EQ(a.reference_evaluations, b.reference_evaluations);
    EXPECT_EQ(a.library, b.library);
}

/// Written, dumped to text, parsed and read back, as through a file.
step_certificate through_text(const step_certificate& c) {
    return stepcert::parse_step_certificate_json(stepcert::to_json(c).dump(2));
}

std::set<std::string> keys_of(const json& j) {
    std::set<std::string> out;
    for (const auto& [k, v] : j.items()) out.insert(k);
    return out;
}

void expect_rejected(const json& j, std::initializer_list<const char*> parts) {
    expect_rejected([&] { (void)stepcert::step_certificate_from_json(j); }, parts);
}

/// The caution sentences, in the text form and the JSON "caution" alike.
void expect_cautions(const std::string& text) {
    for (const char* part : {"discretization error of this model with these inputs only", "modelling error", "error in the data",
                             "round-off", "\"estimated\"", "not a proof", "\"reference-verified\"",
                             "holds at the output times that were checked", "safety-relevant", "verification-and-validation standard",
                             "licensed engineer"})
        EXPECT_NE(text.find(part), std::string::npos) << "caution lacks '" << part << "': " << text;
}

bool contains(const std::string& text, const std::string& part) { return text.find(part) != std::string::npos; }

} // namespace test_report_certificate

// ---- JSON ------------------------------------------------------------------------------------

TEST(ReportCertificateJson, DocumentLayout) {
    using namespace test_report_certificate;
    const json j = stepcert::to_json(certified());
    EXPECT_EQ(j.at("format"), "stepcert.step_certificate");
    EXPECT_EQ(j.at("format_version"), 2);
    expect_cautions(j.at("caution").get<std::string>());
    // The fields documented in docs/certificate-format.md, no more and no fewer.
    EXPECT_EQ(keys_of(j), (std::set<std::string>{"format", "format_version", "caution", "problem", "dimension", "method",
                                                 "declared_order", "observed_order", "t0", "t1", "tolerance", "measured_at",
                                                 "output_times", "breakpoints", "level", "reason", "reason_detail", "steps", "step",
                                                 "controller_atol", "controller_rtol", "evidence", "limited_by",
                                                 "estimated_error", "safety_factor", "error_band", "basis", "bound",
                                                 "reference_error", "reference_digits", "stability", "evaluations",
                                                 "reference_evaluations", "library"}));
    EXPECT_EQ(keys_of(j.at("tolerance")), (std::set<std::string>{"atol", "rtol", "kind"}));
    EXPECT_EQ(keys_of(j.at("stability")), (std::set<std::string>{"checked", "stable", "margin", "step_limit", "worst_mode"}));
    EXPECT_EQ(j.at("level"), "reference-verified");
    EXPECT_EQ(j.at("reason"), "none");
    EXPECT_EQ(j.at("measured_at"), "every output time");
    EXPECT_EQ(j.at("tolerance").at("kind"), "rms");
    EXPECT_EQ(j.at("steps"), 2000);
    EXPECT_EQ(j.at("evidence"), "observed order above the declared");
    EXPECT_EQ(j.at("limited_by"), "stability");
    ASSERT_TRUE(j.at("breakpoints").is_array());
    EXPECT_EQ(j.at("breakpoints").size(), 2u);
    EXPECT_TRUE(j.at("bound").is_null());  // no bound given: NaN
    EXPECT_EQ(j.at("library"), "0.1.0");
}

TEST(ReportCertificateJson, CertifiedRoundTripsExactly) {
    using namespace test_report_certificate;
    const auto c = certified();
    expect_same(through_text(c), c);
    // Text written again from what was read is the same text.
    EXPECT_EQ(stepcert::to_json(through_text(c)).dump(2), stepcert::to_json(c).dump(2));

    // Signed zero, infinities and NaN in places where a run could leave them.
    auto odd = c;
    odd.t0 = -0.0;
    odd.bound = infinite;
    odd.stability.margin = -infinite;
    odd.observed_order = not_a_number;
    const json j = stepcert::to_json(odd);
    EXPECT_EQ(j.at("bound"), "inf");
    EXPECT_EQ(j.at("stability").at("margin"), "-inf");
    EXPECT_TRUE(j.at("observed_order").is_null());
    const auto back = through_text(odd);
    expect_same(back, odd);
    EXPECT_TRUE(std::signbit(back.t0));
    EXPECT_TRUE(std::isnan(back.observed_order));
}

TEST(ReportCertificateJson, RefusalRoundTripsExactly) {
    using namespace test_report_certificate;
    const auto c = refused();
    const json j = stepcert::to_json(c);
    EXPECT_EQ(j.at("level"), "not certified");
    EXPECT_EQ(j.at("reason"), "outside the asymptotic range");
    EXPECT_EQ(j.at("measured_at"), "final time");
    for (const char* nan_field : {"observed_order", "step", "estimated_error", "safety_factor", "error_band", "bound", "reference_error",
                                  "reference_digits"})
        EXPECT_TRUE(j.at(nan_field).is_null()) << nan_field;
    const auto back = through_text(c);
    expect_same(back, c);
    EXPECT_FALSE(back.issued());
    EXPECT_TRUE(std::isnan(back.step));
    EXPECT_TRUE(std::isnan(back.stability.margin));
    // A default-constructed certificate round-trips as well.
    expect_same(through_text(step_certificate{}), step_certificate{});
}

TEST(ReportCertificateJson, EveryEnumValueReadsBack) {
    using namespace test_report_certificate;
    using stepcert::error_measured_at;
    using stepcert::evidence_level;
    using stepcert::refusal;
    const std::vector<evidence_level> levels = {evidence_level::reference_verified, evidence_level::estimated, evidence_level::bounded,
                                                evidence_level::not_certified};
    const std::vector<refusal> reasons = {refusal::none,       refusal::outside_asymptotic_range, refusal::unstable,
                                          refusal::below_round_off_floor, refusal::non_finite, refusal::budget_exhausted,
                                          refusal::reference_unavailable, refusal::tolerance_not_met, refusal::unbounded_growth,
                                          refusal::non_smooth, refusal::order_below_declared, refusal::order_not_settled,
                                          refusal::relative_tolerance_at_zero};
    const std::vector<stepcert::order_evidence> cases = {stepcert::order_evidence::none, stepcert::order_evidence::declared_confirmed,
                                                         stepcert::order_evidence::above_declared,
                                                         stepcert::order_evidence::round_off_plateau};
    const std::vector<stepcert::step_limited_by> limits = {stepcert::step_limited_by::none, stepcert::step_limited_by::accuracy,
                                                           stepcert::step_limited_by::stability};
    // The lists above are complete: the reader's switch knows no value past them.
    EXPECT_FALSE(stepcert::detail::is_certificate_enum(static_cast<evidence_level>(levels.size())));
    EXPECT_FALSE(stepcert::detail::is_certificate_enum(static_cast<refusal>(reasons.size())));
    EXPECT_FALSE(stepcert::detail::is_certificate_enum(static_cast<error_measured_at>(2)));
    EXPECT_FALSE(stepcert::detail::is_certificate_enum(static_cast<stepcert::order_evidence>(cases.size())));
    EXPECT_FALSE(stepcert::detail::is_certificate_enum(static_cast<stepcert::step_limited_by>(limits.size())));
    std::set<std::string> level_texts, reason_texts;
    auto c = certified();
    for (auto l : levels) {
        c.level = l;
        level_texts.insert(std::string(to_string(l)));
        EXPECT_EQ(through_text(c).level, l) << to_string(l);
    }
    for (auto r : reasons) {
        c.reason = r;
        reason_texts.insert(std::string(to_string(r)));
        EXPECT_EQ(through_text(c).reason, r) << to_string(r);
    }
    for (auto m : {error_measured_at::every_output_time, error_measured_at::final_time}) {
        c.measured_at = m;
        EXPECT_EQ(through_text(c).measured_at, m) << to_string(m);
    }
    std::set<std::string> case_texts, limit_texts;
    for (auto e : cases) {
        c.evidence = e;
        case_texts.insert(std::string(to_string(e)));
        EXPECT_EQ(through_text(c).evidence, e) << to_string(e);
    }
    for (auto l : limits) {
        c.limited_by = l;
        limit_texts.insert(std::string(to_string(l)));
        EXPECT_EQ(through_text(c).limited_by, l) << to_string(l);
    }
    EXPECT_EQ(level_texts.size(), levels.size());
    EXPECT_EQ(reason_texts.size(), reasons.size());
    EXPECT_EQ(case_texts.size(), cases.size());
    EXPECT_EQ(limit_texts.size(), limits.size());
}

TEST(ReportCertificateJson, StreamReaderRoundTrips) {
    using namespace test_report_certificate;
    std::istringstream in(stepcert::to_json(refused()).dump());
    expect_same(stepcert::read_step_certificate_json(in), refused());
}

TEST(ReportCertificateJson, RejectsAnotherFormatTag) {
    using namespace test_report_certificate;
    json j = stepcert::to_json(certified());
    j["format"] = "stepcert.order_study";
    expect_rejected(j, {"format", "stepcert.step_certificate", "stepcert.order_study"});
    j.erase("format");
    expect_rejected(j, {"format"});
}

TEST(ReportCertificateJson, RejectsVersionThreeAndZero) {
    using namespace test_report_certificate;
    json j = stepcert::to_json(certified());
    j["format_version"] = 3;
    expect_rejected(j, {"format_version", "3", "1 to 2"});
    j["format_version"] = 0;
    expect_rejected(j, {"format_version", "0"});
}

// A version 1 document (before breakpoints, evidence and limited_by) still reads, with those at
// their defaults; a version 2 document without them is refused, naming the field.
TEST(ReportCertificateJson, ReadsVersionOneWithDefaults) {
    using namespace test_report_certificate;
    json j = stepcert::to_json(certified());
    j["format_version"] = 1;
    j.erase("breakpoints");
    j.erase("evidence");
    j.erase("limited_by");
    const auto c = stepcert::step_certificate_from_json(j);
    EXPECT_TRUE(c.breakpoints.empty());
    EXPECT_EQ(c.evidence, stepcert::order_evidence::none);
    EXPECT_EQ(c.limited_by, stepcert::step_limited_by::none);
    EXPECT_EQ(c.steps, 2000u);
    json v2 = stepcert::to_json(certified());
    v2.erase("evidence");
    expect_rejected(v2, {"'evidence'", "missing"});
    json bad = stepcert::to_json(certified());
    bad["breakpoints"] = json::array({0.5, "later"});
    expect_rejected(bad, {"breakpoints"});
}

TEST(ReportCertificateJson, RejectsMissingField) {
    using namespace test_report_certificate;
    json j = stepcert::to_json(certified());
    j.erase("steps");
    expect_rejected(j, {"'steps'", "missing", "to_json"});
    json nested = stepcert::to_json(certified());
    nested["stability"].erase("margin");
    expect_rejected(nested, {"'stability'", "'margin'", "missing"});
}

TEST(ReportCertificateJson, RejectsStringWhereNumberExpected) {
    using namespace test_report_certificate;
    json j = stepcert::to_json(certified());
    j["step"] = "small";
    expect_rejected(j, {"'step'", "small", "expected a number"});
    json count = stepcert::to_json(certified());
    count["evaluations"] = "48000";
    expect_rejected(count, {"'evaluations'", "whole number"});
    json negative = stepcert::to_json(certified());
    negative["steps"] = -3;
    expect_rejected(negative, {"'steps'", "whole number >= 0"});
}

TEST(ReportCertificateJson, RejectsUnknownLevelText) {
    using namespace test_report_certificate;
    json j = stepcert::to_json(certified());
    j["level"] = "certain";
    expect_rejected(j, {"'level'", "certain", "\"reference-verified\"", "\"not certified\""});
    json reason = stepcert::to_json(refused());
    reason["reason"] = 3;
    expect_rejected(reason, {"'reason'", "a string"});
    json kind = stepcert::to_json(certified());
    kind["tolerance"]["kind"] = "euclidean";
    expect_rejected(kind, {"'tolerance'", "'kind'", "euclidean"});
}

TEST(ReportCertificateJson, RejectsTextThatIsNotJson) {
    using namespace test_report_certificate;
    expect_rejected([] { (void)stepcert::parse_step_certificate_json("{\"format\": \"stepcert.step_certificate\", "); },
                    {"step-certificate", "not valid JSON"});
    expect_rejected(json::array(), {"format", "array"});
}

// ---- text ------------------------------------------------------------------------------------

TEST(ReportCertificateText, CertifiedStep) {
    using namespace test_report_certificate;
    const std::string text = stepcert::certificate_text(certified());
    const auto lines = report_test::lines_of(text);
    ASSERT_FALSE(lines.empty());
    EXPECT_EQ(lines.front(), "stepcert step certificate: step certified (reference-verified)");
    for (const char* part : {"cooling fin, 4 nodes, dimension 4", "classic RK4, declared order 4, observed order 3.99", "[0, 2.5]",
                             "atol 1e-06, rtol 0.0001, rms norm", "every output time (11 evenly spaced output times)",
                             "reference-verified - a run at the certified step", "h = 1.250e-03 (2000 steps)",
                             "3.172e-01 (basis: Richardson, runs with N and 2N steps)", "9.517e-01", "bound:",
                             "none given", "2.841e-01; the reference vouches for 31.7 digits",
                             "stable, margin 2.21 (step limit / h), step limit 2.766e-03, worst mode lambda = -1006.3",
                             "48000 in double-precision runs, 912345 for the reference", "stepcert 0.1.0"})
        EXPECT_TRUE(contains(text, part)) << "'" << part << "' not in:\n" << text;
    EXPECT_FALSE(contains(text, "reason:")) << text;
    expect_cautions(text);
    for (auto caution : stepcert::certificate_cautions) EXPECT_TRUE(contains(text, "- " + std::string(caution))) << caution;
}

TEST(ReportCertificateText, RefusalGivesReasonAndDetail) {
    using namespace test_report_certificate;
    const std::string text = stepcert::certificate_text(refused());
    EXPECT_EQ(report_test::lines_of(text).front(), "stepcert step certificate: no step certified");
    for (const char* part : {"certified step:", "no step certified", "not certified - ",
                             "reason:", "outside the asymptotic range - observed orders 0.7, 1.1, 1.4 never came near 2",
                             "observed order not measured", "the final time only (1 output time)", "estimated error:",
                             "not estimated", "no reference used", "not checked", "123456 in double-precision runs"})
        EXPECT_TRUE(contains(text, part)) << "'" << part << "' not in:\n" << text;
    EXPECT_FALSE(contains(text, "h = ")) << text;
    expect_cautions(text);
}

TEST(ReportCertificateText, LabelsAreAligned) {
    using namespace test_report_certificate;
    for (const auto& c : {certified(), refused()}) {
        const auto lines = report_test::lines_of(stepcert::certificate_text(c));
        std::size_t column = 0, rows = 0;
        for (std::size_t k = 1; k < lines.size() && lines[k] != "cautions:"; ++k, ++rows) {
            const auto colon = lines[k].find(':');
            ASSERT_NE(colon, std::string::npos) << lines[k];
            const auto value = lines[k].find_first_not_of(' ', colon + 1);
            if (column == 0) column = value;
            EXPECT_EQ(value, column) << lines[k];
        }
        EXPECT_GE(rows, 15u);
        EXPECT_EQ(lines.back().rfind("- For safety-relevant use", 0), 0u) << lines.back();
    }
}
