#pragma once
// Numbers and named values in stepcert's JSON documents (optional: needs nlohmann_json). JSON has
// no NaN or infinity: NaN is written as null, +/-infinity as the strings "inf"/"-inf", finite
// doubles as numbers with round-trip precision, so every double reads back exactly. The readers
// name the field they reject and throw only stepcert::invalid_input.
#include <cmath>
#include <cstddef>
#include <limits>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "stepcert/core/error.hpp"

namespace stepcert::detail {

inline nlohmann::json json_number(double x) {
    if (std::isnan(x)) return nullptr;
    if (std::isinf(x)) return x > 0 ? "inf" : "-inf";
    return x;
}

/// A double written by json_number; `where` names the field in the message.
inline double number_from_json_value(const nlohmann::json& v, const std::string& where) {
    if (v.is_null()) return std::numeric_limits<double>::quiet_NaN();
    if (v.is_string()) {
        const auto s = v.get<std::string>();
        if (s == "inf") return std::numeric_limits<double>::infinity();
        if (s == "-inf") return -std::numeric_limits<double>::infinity();
        throw invalid_input("stepcert: JSON field '" + where + "' holds the string '" + s +
                            "', expected a number, null, \"inf\" or \"-inf\".");
    }
    if (!v.is_number())
        throw invalid_input("stepcert: JSON field '" + where + "' holds a " + v.type_name() +
                            ", expected a number, null, \"inf\" or \"-inf\".");
    return v.get<double>();
}

inline double number_from_json(const nlohmann::json& j, const char* key) {
    if (!j.is_object()) throw invalid_input(std::string("stepcert: expected a JSON object holding the field '") + key + "', got a " + j.type_name() + ".");
    const auto it = j.find(key);
    if (it == j.end()) throw invalid_input(std::string("stepcert: JSON field '") + key + "' is missing.");
    return number_from_json_value(*it, key);
}

template <class Enum, std::size_t N>
Enum enum_from_json(const nlohmann::json& j, const char* key, const Enum (&all)[N]) {
    const auto s = j.at(key).get<std::string>();
    for (Enum e : all)
        if (to_string(e) == s) return e;
    throw invalid_input(std::string("stepcert: JSON field '") + key + "' has the unknown value '" + s + "'.");
}

/// A field of the given JSON type, or invalid_input naming the field and the type found.
inline const nlohmann::json& typed_field(const nlohmann::json& j, const char* key, nlohmann::json::value_t type, const char* expected) {
    if (!j.is_object()) throw invalid_input(std::string("stepcert: expected a JSON object holding the field '") + key + "', got a " + j.type_name() + ".");
    const auto it = j.find(key);
    if (it == j.end()) throw invalid_input(std::string("stepcert: JSON field '") + key + "' is missing.");
    const bool ok = type == nlohmann::json::value_t::number_unsigned ? it->is_number_unsigned()
                    : type == nlohmann::json::value_t::number_integer ? it->is_number_integer()
                                                                      : it->type() == type;
    if (!ok)
        throw invalid_input(std::string("stepcert: JSON field '") + key + "' holds a " + it->type_name() + ", expected " + expected + ".");
    return *it;
}

inline std::string string_from_json(const nlohmann::json& j, const char* key) {
    return typed_field(j, key, nlohmann::json::value_t::string, "a string").get<std::string>();
}

inline bool bool_from_json(const nlohmann::json& j, const char* key) {
    return typed_field(j, key, nlohmann::json::value_t::boolean, "true or false").get<bool>();
}

/// A count (steps, evaluations): a whole number >= 0.
inline std::size_t count_from_json(const nlohmann::json& j, const char* key) {
    return typed_field(j, key, nlohmann::json::value_t::number_unsigned, "a whole number >= 0").get<std::size_t>();
}

inline int int_from_json(const nlohmann::json& j, const char* key) {
    const auto& v = typed_field(j, key, nlohmann::json::value_t::number_integer, "a whole number");
    const auto x = v.get<long long>();
    if (x < std::numeric_limits<int>::min() || x > std::numeric_limits<int>::max())
        throw invalid_input(std::string("stepcert: JSON field '") + key + "' holds " + std::to_string(x) + ", out of range.");
    return static_cast<int>(x);
}

inline const nlohmann::json& array_from_json(const nlohmann::json& j, const char* key) {
    return typed_field(j, key, nlohmann::json::value_t::array, "an array");
}

inline nlohmann::json json_numbers(const std::vector<double>& xs) {
    nlohmann::json out = nlohmann::json::array();
    for (double x : xs) out.push_back(json_number(x));
    return out;
}

inline nlohmann::json json_number_rows(const std::vector<std::vector<double>>& rows) {
    nlohmann::json out = nlohmann::json::array();
    for (const auto& r : rows) out.push_back(json_numbers(r));
    return out;
}

inline std::vector<double> numbers_from_json_value(const nlohmann::json& v, const std::string& where) {
    if (!v.is_array()) throw invalid_input("stepcert: JSON field '" + where + "' holds a " + v.type_name() + ", expected an array of numbers.");
    std::vector<double> out;
    out.reserve(v.size());
    for (std::size_t i = 0; i < v.size(); ++i) out.push_back(number_from_json_value(v[i], where + "[" + std::to_string(i) + "]"));
    return out;
}

/// A message without its leading "stepcert: ", to be nested in another.
inline std::string without_stepcert_prefix(std::string message) {
    if (message.rfind("stepcert: ", 0) == 0) message.erase(0, 10);
    return message;
}

/// Runs `read` on a part of a document; what it rejects is reported as inside `where` (e.g. "steps[3]").
template <class Read>
auto json_within(const std::string& where, Read&& read) {
    auto message = [&](const char* inner) { return "stepcert: in '" + where + "': " + without_stepcert_prefix(inner); };
    try {
        return read();
    } catch (const invalid_input& e) {
        throw invalid_input(message(e.what()));
    } catch (const nlohmann::json::exception& e) {
        throw invalid_input(message(e.what()));
    }
}

/// An array of numbers (json_numbers).
inline std::vector<double> numbers_from_json(const nlohmann::json& j, const char* key) {
    return numbers_from_json_value(array_from_json(j, key), key);
}

/// An array of arrays of numbers (json_number_rows); every row must have `width` entries.
inline std::vector<std::vector<double>> number_rows_from_json(const nlohmann::json& j, const char* key, std::size_t width,
                                                              const std::string& width_of) {
    const auto& rows = array_from_json(j, key);
    std::vector<std::vector<double>> out;
    out.reserve(rows.size());
    for (std::size_t k = 0; k < rows.size(); ++k) {
        const std::string where = std::string(key) + "[" + std::to_string(k) + "]";
        out.push_back(numbers_from_json_value(rows[k], where));
        if (out.back().size() != width)
            throw invalid_input("stepcert: JSON field '" + where + "' has " + std::to_string(out.back().size()) + " components, " +
                                width_of + " " + std::to_string(width) + "; every vector must have the state's length.");
    }
    return out;
}

} // namespace stepcert::detail
