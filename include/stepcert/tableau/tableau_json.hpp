#pragma once
// Tableau files, our own JSON layout (needs nlohmann_json):
//   {"format": "stepcert.tableau", "format_version": 1,
//    "name": "classic RK4", "order": 4,
//    "a": [[], ["1/2"], ["0", "1/2"], ["0", "0", "1"]],    row i: s entries, or its i entries left of the diagonal
//    "b": ["1/6", "1/3", "1/3", "1/6"], "c": ["0", "1/2", "1/2", "1"],
//    "embedded": {"b": [...], "order": 3}}                  optional
// Coefficients are strings ("1/3", "-0.25", "7") or JSON integers, read exactly; a JSON number
// with a fraction or exponent is refused (it would already be rounded). The reader is strict:
// every problem (malformed JSON, a missing or unknown field, a wrong size, a non-number, a zero
// denominator) throws invalid_input naming the field; nothing else escapes it.
#include <cstddef>
#include <cmath>
#include <initializer_list>
#include <istream>
#include <limits>
#include <sstream>
#include <string>
#include <string_view>
#include <vector>

#include <nlohmann/json.hpp>

#include "stepcert/core/error.hpp"
#include "stepcert/tableau/exact_number.hpp"
#include "stepcert/tableau/tableau.hpp"

namespace stepcert {

inline constexpr const char* tableau_json_format = "stepcert.tableau";
inline constexpr int tableau_json_version = 1;

namespace detail {

inline std::string tableau_file_who(const std::string& where) { return "stepcert: tableau file: " + where + ": "; }

inline const nlohmann::json& required_field(const nlohmann::json& j, const char* key, const std::string& where) {
    const auto it = j.find(key);
    if (it == j.end()) throw invalid_input(tableau_file_who(where) + "the field \"" + key + "\" is missing.");
    return *it;
}

template <class T>
T coefficient_from_json(const nlohmann::json& v, const std::string& where) {
    try {
        if (v.is_string()) return exact_number<T>(v.get<std::string>());
        if (v.is_number_integer()) {
            const std::string digits = v.is_number_unsigned() ? std::to_string(v.get<unsigned long long>()) : std::to_string(v.get<long long>());
            return exact_number<T>(digits);
        }
    } catch (const invalid_input& e) {
        throw invalid_input(tableau_file_who(where) + e.what());
    }
    if (v.is_number_float())
        throw invalid_input(tableau_file_who(where) + "the number " + v.dump() +
                            " has a fraction or exponent; write it as a string (\"1/10\" or \"0.1\") so it stays exact.");
    throw invalid_input(tableau_file_who(where) + "expected a coefficient (a string such as \"1/3\" or an integer), found " +
                        std::string(v.type_name()) + ".");
}

template <class T>
std::vector<T> vector_from_json(const nlohmann::json& v, std::size_t expected, const std::string& where) {
    if (!v.is_array()) throw invalid_input(tableau_file_who(where) + "expected an array, found " + std::string(v.type_name()) + ".");
    if (v.size() != expected)
        throw invalid_input(tableau_file_who(where) + "has " + std::to_string(v.size()) + " entries; " + std::to_string(expected) +
                            " are needed (one per stage).");
    std::vector<T> out;
    for (std::size_t i = 0; i < v.size(); ++i) out.push_back(coefficient_from_json<T>(v[i], where + "[" + std::to_string(i) + "]"));
    return out;
}

inline int order_from_json(const nlohmann::json& v, const std::string& where) {
    if (!v.is_number_integer() || v.get<long long>() < 1 || v.get<long long>() > 20)
        throw invalid_input(tableau_file_who(where) + "the order must be an integer from 1 to 20, found " + v.dump() + ".");
    return static_cast<int>(v.get<long long>());
}

inline void only_known_fields(const nlohmann::json& j, std::initializer_list<const char*> known, const std::string& where) {
    for (auto it = j.begin(); it != j.end(); ++it) {
        bool ok = false;
        for (const char* k : known) ok = ok || it.key() == k;
        if (!ok) throw invalid_input(tableau_file_who(where) + "unknown field \"" + it.key() + "\" (a typing error?).");
    }
}

} // namespace detail

/// The tableau in a parsed JSON document, in scalar type T (exact for cpp_rational).
template <class T>
tableau<T> tableau_from_json(const nlohmann::json& j) {
    using namespace detail;
    if (!j.is_object()) throw invalid_input(tableau_file_who("document") + "expected a JSON object, found " + std::string(j.type_name()) + ".");
    only_known_fields(j, {"format", "format_version", "name", "order", "a", "b", "c", "embedded"}, "document");
    const auto& format = required_field(j, "format", "document");
    if (!format.is_string() || format.get<std::string>() != tableau_json_format)
        throw invalid_input(tableau_file_who("format") + "expected \"" + tableau_json_format + "\", found " + format.dump() + ".");
    const auto& version = required_field(j, "format_version", "document");
    if (!version.is_number_integer() || version.get<long long>() < 1 || version.get<long long>() > tableau_json_version)
        throw invalid_input(tableau_file_who("format_version") + "this reader knows versions 1.." + std::to_string(tableau_json_version) +
                            ", found " + version.dump() + ".");
    tableau<T> t;
    const auto& name = required_field(j, "name", "document");
    if (!name.is_string() || name.get<std::string>().empty())
        throw invalid_input(tableau_file_who("name") + "expected a non-empty string, found " + name.dump() + ".");
    t.name = name.get<std::string>();
    t.claimed_order = order_from_json(required_field(j, "order", "document"), "order");
    const auto& b = required_field(j, "b", "document");
    if (!b.is_array() || b.empty() || b.size() > 64)
        throw invalid_input(tableau_file_who("b") + "expected an array of 1 to 64 weights (one per stage).");
    const std::size_t s = b.size();
    t.b = vector_from_json<T>(b, s, "b");
    t.c = vector_from_json<T>(required_field(j, "c", "document"), s, "c");
    const auto& a = required_field(j, "a", "document");
    if (!a.is_array() || a.size() != s)
        throw invalid_input(tableau_file_who("a") + "expected an array of " + std::to_string(s) + " rows (one per stage).");
    for (std::size_t i = 0; i < s; ++i) {
        const std::string where = "a[" + std::to_string(i) + "]";
        const auto& row = a[i];
        if (!row.is_array() || (row.size() != s && row.size() != i))
            throw invalid_input(tableau_file_who(where) + "row " + std::to_string(i) + " needs " + std::to_string(s) + " entries, or its " +
                                std::to_string(i) + " entries left of the diagonal for an explicit method.");
        std::vector<T> r = vector_from_json<T>(row, row.size(), where);
        r.resize(s, T(0));
        t.a.push_back(std::move(r));
    }
    if (const auto it = j.find("embedded"); it != j.end()) {
        if (!it->is_object()) throw invalid_input(tableau_file_who("embedded") + "expected an object {\"b\": [...], \"order\": p}.");
        only_known_fields(*it, {"b", "order"}, "embedded");
        t.b_embedded = vector_from_json<T>(required_field(*it, "b", "embedded"), s, "embedded.b");
        t.claimed_embedded_order = order_from_json(required_field(*it, "order", "embedded"), "embedded.order");
    }
    t.validate_shape();
    return t;
}

/// Parses text; malformed JSON is reported with its byte position.
template <class T>
tableau<T> parse_tableau_json(std::string_view text) {
    nlohmann::json j;
    try {
        j = nlohmann::json::parse(text.begin(), text.end());
    } catch (const nlohmann::json::exception& e) {
        throw invalid_input(detail::tableau_file_who("document") + "not valid JSON (" + e.what() + ").");
    }
    return tableau_from_json<T>(j);
}

template <class T>
tableau<T> read_tableau_json(std::istream& in) {
    std::ostringstream all;
    all << in.rdbuf();
    return parse_tableau_json<T>(all.str());
}

namespace detail {

/// x as an exact fraction "p/q": as written for cpp_rational; a binary floating value is
/// m 2^e with an integer m, so it is written without rounding and reads back bit for bit.
template <class T>
std::string exact_text(const T& x) {
    std::ostringstream os;
    if constexpr (std::numeric_limits<T>::is_exact) {
        os << x;
    } else {
        using std::frexp;
        using std::ldexp;
        using boost::multiprecision::cpp_int;
        if (x == 0) return "0";
        int e = 0;
        const T mantissa = ldexp(frexp(x, &e), std::numeric_limits<T>::digits);  // an integer value
        e -= std::numeric_limits<T>::digits;
        cpp_int m = static_cast<cpp_int>(mantissa);
        cpp_int den = 1;
        if (e >= 0)
            m <<= e;
        else
            den <<= -e;
        const cpp_int g = boost::multiprecision::gcd(m, den);
        m /= g;
        den /= g;
        os << m;
        if (den != 1) os << "/" << den;
    }
    return os.str();
}

} // namespace detail

/// The tableau as a document of this format, every coefficient an exact fraction (see
/// detail::exact_text), so reading it back gives the same values in the same type.
template <class T>
nlohmann::json tableau_to_json(const tableau<T>& t) {
    static_assert(std::numeric_limits<T>::is_exact || std::numeric_limits<T>::radix == 2,
                  "stepcert::tableau_to_json: T must be exact (cpp_rational) or a binary floating type.");
    t.validate_shape();
    auto text = [](const T& x) { return detail::exact_text(x); };
    auto vec = [&](const std::vector<T>& v) {
        nlohmann::json out = nlohmann::json::array();
        for (const T& x : v) out.push_back(text(x));
        return out;
    };
    nlohmann::json j;
    j["format"] = tableau_json_format;
    j["format_version"] = tableau_json_version;
    j["name"] = t.name;
    j["order"] = t.claimed_order;
    nlohmann::json a = nlohmann::json::array();
    for (const auto& row : t.a) a.push_back(vec(row));
    j["a"] = a;
    j["b"] = vec(t.b);
    j["c"] = vec(t.c);
    if (t.b_embedded) j["embedded"] = {{"b", vec(*t.b_embedded)}, {"order", t.claimed_embedded_order}};
    return j;
}

} // namespace stepcert
