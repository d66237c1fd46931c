#pragma once
// JSON export and import of an order study (optional: needs nlohmann_json).
// Document layout: {"format": "stepcert.order_study", "format_version": 1, ...fields..., "levels": [...]}.
// JSON has no NaN or infinity: NaN is written as null, +/-infinity as the strings "inf"/"-inf",
// so a study reads back exactly (report/detail/json_numbers.hpp; doubles with round-trip precision).
#include <cmath>
#include <limits>
#include <string>

#include <nlohmann/json.hpp>

#include "stepcert/core/error.hpp"
#include "stepcert/report/detail/json_numbers.hpp"
#include "stepcert/report/study_table.hpp"
#include "stepcert/study/study_result.hpp"

namespace stepcert {

inline constexpr const char* study_json_format = "stepcert.order_study";
inline constexpr int study_json_version = 1;

/// The study as a JSON document.
inline nlohmann::json study_to_json(const order_study_result& r) {
    using detail::json_number;
    nlohmann::json j;
    j["format"] = study_json_format;
    j["format_version"] = study_json_version;
    j["caution"] = std::string(study_caution);
    j["problem"] = r.problem;
    j["method"] = r.method;
    j["declared_order"] = r.declared_order;
    j["variable_order"] = r.variable_order;
    j["stage_order"] = r.stage_order;
    j["order_reduction"] = r.order_reduction;
    j["control"] = std::string(detail::step_control_text(r.control));
    j["ladder"] = r.ladder;
    j["ratio"] = json_number(r.ratio);
    j["working_digits"] = r.working_digits;
    j["basis"] = std::string(to_string(r.basis));
    j["basis_detail"] = r.basis_detail;
    j["reference_digits"] = json_number(r.reference_digits);
    j["reference_evaluations"] = r.reference_evaluations;
    j["reference_shared"] = r.reference_shared;
    j["fit_measure"] = std::string(to_string(r.fit_measure));
    j["norm"] = {{"atol", r.norm.atol}, {"rtol", r.norm.rtol}, {"kind", r.norm.kind == norm_kind::max ? "max" : "rms"}};
    j["grid_points"] = r.grid_points;
    j["verdict"] = std::string(to_string(r.verdict));
    j["verdict_text"] = r.verdict_text;
    j["range"] = {{"first_level", r.range_first}, {"last_level", r.range_last}};
    j["fit"] = {{"points", r.fit.points},
                {"order", json_number(r.fit.order)},
                {"log_constant", json_number(r.fit.log_constant)},
                {"standard_error", json_number(r.fit.standard_error)},
                {"residual_sd", json_number(r.fit.residual_sd)},
                {"confidence", json_number(r.fit.confidence)},
                {"t_quantile", json_number(r.fit.t_quantile)},
                {"lower", json_number(r.fit.lower)},
                {"upper", json_number(r.fit.upper)}};
    j["total_evaluations"] = r.total_evaluations;
    nlohmann::json levels = nlohmann::json::array();
    for (const study_level& lv : r.levels)
        levels.push_back({{"index", lv.index},
                          {"h", json_number(lv.h)},
                          {"tolerance", json_number(lv.tolerance)},
                          {"steps", lv.steps},
                          {"rejected", lv.rejected},
                          {"evaluations", lv.evaluations},
                          {"error_final", json_number(lv.error_final)},
                          {"error_grid", json_number(lv.error_grid)},
                          {"local_order", json_number(lv.local_order)},
                          {"round_off_floor", json_number(lv.round_off_floor)},
                          {"status", std::string(to_string(lv.status))},
                          {"note", lv.note}});
    j["levels"] = std::move(levels);
    return j;
}

/// Reads a study written by study_to_json; throws invalid_input on another format or version.
inline order_study_result study_from_json(const nlohmann::json& j) {
    using detail::number_from_json;
    if (!j.is_object() || !j.contains("format") || j.at("format") != study_json_format)
        throw invalid_input(std::string("stepcert: not an order-study JSON document (expected \"format\": \"") + study_json_format + "\").");
    if (j.at("format_version").get<int>() > study_json_version)
        throw invalid_input("stepcert: order-study JSON format_version " + std::to_string(j.at("format_version").get<int>()) +
                            " is newer than this stepcert reads (" + std::to_string(study_json_version) + ").");
    try {
        order_study_result r;
        r.problem = j.at("problem").get<std::string>();
        r.method = j.at("method").get<std::string>();
        r.declared_order = j.at("declared_order").get<int>();
        r.variable_order = j.at("variable_order").get<bool>();
        // Added without a version bump: documents written before them read as "not stated".
        r.stage_order = j.contains("stage_order") ? j.at("stage_order").get<int>() : 0;
        r.order_reduction = j.contains("order_reduction") ? j.at("order_reduction").get<bool>() : false;
        const auto control = j.at("control").get<std::string>();
        if (control != "fixed" && control != "adaptive")
            throw invalid_input("stepcert: study JSON field 'control' must be \"fixed\" or \"adaptive\".");
        r.control = control == "fixed" ? step_control::fixed : step_control::adaptive;
        r.ladder = j.at("ladder").get<std::string>();
        r.ratio = number_from_json(j, "ratio");
        r.working_digits = j.at("working_digits").get<int>();
        static constexpr error_basis bases[] = {error_basis::automatic, error_basis::exact_solution, error_basis::reference_solution,
                                                error_basis::successive_differences};
        r.basis = detail::enum_from_json(j, "basis", bases);
        r.basis_detail = j.at("basis_detail").get<std::string>();
        r.reference_digits = number_from_json(j, "reference_digits");
        r.reference_evaluations = j.at("reference_evaluations").get<std::size_t>();
        r.reference_shared = j.value("reference_shared", false);  // absent in documents written before it existed
        static constexpr error_measure measures[] = {error_measure::final_time, error_measure::grid_max};
        r.fit_measure = detail::enum_from_json(j, "fit_measure", measures);
        const auto& nj = j.at("norm");
        r.norm.atol = nj.at("atol").get<double>();
        r.norm.rtol = nj.at("rtol").get<double>();
        r.norm.kind = nj.at("kind").get<std::string>() == "rms" ? norm_kind::rms : norm_kind::max;
        r.grid_points = j.at("grid_points").get<std::size_t>();
        static constexpr study_verdict verdicts[] = {study_verdict::order_fitted, study_verdict::no_asymptotic_range};
        r.verdict = detail::enum_from_json(j, "verdict", verdicts);
        r.verdict_text = j.at("verdict_text").get<std::string>();
        r.range_first = j.at("range").at("first_level").get<std::size_t>();
        r.range_last = j.at("range").at("last_level").get<std::size_t>();
        const auto& fj = j.at("fit");
        r.fit.points = fj.at("points").get<std::size_t>();
        r.fit.order = number_from_json(fj, "order");
        r.fit.log_constant = number_from_json(fj, "log_constant");
        r.fit.standard_error = number_from_json(fj, "standard_error");
        r.fit.residual_sd = number_from_json(fj, "residual_sd");
        r.fit.confidence = number_from_json(fj, "confidence");
        r.fit.t_quantile = number_from_json(fj, "t_quantile");
        r.fit.lower = number_from_json(fj, "lower");
        r.fit.upper = number_from_json(fj, "upper");
        r.total_evaluations = j.at("total_evaluations").get<std::size_t>();
        static constexpr level_status statuses[] = {level_status::in_range,   level_status::pre_asymptotic, level_status::round_off_plateau,
                                                    level_status::non_finite, level_status::unsettled,      level_status::baseline};
        for (const auto& lj : j.at("levels")) {
            study_level lv;
            lv.index = lj.at("index").get<std::size_t>();
            lv.h = number_from_json(lj, "h");
            lv.tolerance = number_from_json(lj, "tolerance");
            lv.steps = lj.at("steps").get<std::size_t>();
            lv.rejected = lj.at("rejected").get<std::size_t>();
            lv.evaluations = lj.at("evaluations").get<std::size_t>();
            lv.error_final = number_from_json(lj, "error_final");
            lv.error_grid = number_from_json(lj, "error_grid");
            lv.local_order = number_from_json(lj, "local_order");
            lv.round_off_floor = number_from_json(lj, "round_off_floor");
            lv.status = detail::enum_from_json(lj, "status", statuses);
            lv.note = lj.at("note").get<std::string>();
            r.levels.push_back(std::move(lv));
        }
        return r;
    } catch (const nlohmann::json::exception& e) {
        throw invalid_input(std::string("stepcert: malformed order-study JSON: ") + e.what());
    }
}

} // namespace stepcert
