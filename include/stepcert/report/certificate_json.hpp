#pragma once
// JSON export and import of a step certificate (optional: needs nlohmann_json). The document
// ("format": "stepcert.step_certificate", "format_version": 2, "caution") holds every field of
// step_certificate under the field's own name, the tolerance and the stability record as nested
// objects, the enums as their to_string text; layout in docs/certificate-format.md. NaN is null,
// +/-infinity "inf"/"-inf" (report/detail/json_numbers.hpp), so every double reads back exactly.
// The readers throw only invalid_input, naming the field.
#include <istream>
#include <string>
#include <string_view>

#include <nlohmann/json.hpp>

#include "stepcert/certify/certificate.hpp"
#include "stepcert/core/error.hpp"
#include "stepcert/core/norm.hpp"
#include "stepcert/report/certificate_caution.hpp"
#include "stepcert/report/detail/json_fields.hpp"
#include "stepcert/report/detail/json_numbers.hpp"

namespace stepcert {

inline constexpr const char* certificate_json_format = "stepcert.step_certificate";
inline constexpr int certificate_json_version = 2;
/// Version 1 documents (before evidence, limited_by and breakpoints) are still read: those
/// fields take "none", "none" and no breakpoints.
inline constexpr int certificate_json_oldest_version = 1;

namespace detail {

// True for every value of the enum. No default label: -Wswitch (an error in the project's builds)
// flags a value added later and missing here, so the reader below never misses one.
constexpr bool is_certificate_enum(evidence_level l) {
    switch (l) {
    case evidence_level::reference_verified:
    case evidence_level::estimated:
    case evidence_level::bounded:
    case evidence_level::not_certified: return true;
    }
    return false;
}

constexpr bool is_certificate_enum(refusal r) {
    switch (r) {
    case refusal::none:
    case refusal::outside_asymptotic_range:
    case refusal::unstable:
    case refusal::below_round_off_floor:
    case refusal::non_finite:
    case refusal::budget_exhausted:
    case refusal::reference_unavailable:
    case refusal::tolerance_not_met:
    case refusal::unbounded_growth:
    case refusal::non_smooth:
    case refusal::order_below_declared:
    case refusal::order_not_settled:
    case refusal::relative_tolerance_at_zero: return true;
    }
    return false;
}

constexpr bool is_certificate_enum(order_evidence e) {
    switch (e) {
    case order_evidence::none:
    case order_evidence::declared_confirmed:
    case order_evidence::above_declared:
    case order_evidence::round_off_plateau: return true;
    }
    return false;
}

constexpr bool is_certificate_enum(step_limited_by l) {
    switch (l) {
    case step_limited_by::none:
    case step_limited_by::accuracy:
    case step_limited_by::stability: return true;
    }
    return false;
}

constexpr bool is_certificate_enum(error_measured_at m) {
    switch (m) {
    case error_measured_at::every_output_time:
    case error_measured_at::final_time: return true;
    }
    return false;
}

/// The enum value whose to_string is the field's text. The enums have no explicit values, so they
/// are 0, 1, 2, ...: the loop ends at the first value the switch does not know.
template <class Enum>
Enum certificate_enum_from_json(const nlohmann::json& j, const char* key) {
    const std::string text = string_from_json(j, key);
    std::string known;
    for (int k = 0; is_certificate_enum(static_cast<Enum>(k)); ++k) {
        const auto e = static_cast<Enum>(k);
        if (text == to_string(e)) return e;
        if (!known.empty()) known += ", ";
        known += '"';
        known += to_string(e);
        known += '"';
    }
    std::string message = "stepcert: JSON field '";
    message += key;
    message += "' holds the unknown value \"";
    message += text;
    message += "\"; expected one of ";
    message += known;
    message += '.';
    throw invalid_input(message);
}

inline nlohmann::json stability_to_json(const stability_record& s) {
    return {{"checked", s.checked},
            {"stable", s.stable},
            {"margin", json_number(s.margin)},
            {"step_limit", json_number(s.step_limit)},
            {"worst_mode", s.worst_mode}};
}

inline stability_record stability_from_json(const nlohmann::json& j) {
    const auto& sj = typed_field(j, "stability", nlohmann::json::value_t::object,
                                 "an object with checked, stable, margin, step_limit and worst_mode");
    return json_within("stability", [&] {
        stability_record s;
        s.checked = bool_from_json(sj, "checked");
        s.stable = bool_from_json(sj, "stable");
        s.margin = number_from_json(sj, "margin");
        s.step_limit = number_from_json(sj, "step_limit");
        s.worst_mode = string_from_json(sj, "worst_mode");
        return s;
    });
}

} // namespace detail

/// The certificate as a JSON document (every field; see docs/certificate-format.md).
inline nlohmann::json to_json(const step_certificate& c) {
    using detail::json_number;
    nlohmann::json j;
    j["format"] = certificate_json_format;
    j["format_version"] = certificate_json_version;
    j["caution"] = certificate_caution();
    j["problem"] = c.problem;
    j["dimension"] = c.dimension;
    j["method"] = c.method;
    j["declared_order"] = c.declared_order;
    j["observed_order"] = json_number(c.observed_order);
    j["t0"] = json_number(c.t0);
    j["t1"] = json_number(c.t1);
    j["tolerance"] = detail::norm_to_json(c.tolerance);
    j["measured_at"] = std::string(to_string(c.measured_at));
    j["output_times"] = c.output_times;
    j["breakpoints"] = nlohmann::json::array();
    for (double b : c.breakpoints) j["breakpoints"].push_back(json_number(b));
    j["level"] = std::string(to_string(c.level));
    j["reason"] = std::string(to_string(c.reason));
    j["reason_detail"] = c.reason_detail;
    j["steps"] = c.steps;
    j["step"] = json_number(c.step);
    j["controller_atol"] = json_number(c.controller_atol);
    j["controller_rtol"] = json_number(c.controller_rtol);
    j["evidence"] = std::string(to_string(c.evidence));
    j["limited_by"] = std::string(to_string(c.limited_by));
    j["estimated_error"] = json_number(c.estimated_error);
    j["safety_factor"] = json_number(c.safety_factor);
    j["error_band"] = json_number(c.error_band);
    j["basis"] = c.basis;
    j["bound"] = json_number(c.bound);
    j["reference_error"] = json_number(c.reference_error);
    j["reference_digits"] = json_number(c.reference_digits);
    j["stability"] = detail::stability_to_json(c.stability);
    j["evaluations"] = c.evaluations;
    j["reference_evaluations"] = c.reference_evaluations;
    j["library"] = c.library;
    return j;
}

/// Reads a certificate written by to_json; invalid_input on another format or version, or a
/// missing or mistyped field (the message names it). "caution" is not read: it is fixed text.
inline step_certificate step_certificate_from_json(const nlohmann::json& j) {
    const int version = detail::check_json_document(j, certificate_json_format, certificate_json_oldest_version,
                                                    certificate_json_version, "stepcert::to_json(step_certificate)");
    return detail::read_json_document("step-certificate", [&] {
        using detail::count_from_json;
        using detail::number_from_json;
        using detail::string_from_json;
        step_certificate c;
        c.problem = string_from_json(j, "problem");
        c.dimension = count_from_json(j, "dimension");
        c.method = string_from_json(j, "method");
        c.declared_order = detail::int_from_json(j, "declared_order");
        c.observed_order = number_from_json(j, "observed_order");
        c.t0 = number_from_json(j, "t0");
        c.t1 = number_from_json(j, "t1");
        c.tolerance = detail::norm_from_json(j, "tolerance");
        c.measured_at = detail::certificate_enum_from_json<error_measured_at>(j, "measured_at");
        c.output_times = count_from_json(j, "output_times");
        if (version >= 2) c.breakpoints = detail::numbers_from_json(j, "breakpoints");
        c.level = detail::certificate_enum_from_json<evidence_level>(j, "level");
        c.reason = detail::certificate_enum_from_json<refusal>(j, "reason");
        c.reason_detail = string_from_json(j, "reason_detail");
        c.steps = count_from_json(j, "steps");
        c.step = number_from_json(j, "step");
        c.controller_atol = number_from_json(j, "controller_atol");
        c.controller_rtol = number_from_json(j, "controller_rtol");
        if (version >= 2) {
            c.evidence = detail::certificate_enum_from_json<order_evidence>(j, "evidence");
            c.limited_by = detail::certificate_enum_from_json<step_limited_by>(j, "limited_by");
        }
        c.estimated_error = number_from_json(j, "estimated_error");
        c.safety_factor = number_from_json(j, "safety_factor");
        c.error_band = number_from_json(j, "error_band");
        c.basis = string_from_json(j, "basis");
        c.bound = number_from_json(j, "bound");
        c.reference_error = number_from_json(j, "reference_error");
        c.reference_digits = number_from_json(j, "reference_digits");
        c.stability = detail::stability_from_json(j);
        c.evaluations = count_from_json(j, "evaluations");
        c.reference_evaluations = count_from_json(j, "reference_evaluations");
        c.library = string_from_json(j, "library");
        return c;
    });
}

/// Parses the text of a certificate document; malformed JSON is invalid_input too.
inline step_certificate parse_step_certificate_json(std::string_view text) {
    return step_certificate_from_json(detail::parse_json_text(text, "step-certificate"));
}

inline step_certificate read_step_certificate_json(std::istream& in) { return parse_step_certificate_json(detail::whole_stream(in)); }

} // namespace stepcert
