#pragma once
// The cautions every exported step certificate carries: the text form closes with them one per
// line, the JSON document joins them into its "caution" field. Apart from the text and JSON
// headers so the text form does not need nlohmann_json.
#include <array>
#include <string>
#include <string_view>

namespace stepcert {

inline constexpr std::array<std::string_view, 4> certificate_cautions = {
    "This certificate covers the discretization error of this model with these inputs only; it says nothing about "
    "modelling error, error in the data, or round-off error beyond what is stated here.",
    "An \"estimated\" certificate rests on an estimate from finitely many runs: it is not a proof and not a bound.",
    "A \"reference-verified\" certificate holds at the output times that were checked, not between them.",
    "For safety-relevant use, follow the verification-and-validation standard of your field and have the result "
    "reviewed by a licensed engineer.",
};

/// The cautions as one paragraph (the JSON "caution" field).
inline std::string certificate_caution() {
    std::string all;
    for (std::string_view c : certificate_cautions) {
        if (!all.empty()) all += ' ';
        all += c;
    }
    return all;
}

} // namespace stepcert
