#pragma once
// Pieces shared by the JSON documents of error estimates and ledgers (optional: needs
// nlohmann_json): the format tag and version check, the weighted norm and the run's cost.
#include <istream>
#include <sstream>
#include <string>
#include <string_view>

#include <nlohmann/json.hpp>

#include "stepcert/core/error.hpp"
#include "stepcert/core/norm.hpp"
#include "stepcert/methods/method.hpp"
#include "stepcert/report/detail/json_numbers.hpp"

namespace stepcert::detail {

/// Throws invalid_input unless `j` is an object with "format": format and "format_version": version.
/// Checks the format tag and that the version is one of oldest .. newest; returns the version.
inline int check_json_document(const nlohmann::json& j, const char* format, int oldest, int newest, const char* writer) {
    const std::string versions = oldest == newest ? std::to_string(newest) : std::to_string(oldest) + " to " + std::to_string(newest);
    const std::string what = std::string("stepcert: expected a JSON document with \"format\": \"") + format +
                             "\" and \"format_version\": " + versions + " (as " + writer + " writes)";
    if (!j.is_object()) throw invalid_input(what + ", got a JSON " + j.type_name() + ".");
    const auto f = j.find("format");
    if (f == j.end() || !f->is_string()) throw invalid_input(what + "; this document has no \"format\" string.");
    if (*f != format) throw invalid_input(what + "; this one has \"format\": \"" + f->get<std::string>() + "\".");
    const auto v = j.find("format_version");
    if (v == j.end() || !v->is_number_integer()) throw invalid_input(what + "; this document has no whole-number \"format_version\".");
    const long long version = v->get<long long>();
    if (version < oldest || version > newest)
        throw invalid_input(what + "; this one has format_version " + std::to_string(version) +
                            ", which this stepcert does not read: write it again with this version.");
    return static_cast<int>(version);
}

inline void check_json_document(const nlohmann::json& j, const char* format, int version, const char* writer) {
    (void)check_json_document(j, format, version, version, writer);
}

inline nlohmann::json norm_to_json(const weighted_norm& n) {
    return {{"atol", json_number(n.atol)}, {"rtol", json_number(n.rtol)}, {"kind", n.kind == norm_kind::max ? "max" : "rms"}};
}

/// The layout of norm_to_json under `key` ("norm" in estimates, "tolerance" in certificates).
inline weighted_norm norm_from_json(const nlohmann::json& j, const char* key = "norm") {
    const auto& nj = typed_field(j, key, nlohmann::json::value_t::object, "an object with atol, rtol and kind");
    return json_within(key, [&] {
        weighted_norm n;
        n.atol = number_from_json(nj, "atol");
        n.rtol = number_from_json(nj, "rtol");
        const auto kind = string_from_json(nj, "kind");
        if (kind != "max" && kind != "rms")
            throw invalid_input("stepcert: JSON field 'kind' is '" + kind + "'; it must be \"max\" or \"rms\".");
        n.kind = kind == "max" ? norm_kind::max : norm_kind::rms;
        n.validate();
        return n;
    });
}

inline nlohmann::json cost_to_json(const run_stats& c) {
    return {{"steps", c.steps}, {"rejected", c.rejected}, {"evaluations", c.evaluations}};
}

inline run_stats cost_from_json(const nlohmann::json& j) {
    const auto& cj = typed_field(j, "cost", nlohmann::json::value_t::object, "an object with steps, rejected and evaluations");
    return json_within("cost", [&] {
        run_stats c;
        c.steps = count_from_json(cj, "steps");
        c.rejected = count_from_json(cj, "rejected");
        c.evaluations = count_from_json(cj, "evaluations");
        return c;
    });
}

/// Parses text of a document; malformed JSON is invalid_input with the parser's position.
inline nlohmann::json parse_json_text(std::string_view text, const char* document) {
    try {
        return nlohmann::json::parse(text.begin(), text.end());
    } catch (const nlohmann::json::exception& e) {
        throw invalid_input(std::string("stepcert: a ") + document + " document that is not valid JSON (" + e.what() +
                            "); pass the text stepcert::to_json(...).dump() wrote, whole.");
    }
}

inline std::string whole_stream(std::istream& in) {
    std::ostringstream all;
    all << in.rdbuf();
    return all.str();
}

/// Runs `read`, turning what goes wrong into invalid_input that names the document and what to do.
template <class Read>
auto read_json_document(const char* document, Read&& read) {
    const std::string prefix = std::string("stepcert: malformed ") + document + " JSON: ";
    const std::string advice = " (write the document with stepcert::to_json, or correct that field).";
    auto message = [&](const char* what) {
        std::string inner = without_stepcert_prefix(what);
        while (!inner.empty() && inner.back() == '.') inner.pop_back();
        return prefix + inner + advice;
    };
    try {
        return read();
    } catch (const invalid_input& e) {
        throw invalid_input(message(e.what()));
    } catch (const nlohmann::json::exception& e) {
        throw invalid_input(message(e.what()));
    }
}

} // namespace stepcert::detail
