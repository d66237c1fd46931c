#pragma once
// The readable plain-text form of a step certificate, for a verification report: a title line,
// aligned "label: value" lines (what was certified, the answer, the evidence, the cost), then the
// cautions. Errors are in tolerance units (<= 1 meets the tolerance), as in step_certificate.
#include <cmath>
#include <cstddef>
#include <cstdio>
#include <ostream>
#include <sstream>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

#include "stepcert/certify/certificate.hpp"
#include "stepcert/core/norm.hpp"
#include "stepcert/core/number_text.hpp"
#include "stepcert/report/certificate_caution.hpp"

namespace stepcert {

namespace detail {

/// `x` printed with the printf format `fmt`; NaN "n/a", infinities "inf"/"-inf".
inline std::string certificate_number(double x, const char* fmt) { return formatted_number(x, fmt, "n/a"); }

/// What each level rests on. No default label: -Wswitch flags a level added later.
inline std::string_view evidence_in_words(evidence_level l) {
    switch (l) {
    case evidence_level::reference_verified:
        return "a run at the certified step, compared with a multiprecision reference, met the tolerance at the output times checked";
    case evidence_level::estimated:
        return "an estimate from successive runs times a safety factor meets the tolerance (its case below)";
    case evidence_level::bounded: return "a rigorous bound from user-given constants meets the tolerance";
    case evidence_level::not_certified: return "the evidence supports no step";
    }
    return "?";
}

/// The case an estimate rests on, in words. No default label: -Wswitch flags a case added later.
inline std::string_view evidence_case_in_words(order_evidence e) {
    switch (e) {
    case order_evidence::none: return "none";
    case order_evidence::declared_confirmed:
        return "declared order confirmed: three runs show it, Richardson with the observed order (at most the declared)";
    case order_evidence::above_declared:
        return "observed order above the declared: Richardson with the declared order (conservative when the error falls "
               "faster), the safety factor of an unconfirmed order";
    case order_evidence::round_off_plateau:
        return "runs agree to round-off: the difference from the plateau's first run plus its rounding, the safety factor "
               "of an unconfirmed order";
    }
    return "?";
}

/// "value", or `none` when x is NaN (a figure that was not formed).
inline std::string certificate_figure(double x, const char* none) {
    return std::isnan(x) ? std::string(none) : certificate_number(x, "%.3e");
}

inline std::vector<std::pair<std::string, std::string>> certificate_rows(const step_certificate& c) {
    using S = std::string;
    std::vector<std::pair<S, S>> rows;

    S problem = c.problem.empty() ? S("(unnamed)") : c.problem;
    problem += ", dimension ";
    problem += std::to_string(c.dimension);
    rows.emplace_back("problem", problem);

    S method = c.method.empty() ? S("(unnamed)") : c.method;
    method += ", declared order ";
    method += std::to_string(c.declared_order);
    method += std::isnan(c.observed_order) ? S(", observed order not measured") : ", observed order " + certificate_number(c.observed_order, "%.2f");
    rows.emplace_back("method", method);

    S interval = "[";
    interval += certificate_number(c.t0, "%g");
    interval += ", ";
    interval += certificate_number(c.t1, "%g");
    interval += ']';
    rows.emplace_back("interval", interval);

    S tolerance = "atol ";
    tolerance += certificate_number(c.tolerance.atol, "%g");
    tolerance += ", rtol ";
    tolerance += certificate_number(c.tolerance.rtol, "%g");
    tolerance += c.tolerance.kind == norm_kind::max ? ", max norm over components" : ", rms norm over components";
    rows.emplace_back("tolerance", tolerance);

    S measured = c.measured_at == error_measured_at::final_time ? "the final time only" : "every output time";
    measured += " (";
    measured += std::to_string(c.output_times);
    measured += c.output_times == 1 ? " output time)" : " evenly spaced output times)";
    if (!c.breakpoints.empty()) measured += ", spread over the segments between breakpoints";
    rows.emplace_back("error measured at", measured);
    if (!c.breakpoints.empty()) {
        S breaks = "t = ";
        for (std::size_t i = 0; i < c.breakpoints.size(); ++i) breaks += (i ? ", " : "") + certificate_number(c.breakpoints[i], "%.10g");
        breaks += " (the runs land on each, with uniform steps of at most h within each segment)";
        rows.emplace_back("breakpoints", breaks);
    }
    rows.emplace_back("error unit", "the tolerance: an error <= 1 meets it");

    S evidence(to_string(c.level));
    evidence += " - ";
    evidence += evidence_in_words(c.level);
    rows.emplace_back("evidence", evidence);

    if (c.issued() && std::isfinite(c.controller_atol)) {
        S step = "controller atol ";
        step += certificate_number(c.controller_atol, "%.3e");
        step += ", rtol ";
        step += certificate_number(c.controller_rtol, "%.3e");
        step += " (";
        step += std::to_string(c.steps);
        step += " accepted steps)";
        rows.emplace_back("certified tolerance", step);
    } else if (c.issued()) {
        S step = "h = ";
        step += certificate_number(c.step, "%.3e");
        step += " (";
        step += std::to_string(c.steps);
        step += c.steps == 1 ? " step)" : " steps)";
        rows.emplace_back("certified step", step);
    } else {
        rows.emplace_back("certified step", "no step certified");
    }
    if (c.issued() && c.limited_by != step_limited_by::none)
        rows.emplace_back("step set by", c.limited_by == step_limited_by::stability
                                             ? "stability: a larger step leaves the method's stability region (or blew up), "
                                               "while the accuracy would allow more"
                                             : "accuracy: a larger step does not meet the tolerance");
    if (!c.issued() || c.reason != refusal::none) {
        S reason(c.reason == refusal::none ? std::string_view("none given") : to_string(c.reason));
        if (!c.reason_detail.empty()) {
            reason += " - ";
            reason += c.reason_detail;
        }
        rows.emplace_back("reason", reason);
    }

    S estimate = certificate_figure(c.estimated_error, "not estimated");
    if (!c.basis.empty()) {
        estimate += " (basis: ";
        estimate += c.basis;
        estimate += ')';
    }
    rows.emplace_back("estimated error", estimate);
    if (c.evidence != order_evidence::none) rows.emplace_back("estimate case", S(evidence_case_in_words(c.evidence)));
    rows.emplace_back("safety factor", std::isnan(c.safety_factor) ? S("none") : certificate_number(c.safety_factor, "%.3g"));
    S band = certificate_figure(c.error_band, "none");
    if (!std::isnan(c.error_band)) band += " (safety factor on Richardson's part; the figure judged against the tolerance)";
    rows.emplace_back("error band", band);
    rows.emplace_back("bound", certificate_figure(c.bound, "none given"));

    if (std::isnan(c.reference_error) && std::isnan(c.reference_digits)) {
        rows.emplace_back("reference error", "no reference used");
    } else {
        S reference = certificate_figure(c.reference_error, "not measured");
        reference += "; the reference vouches for ";
        reference += certificate_number(c.reference_digits, "%.1f");
        reference += " digits";
        rows.emplace_back("reference error", reference);
    }

    if (c.stability.checked) {
        S stability = c.stability.stable ? "stable" : "NOT stable";
        stability += ", margin ";
        stability += certificate_number(c.stability.margin, "%.3g");
        stability += " (step limit / h), step limit ";
        stability += certificate_number(c.stability.step_limit, "%.3e");
        if (!c.stability.worst_mode.empty()) {
            stability += ", worst mode ";
            stability += c.stability.worst_mode;
        }
        rows.emplace_back("stability", stability);
    } else {
        rows.emplace_back("stability", "not checked (no stability function known for the method)");
    }

    S evaluations = std::to_string(c.evaluations);
    evaluations += " in double-precision runs, ";
    evaluations += std::to_string(c.reference_evaluations);
    evaluations += " for the reference";
    rows.emplace_back("evaluations", evaluations);
    rows.emplace_back("library", "stepcert " + c.library);
    return rows;
}

} // namespace detail

/// Writes the certificate as readable text: title, aligned "label: value" lines, the cautions.
inline void write_certificate_text(std::ostream& os, const step_certificate& c) {
    os << "stepcert step certificate: ";
    if (c.issued())
        os << "step certified (" << to_string(c.level) << ")\n";
    else
        os << "no step certified\n";
    const auto rows = detail::certificate_rows(c);
    std::size_t width = 0;
    for (const auto& r : rows) width = r.first.size() > width ? r.first.size() : width;
    for (const auto& r : rows) os << r.first << ':' << std::string(width - r.first.size() + 1, ' ') << r.second << '\n';
    os << "cautions:\n";
    for (std::string_view line : certificate_cautions) os << "- " << line << '\n';
}

inline std::string certificate_text(const step_certificate& c) {
    std::ostringstream os;
    write_certificate_text(os, c);
    return os.str();
}

} // namespace stepcert
