#pragma once
// What a cost–accuracy sweep measures: one point per (method, setting), and the sweep's result.
// A point whose run fails (non-finite state, budget, controller giving up) keeps its place with a
// status and a message, and its error is +infinity: a failed run never reads as a small error.
#include <algorithm>
#include <cmath>
#include <cstddef>
#include <limits>
#include <string>
#include <string_view>
#include <vector>

#include "stepcert/core/norm.hpp"
#include "stepcert/methods/method.hpp"

namespace stepcert {

enum class sweep_kind { fixed_step, adaptive };

enum class sweep_status {
    ok,           ///< ran to the end; error measured
    non_finite,   ///< the solution (or its error) became NaN or infinite
    budget,       ///< the run exceeded sweep_options::max_evaluations
    unreachable,  ///< the method's controller could not reach the tolerance (step size underflow)
    failed        ///< another stepcert error (its message says which)
};

inline constexpr std::string_view to_string(sweep_kind k) {
    switch (k) {
    case sweep_kind::fixed_step: return "fixed_step";
    case sweep_kind::adaptive: return "adaptive";
    }
    return "unknown";
}

inline constexpr std::string_view to_string(sweep_status s) {
    switch (s) {
    case sweep_status::ok: return "ok";
    case sweep_status::non_finite: return "non_finite";
    case sweep_status::budget: return "budget";
    case sweep_status::unreachable: return "unreachable";
    case sweep_status::failed: return "failed";
    }
    return "unknown";
}

/// Where on its ladder a point sits: a step count (fixed step) or controller tolerances (adaptive).
struct sweep_setting {
    sweep_kind kind = sweep_kind::fixed_step;
    std::size_t steps = 0;            ///< fixed step: number of uniform steps over [t0, t1]
    controller_tolerance tolerance{}; ///< adaptive: atol and rtol handed to the controller

    static sweep_setting fixed(std::size_t n) { return {sweep_kind::fixed_step, n, {}}; }
    static sweep_setting adaptive(controller_tolerance tol) { return {sweep_kind::adaptive, 0, tol}; }

    /// One number for the setting, the one cost–accuracy answers interpolate: the step count, or
    /// the larger of atol and rtol.
    double value() const {
        return kind == sweep_kind::fixed_step ? static_cast<double>(steps) : std::max(tolerance.atol, tolerance.rtol);
    }
};

struct sweep_point {
    std::string method;             ///< method name
    std::size_t method_index = 0;   ///< order in which the method was added to the sweep
    int declared_order = 0;         ///< 0 for variable-order methods
    sweep_setting setting;
    /// Max over the output grid of the weighted norm of (run - truth); +infinity unless ok.
    double error = std::numeric_limits<double>::infinity();
    std::size_t evaluations = 0;    ///< right-hand-side evaluations of one run (0 unless ok)
    std::size_t steps = 0;          ///< accepted steps
    std::size_t rejected = 0;       ///< rejected step attempts (adaptive)
    double seconds_median = std::numeric_limits<double>::quiet_NaN();  ///< wall time per run
    double seconds_min = std::numeric_limits<double>::quiet_NaN();
    double seconds_max = std::numeric_limits<double>::quiet_NaN();
    std::size_t repeats = 0;        ///< runs timed (1 when the first run failed)
    sweep_status status = sweep_status::failed;
    std::string message;            ///< why the point failed; empty when ok

    bool ok() const { return status == sweep_status::ok; }
};

struct sweep_result {
    std::string problem;
    std::size_t dimension = 0;
    double t0 = 0.0;
    double t1 = 0.0;
    std::size_t output_times = 1;   ///< errors are taken at t0 + j (t1 - t0) / output_times, j = 1..output_times
    weighted_norm norm{};
    std::string truth;              ///< "exact solution" or how the reference was computed
    double truth_digits = 0.0;      ///< digits vouched for by the truth
    std::size_t truth_evaluations = 0;
    std::vector<std::string> methods;  ///< in the order added; sweep_point::method_index indexes it
    std::vector<sweep_point> points;   ///< methods in the order added, each ladder in the order given

    /// The points of one method, in ladder order.
    std::vector<sweep_point> points_of(std::size_t method_index) const {
        std::vector<sweep_point> out;
        for (const sweep_point& p : points)
            if (p.method_index == method_index) out.push_back(p);
        return out;
    }
};

} // namespace stepcert
