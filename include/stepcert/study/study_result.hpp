#pragma once
// Options and result of an order study (plain values: printable, exportable, comparable).
#include <cmath>
#include <cstddef>
#include <limits>
#include <string>
#include <string_view>
#include <vector>

#include "stepcert/core/error.hpp"
#include "stepcert/core/norm.hpp"
#include "stepcert/methods/method.hpp"
#include "stepcert/run/run.hpp"
#include "stepcert/study/asymptotic_range.hpp"
#include "stepcert/study/order_fit.hpp"

namespace stepcert {

/// What the errors are measured against.
enum class error_basis {
    automatic,              ///< exact solution if the problem has one, else a reference solution, else differences
    exact_solution,         ///< the problem's exact solution (multiprecision when it is generic)
    reference_solution,     ///< stepcert::reference_solution at the study's output times
    successive_differences  ///< no reference: |y_k - y_{k-1}| between levels (Richardson's observed order)
};

/// Which error drives the range detection and the fit (both are always recorded).
enum class error_measure { final_time, grid_max };

enum class study_verdict { order_fitted, no_asymptotic_range };

inline std::string_view to_string(error_basis b) {
    switch (b) {
    case error_basis::automatic: return "automatic";
    case error_basis::exact_solution: return "exact_solution";
    case error_basis::reference_solution: return "reference_solution";
    case error_basis::successive_differences: return "successive_differences";
    }
    return "unknown";
}
inline std::string_view to_string(error_measure m) {
    return m == error_measure::final_time ? "final_time" : "grid_max";
}
inline std::string_view to_string(study_verdict v) {
    return v == study_verdict::order_fitted ? "order_fitted" : "no_asymptotic_range";
}
namespace detail {
inline std::string_view step_control_text(step_control c) { return c == step_control::fixed ? "fixed" : "adaptive"; }
} // namespace detail

struct study_options {
    weighted_norm norm{};                                ///< error norm (default: absolute, max over components)
    error_measure fit_measure = error_measure::grid_max; ///< error that drives range detection and fit
    double confidence = 0.95;                            ///< level of the order's confidence interval
    run_options budget{};                                ///< evaluations for all levels together
    error_basis basis = error_basis::automatic;
    int reference_digits = 0;                            ///< digits asked of a reference; 0: working digits + 5
    bool require_reference_digits = false;               ///< a reference that vouches fewer digits is unusable
    std::size_t adaptive_grid_points = 16;               ///< output times for adaptive ladders
    range_settings range{};

    void validate() const {
        norm.validate();
        range.validate();
        if (!(confidence > 0.0 && confidence < 1.0))
            throw invalid_input("stepcert: study_options: confidence must lie strictly between 0 and 1 (e.g. 0.95).");
        if (reference_digits < 0 || reference_digits > 1000)
            throw invalid_input("stepcert: study_options: reference_digits must be in 0 .. 1000 (0 picks working digits + 5).");
        if (adaptive_grid_points == 0 || adaptive_grid_points > 100000)
            throw invalid_input("stepcert: study_options: adaptive_grid_points must be in 1 .. 100000.");
        if (budget.max_evaluations == 0)
            throw invalid_input("stepcert: study_options: the evaluation budget must be at least 1.");
    }
};

/// One refinement level of a study.
struct study_level {
    std::size_t index = 0;
    double h = std::numeric_limits<double>::quiet_NaN();          ///< actual step, or (t1-t0)/accepted steps if adaptive
    double tolerance = std::numeric_limits<double>::quiet_NaN();  ///< controller tolerance (adaptive), NaN if fixed
    std::size_t steps = 0;
    std::size_t rejected = 0;
    std::size_t evaluations = 0;
    /// Error at the final time and max over the common output grid; with successive_differences
    /// these are differences to the previous level (NaN at level 0).
    double error_final = std::numeric_limits<double>::quiet_NaN();
    double error_grid = std::numeric_limits<double>::quiet_NaN();
    double local_order = std::numeric_limits<double>::quiet_NaN();      ///< vs previous level, on the fit measure
    double round_off_floor = std::numeric_limits<double>::quiet_NaN();  ///< on the fit measure
    level_status status = level_status::unsettled;
    std::string note;  ///< why the level is outside the range (empty inside)

    double error(error_measure m) const { return m == error_measure::final_time ? error_final : error_grid; }
};

struct order_study_result {
    std::string problem;
    std::string method;
    int declared_order = 0;
    bool variable_order = false;  ///< the method has no fixed order (e.g. Bulirsch–Stoer); declared_order is 0
    /// Stage order q of the method when it states one (implicit tableau methods), else 0.
    int stage_order = 0;
    /// The fitted order lies below the declared one but not below the stage order: what order
    /// reduction on a stiff problem looks like, stated in verdict_text.
    bool order_reduction = false;
    step_control control = step_control::fixed;
    std::string ladder;  ///< how the levels were built
    double ratio = std::numeric_limits<double>::quiet_NaN();
    int working_digits = 0;  ///< decimal digits of the scalar type the method ran in

    error_basis basis = error_basis::successive_differences;  ///< basis actually used
    std::string basis_detail;                                   ///< how the errors were measured
    double reference_digits = std::numeric_limits<double>::quiet_NaN();  ///< digits of the reference (NaN: none)
    std::size_t reference_evaluations = 0;
    /// The reference was computed once outside this study and shared: its evaluations are not
    /// part of total_evaluations.
    bool reference_shared = false;
    error_measure fit_measure = error_measure::grid_max;
    weighted_norm norm{};
    std::size_t grid_points = 0;  ///< output times compared per level (t0 excluded)

    std::vector<study_level> levels;
    study_verdict verdict = study_verdict::no_asymptotic_range;
    std::string verdict_text;
    std::size_t range_first = 0;  ///< first level in the asymptotic range (when fitted)
    std::size_t range_last = 0;   ///< last level in the asymptotic range (when fitted)
    order_fit fit;                ///< over the range (when fitted)
    std::size_t total_evaluations = 0;

    bool fitted() const { return verdict == study_verdict::order_fitted; }
    /// Fitted order, NaN when no asymptotic range was found.
    double order() const { return fitted() ? fit.order : std::numeric_limits<double>::quiet_NaN(); }
};

} // namespace stepcert
