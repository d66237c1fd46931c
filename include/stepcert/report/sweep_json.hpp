#pragma once
// JSON export of a cost–accuracy sweep (optional: needs nlohmann_json).
// Document layout: {"format": "stepcert.cost_accuracy_sweep", "format_version": 1, "caution": ...,
// the problem and its interval, "output_times", "norm", the truth, "methods": [...], "points": [...]}.
// Numbers as report/detail/json_numbers.hpp: NaN is null, +/-infinity the strings "inf"/"-inf"
// (a failed point's error is "inf"), doubles with round-trip precision. A fixed-step point
// carries "step_count", an adaptive one "atol" and "rtol".
#include <string>

#include <nlohmann/json.hpp>

#include "stepcert/report/detail/json_numbers.hpp"
#include "stepcert/report/estimate_caution.hpp"
#include "stepcert/sweep/sweep_point.hpp"

namespace stepcert {

inline constexpr const char* sweep_json_format = "stepcert.cost_accuracy_sweep";
inline constexpr int sweep_json_version = 1;

inline nlohmann::json sweep_point_to_json(const sweep_point& p) {
    using detail::json_number;
    nlohmann::json j;
    j["method"] = p.method;
    j["method_index"] = p.method_index;
    j["declared_order"] = p.declared_order;
    j["kind"] = std::string(to_string(p.setting.kind));
    switch (p.setting.kind) {
    case sweep_kind::fixed_step:
        j["step_count"] = p.setting.steps;
        break;
    case sweep_kind::adaptive:
        j["atol"] = json_number(p.setting.tolerance.atol);
        j["rtol"] = json_number(p.setting.tolerance.rtol);
        break;
    }
    j["error"] = json_number(p.error);
    j["evaluations"] = p.evaluations;
    j["steps"] = p.steps;
    j["rejected"] = p.rejected;
    j["seconds"] = {{"median", json_number(p.seconds_median)}, {"min", json_number(p.seconds_min)}, {"max", json_number(p.seconds_max)}};
    j["repeats"] = p.repeats;
    j["status"] = std::string(to_string(p.status));
    j["message"] = p.message;
    return j;
}

/// The sweep as a JSON document.
inline nlohmann::json sweep_to_json(const sweep_result& r) {
    using detail::json_number;
    nlohmann::json j;
    j["format"] = sweep_json_format;
    j["format_version"] = sweep_json_version;
    j["caution"] = std::string(estimate_caution);
    j["problem"] = r.problem;
    j["dimension"] = r.dimension;
    j["t0"] = json_number(r.t0);
    j["t1"] = json_number(r.t1);
    j["output_times"] = r.output_times;
    j["norm"] = {{"atol", json_number(r.norm.atol)}, {"rtol", json_number(r.norm.rtol)}, {"kind", r.norm.kind == norm_kind::max ? "max" : "rms"}};
    j["truth"] = {{"how", r.truth}, {"digits", json_number(r.truth_digits)}, {"evaluations", r.truth_evaluations}};
    j["methods"] = r.methods;
    nlohmann::json points = nlohmann::json::array();
    for (const sweep_point& p : r.points) points.push_back(sweep_point_to_json(p));
    j["points"] = std::move(points);
    return j;
}

} // namespace stepcert
