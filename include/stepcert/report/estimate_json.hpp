#pragma once
// JSON export and import of error estimates (optional: needs nlohmann_json): a local error profile
// ("format": "stepcert.local_error_profile"), a global error estimate or true global error
// ("stepcert.global_error_estimate"), both read back exactly; an effectivity summary
// ("stepcert.effectivity_summary"), write only. Every document carries "format",
// "format_version" (1) and "caution" (estimate_caution). NaN is written as null, +/-infinity as
// "inf"/"-inf" (report/detail/json_numbers.hpp). The readers (*_from_json on a parsed document,
// parse_*_json on text, read_*_json on a stream) throw only invalid_input, naming the field.
#include <array>
#include <cstddef>
#include <istream>
#include <string>
#include <string_view>
#include <vector>

#include <nlohmann/json.hpp>

#include "stepcert/core/error.hpp"
#include "stepcert/estimate/effectivity.hpp"
#include "stepcert/estimate/global_error.hpp"
#include "stepcert/estimate/local_error.hpp"
#include "stepcert/report/detail/json_fields.hpp"
#include "stepcert/report/detail/json_numbers.hpp"
#include "stepcert/report/estimate_caution.hpp"

namespace stepcert {

inline constexpr const char* local_error_json_format = "stepcert.local_error_profile";
inline constexpr const char* global_error_json_format = "stepcert.global_error_estimate";
inline constexpr const char* effectivity_json_format = "stepcert.effectivity_summary";
inline constexpr int estimate_json_version = 1;

namespace detail {

/// True for every value of local_error_estimator. No default label: -Wswitch (an error in the
/// project's builds) flags a value added to the enum and missing here.
constexpr bool is_local_error_estimator(local_error_estimator e) {
    switch (e) {
    case local_error_estimator::step_doubling:
    case local_error_estimator::embedded_pair:
    case local_error_estimator::reference_truth:
    case local_error_estimator::milne_device: return true;
    }
    return false;
}

/// The enum has no explicit values, so they are 0, 1, 2, ...: count while the switch knows them.
constexpr std::size_t local_error_estimator_count() {
    std::size_t n = 0;
    while (is_local_error_estimator(static_cast<local_error_estimator>(n))) ++n;
    return n;
}

} // namespace detail

/// Every local_error_estimator, in declaration order (the values a profile document may name).
inline constexpr auto all_local_error_estimators = [] {
    std::array<local_error_estimator, detail::local_error_estimator_count()> all{};
    for (std::size_t k = 0; k < all.size(); ++k) all[k] = static_cast<local_error_estimator>(k);
    return all;
}();

/// The estimator whose estimator_name is `name`; invalid_input for any other text.
inline local_error_estimator local_error_estimator_from_name(const std::string& name) {
    std::string known;
    for (local_error_estimator e : all_local_error_estimators) {
        if (name == estimator_name(e)) return e;
        known += std::string(known.empty() ? "" : ", ") + "'" + estimator_name(e) + "'";
    }
    throw invalid_input("stepcert: '" + name + "' is not the name of a local error estimator; expected one of " + known + ".");
}

namespace detail {
/// `rows` holds no vectors or one per entry (`what`: "step" or "time").
inline void check_vector_rows(const std::vector<std::vector<double>>& rows, std::size_t expected, const std::string& what) {
    if (!rows.empty() && rows.size() != expected)
        throw invalid_input("stepcert: JSON field 'vectors' holds " + std::to_string(rows.size()) + " vectors for " +
                            std::to_string(expected) + " " + what + "s; give one per " + what + ", or none.");
}
} // namespace detail

/// The profile as a JSON document (layout in the file comment; vectors is [] unless kept).
inline nlohmann::json to_json(const local_error_profile& p) {
    using detail::json_number;
    nlohmann::json j;
    j["format"] = local_error_json_format;
    j["format_version"] = estimate_json_version;
    j["caution"] = std::string(estimate_caution);
    j["problem"] = p.problem;
    j["method"] = p.method;
    j["estimator"] = estimator_name(p.estimator);
    j["order"] = p.order;
    j["power"] = p.power;
    j["norm"] = detail::norm_to_json(p.norm);
    nlohmann::json steps = nlohmann::json::array();
    for (const local_error_step& s : p.steps)
        steps.push_back({{"t", json_number(s.t)},
                         {"h", json_number(s.h)},
                         {"estimate", json_number(s.estimate)},
                         {"principal", json_number(s.principal)},
                         {"uncertainty", json_number(s.uncertainty)}});
    j["steps"] = std::move(steps);
    j["vectors"] = detail::json_number_rows(p.vectors);
    j["cost"] = detail::cost_to_json(p.cost);
    return j;
}

/// Reads a profile written by to_json; invalid_input on another format or version, a missing or
/// mistyped field, or vectors that do not match the steps or each other.
inline local_error_profile local_error_profile_from_json(const nlohmann::json& j) {
    detail::check_json_document(j, local_error_json_format, estimate_json_version, "stepcert::to_json(local_error_profile)");
    return detail::read_json_document("local-error-profile", [&] {
        using detail::number_from_json;
        local_error_profile p;
        p.problem = detail::string_from_json(j, "problem");
        p.method = detail::string_from_json(j, "method");
        p.estimator = local_error_estimator_from_name(detail::string_from_json(j, "estimator"));
        p.order = detail::int_from_json(j, "order");
        p.power = detail::int_from_json(j, "power");
        p.norm = detail::norm_from_json(j);
        const auto& steps_json = detail::array_from_json(j, "steps");
        for (std::size_t k = 0; k < steps_json.size(); ++k) {
            const auto& sj = steps_json[k];
            p.steps.push_back(detail::json_within("steps[" + std::to_string(k) + "]", [&] {
                local_error_step s;
                s.t = number_from_json(sj, "t");
                s.h = number_from_json(sj, "h");
                s.estimate = number_from_json(sj, "estimate");
                s.principal = number_from_json(sj, "principal");
                s.uncertainty = number_from_json(sj, "uncertainty");
                return s;
            }));
        }
        const auto& vj = detail::array_from_json(j, "vectors");
        const std::size_t width = vj.empty() || !vj.front().is_array() ? 0 : vj.front().size();
        p.vectors = detail::number_rows_from_json(j, "vectors", width, "vectors[0] (the state's length)");
        detail::check_vector_rows(p.vectors, p.steps.size(), "step");
        p.cost = detail::cost_from_json(j);
        return p;
    });
}

/// Parses the text of a profile document; malformed JSON is invalid_input too.
inline local_error_profile parse_local_error_profile_json(std::string_view text) {
    return local_error_profile_from_json(detail::parse_json_text(text, "local-error-profile"));
}

inline local_error_profile read_local_error_profile_json(std::istream& in) {
    return parse_local_error_profile_json(detail::whole_stream(in));
}

/// The estimate as a JSON document: scalars, "norm", "times", "estimate" (one per time),
/// "vectors" ([] unless kept), "cost".
inline nlohmann::json to_json(const global_error_estimate& g) {
    using detail::json_number;
    nlohmann::json j;
    j["format"] = global_error_json_format;
    j["format_version"] = estimate_json_version;
    j["caution"] = std::string(estimate_caution);
    j["problem"] = g.problem;
    j["method"] = g.method;
    j["steps"] = g.steps;
    j["declared_order"] = g.declared_order;
    j["order_used"] = json_number(g.order_used);
    j["order_observed"] = g.order_observed;
    j["observed_order"] = json_number(g.observed_order);
    j["order_consistent"] = g.order_consistent;
    j["round_off_limited"] = g.round_off_limited;
    j["norm"] = detail::norm_to_json(g.norm);
    j["times"] = detail::json_numbers(g.times);
    j["estimate"] = detail::json_numbers(g.estimate);
    j["vectors"] = detail::json_number_rows(g.vectors);
    j["cost"] = detail::cost_to_json(g.cost);
    return j;
}

/// Reads an estimate written by to_json; invalid_input as local_error_profile_from_json.
inline global_error_estimate global_error_estimate_from_json(const nlohmann::json& j) {
    detail::check_json_document(j, global_error_json_format, estimate_json_version, "stepcert::to_json(global_error_estimate)");
    return detail::read_json_document("global-error-estimate", [&] {
        using detail::number_from_json;
        global_error_estimate g;
        g.problem = detail::string_from_json(j, "problem");
        g.method = detail::string_from_json(j, "method");
        g.steps = detail::count_from_json(j, "steps");
        g.declared_order = detail::int_from_json(j, "declared_order");
        g.order_used = number_from_json(j, "order_used");
        g.order_observed = detail::bool_from_json(j, "order_observed");
        g.observed_order = number_from_json(j, "observed_order");
        g.order_consistent = detail::bool_from_json(j, "order_consistent");
        g.round_off_limited = detail::bool_from_json(j, "round_off_limited");
        g.norm = detail::norm_from_json(j);
        g.times = detail::numbers_from_json(j, "times");
        g.estimate = detail::numbers_from_json(j, "estimate");
        if (g.estimate.size() != g.times.size())
            throw invalid_input("stepcert: JSON field 'estimate' holds " + std::to_string(g.estimate.size()) + " values for " +
                                std::to_string(g.times.size()) + " times; give one per time.");
        const auto& vj = detail::array_from_json(j, "vectors");
        const std::size_t width = vj.empty() || !vj.front().is_array() ? 0 : vj.front().size();
        g.vectors = detail::number_rows_from_json(j, "vectors", width, "vectors[0] (the state's length)");
        detail::check_vector_rows(g.vectors, g.times.size(), "time");
        g.cost = detail::cost_from_json(j);
        return g;
    });
}

/// Parses the text of a global-estimate document; malformed JSON is invalid_input too.
inline global_error_estimate parse_global_error_estimate_json(std::string_view text) {
    return global_error_estimate_from_json(detail::parse_json_text(text, "global-error-estimate"));
}

inline global_error_estimate read_global_error_estimate_json(std::istream& in) {
    return parse_global_error_estimate_json(detail::whole_stream(in));
}

/// The summary as a JSON document (write only): "per_step" (null where not counted), "counted",
/// "smallest", "median", "largest".
inline nlohmann::json to_json(const effectivity_summary& s) {
    using detail::json_number;
    nlohmann::json j;
    j["format"] = effectivity_json_format;
    j["format_version"] = estimate_json_version;
    j["caution"] = std::string(estimate_caution);
    j["per_step"] = detail::json_numbers(s.per_step);
    j["counted"] = s.counted;
    j["smallest"] = json_number(s.smallest);
    j["median"] = json_number(s.median);
    j["largest"] = json_number(s.largest);
    return j;
}

} // namespace stepcert
