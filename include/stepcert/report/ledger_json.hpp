#pragma once
// JSON export of the error ledger (optional: needs nlohmann_json, and Eigen through the ledger):
// the ledger itself ("format": "stepcert.error_ledger") reads back exactly; its time windows
// ("stepcert.ledger_windows") and the equidistributing step schedule ("stepcert.step_schedule")
// are write only (error_ledger_from_json, parse_error_ledger_json and read_error_ledger_json read the
// ledger; they throw only invalid_input). Every document carries "format", "format_version" (1) and "caution"
// (estimate_caution); NaN is null, +/-infinity "inf"/"-inf" (report/detail/json_numbers.hpp).
#include <istream>
#include <string>
#include <string_view>
#include <vector>

#include <nlohmann/json.hpp>

#include "stepcert/core/error.hpp"
#include "stepcert/report/detail/json_fields.hpp"
#include "stepcert/report/detail/json_numbers.hpp"
#include "stepcert/report/estimate_caution.hpp"
#include "stepcert/transport/equidistributing_schedule.hpp"
#include "stepcert/transport/error_ledger.hpp"
#include "stepcert/transport/ledger_windows.hpp"

namespace stepcert {

inline constexpr const char* ledger_json_format = "stepcert.error_ledger";
inline constexpr const char* ledger_windows_json_format = "stepcert.ledger_windows";
inline constexpr const char* step_schedule_json_format = "stepcert.step_schedule";
inline constexpr int ledger_json_version = 1;

/// The ledger as a JSON document: its names and orders, "norm", "steps" (t, h, fresh, propagated,
/// global, contribution, share), "contributions" (one vector per step, [] after a forward sweep
/// only), "final_error", "final_state", "final_size", "cost".
inline nlohmann::json to_json(const error_ledger& l) {
    using detail::json_number;
    nlohmann::json j;
    j["format"] = ledger_json_format;
    j["format_version"] = ledger_json_version;
    j["caution"] = std::string(estimate_caution);
    j["problem"] = l.problem;
    j["method"] = l.method;
    j["local_source"] = l.local_source;
    j["jacobian_how"] = l.jacobian_how;
    j["order"] = l.order;
    j["power"] = l.power;
    j["norm"] = detail::norm_to_json(l.norm);
    nlohmann::json steps = nlohmann::json::array();
    for (const ledger_step& s : l.steps)
        steps.push_back({{"t", json_number(s.t)},
                         {"h", json_number(s.h)},
                         {"fresh", json_number(s.fresh)},
                         {"propagated", json_number(s.propagated)},
                         {"global", json_number(s.global)},
                         {"contribution", json_number(s.contribution)},
                         {"share", json_number(s.share)}});
    j["steps"] = std::move(steps);
    j["contributions"] = detail::json_number_rows(l.contributions);
    j["final_error"] = detail::json_numbers(l.final_error);
    j["final_state"] = detail::json_numbers(l.final_state);
    j["final_size"] = json_number(l.final_size);
    j["cost"] = detail::cost_to_json(l.cost);
    return j;
}

/// Reads a ledger written by to_json; invalid_input on another format or version, a missing or
/// mistyped field, or vectors whose length is not the final state's (or contributions whose
/// count is not the steps').
inline error_ledger error_ledger_from_json(const nlohmann::json& j) {
    detail::check_json_document(j, ledger_json_format, ledger_json_version, "stepcert::to_json(error_ledger)");
    return detail::read_json_document("error-ledger", [&] {
        using detail::number_from_json;
        error_ledger l;
        l.problem = detail::string_from_json(j, "problem");
        l.method = detail::string_from_json(j, "method");
        l.local_source = detail::string_from_json(j, "local_source");
        l.jacobian_how = detail::string_from_json(j, "jacobian_how");
        l.order = detail::int_from_json(j, "order");
        l.power = detail::int_from_json(j, "power");
        l.norm = detail::norm_from_json(j);
        const auto& steps_json = detail::array_from_json(j, "steps");
        for (std::size_t k = 0; k < steps_json.size(); ++k) {
            const auto& sj = steps_json[k];
            l.steps.push_back(detail::json_within("steps[" + std::to_string(k) + "]", [&] {
                ledger_step s;
                s.t = number_from_json(sj, "t");
                s.h = number_from_json(sj, "h");
                s.fresh = number_from_json(sj, "fresh");
                s.propagated = number_from_json(sj, "propagated");
                s.global = number_from_json(sj, "global");
                s.contribution = number_from_json(sj, "contribution");
                s.share = number_from_json(sj, "share");
                return s;
            }));
        }
        l.final_state = detail::numbers_from_json(j, "final_state");
        const std::size_t n = l.final_state.size();
        l.final_error = detail::numbers_from_json(j, "final_error");
        if (l.final_error.size() != n)
            throw invalid_input("stepcert: JSON field 'final_error' has " + std::to_string(l.final_error.size()) +
                                " components, final_state " + std::to_string(n) + "; both must have the state's length.");
        l.contributions = detail::number_rows_from_json(j, "contributions", n, "final_state");
        if (!l.contributions.empty() && l.contributions.size() != l.steps.size())
            throw invalid_input("stepcert: JSON field 'contributions' holds " + std::to_string(l.contributions.size()) +
                                " vectors for " + std::to_string(l.steps.size()) + " steps; give one per step, or none.");
        l.final_size = number_from_json(j, "final_size");
        l.cost = detail::cost_from_json(j);
        return l;
    });
}

/// Parses the text of a ledger document; malformed JSON is invalid_input too.
inline error_ledger parse_error_ledger_json(std::string_view text) {
    return error_ledger_from_json(detail::parse_json_text(text, "error-ledger"));
}

inline error_ledger read_error_ledger_json(std::istream& in) { return parse_error_ledger_json(detail::whole_stream(in)); }

/// The windows of ledger_windows as a JSON document (write only): "windows", each with t_begin,
/// t_end, first_step, step_count, contribution, share, fresh.
inline nlohmann::json ledger_windows_to_json(const std::vector<ledger_window>& windows) {
    using detail::json_number;
    nlohmann::json j;
    j["format"] = ledger_windows_json_format;
    j["format_version"] = ledger_json_version;
    j["caution"] = std::string(estimate_caution);
    nlohmann::json ws = nlohmann::json::array();
    for (const ledger_window& w : windows)
        ws.push_back({{"t_begin", json_number(w.t_begin)},
                      {"t_end", json_number(w.t_end)},
                      {"first_step", w.first_step},
                      {"step_count", w.step_count},
                      {"contribution", json_number(w.contribution)},
                      {"share", json_number(w.share)},
                      {"fresh", json_number(w.fresh)}});
    j["windows"] = std::move(ws);
    return j;
}

/// The schedule of equidistributing_schedule as a JSON document (write only): "times",
/// "current_sum", "predicted_sum", "smallest_step", "largest_step", "how".
inline nlohmann::json to_json(const step_schedule& s) {
    using detail::json_number;
    nlohmann::json j;
    j["format"] = step_schedule_json_format;
    j["format_version"] = ledger_json_version;
    j["caution"] = std::string(estimate_caution);
    j["times"] = detail::json_numbers(s.times);
    j["current_sum"] = json_number(s.current_sum);
    j["predicted_sum"] = json_number(s.predicted_sum);
    j["smallest_step"] = json_number(s.smallest_step);
    j["largest_step"] = json_number(s.largest_step);
    j["how"] = s.how;
    return j;
}

} // namespace stepcert
