#pragma once
// The runs a fixed-step certification makes, kept by step count, with the budget and the
// measures it needs: the error of one run against another or against the truth, in tolerance
// units, over the output grid or at t1 only.
#include <algorithm>
#include <array>
#include <cmath>
#include <cstddef>
#include <limits>
#include <map>
#include <optional>
#include <string>
#include <utility>
#include <vector>

#include "stepcert/certify/certify_options.hpp"
#include "stepcert/core/error.hpp"
#include "stepcert/core/norm.hpp"
#include "stepcert/core/round_off.hpp"
#include "stepcert/run/run.hpp"

namespace stepcert::detail {

/// The largest error over grid points 1 .. points - 1 (point 0 is t0, where every run starts from
/// y0), or the last point's alone; NaN and inf win: never a small error.
template <class F>
double worst_on_grid(error_measured_at where, std::size_t points, F&& at_point) {
    if (where == error_measured_at::final_time) return at_point(points - 1);
    double worst = 0.0;
    for (std::size_t j = 1; j < points; ++j) {
        const double e = at_point(j);
        if (!(e <= worst)) worst = e;
        if (std::isnan(worst)) return std::numeric_limits<double>::infinity();
    }
    return worst;
}

template <class P, class M>
class certify_runs {
public:
    using state = rebind_state<typename P::state_type, double>;
    using run_type = trajectory<state>;

    certify_runs(const P& p, const M& m, const weighted_norm& tol, const certify_options& opt)
        : p_(p), m_(m), tol_(tol), opt_(opt) {}

    /// The run with n steps (n a multiple of the grid), made once. Throws what run_uniform
    /// throws: budget_exhausted, non_finite_value (a failed run's again, with its site).
    const run_type& at(std::size_t n) {
        auto it = runs_.find(n);
        if (it != runs_.end()) return it->second;
        if (auto f = failed_.find(n); f != failed_.end()) throw f->second;
        run_options ro;
        ro.max_evaluations = opt_.max_evaluations - std::min(opt_.max_evaluations, evaluations_);
        const auto out_of_budget = [&] {
            return budget_exhausted("stepcert::certify: the evaluation budget of " + std::to_string(opt_.max_evaluations) +
                                    " (certify_options::max_evaluations) ran out at the run with " + std::to_string(n) +
                                    " steps, " + std::to_string(evaluations_) +
                                    " having been spent on the runs before it; raise max_evaluations, or loosen the tolerance.");
        };
        if (ro.max_evaluations == 0) throw out_of_budget();
        try {
            auto run = run_uniform<double>(p_, m_, n, n / opt_.output_times, ro);
            evaluations_ += run.stats.evaluations;
            // A run that blew up reports no count: it is charged as if it had finished, at the
            // rate of the first run that did (an upper bound).
            evaluations_ += failed_steps_ * run.stats.evaluations / n;
            failed_steps_ = 0;
            return runs_.emplace(n, std::move(run)).first->second;
        } catch (const budget_exhausted&) {
            evaluations_ = opt_.max_evaluations;
            throw out_of_budget();
        } catch (const non_finite_value& e) {
            failed_.emplace(n, e);
            // Charged what it spent when the run measured it; else as if it had finished, at the
            // rate of the first run that does (an upper bound).
            if (e.site() != nullptr)
                evaluations_ += e.site()->evaluations;
            else
                failed_steps_ += n;
            throw;
        }
    }

    /// The failure of the run with n steps, if it blew up.
    const non_finite_value* failure(std::size_t n) const {
        const auto f = failed_.find(n);
        return f == failed_.end() ? nullptr : &f->second;
    }

    /// Largest |y_i| over the run's output states, and the time where it is.
    std::pair<double, double> largest_value(std::size_t n) {
        const auto& r = at(n);
        std::pair<double, double> out{0.0, static_cast<double>(r.times.front())};
        for (std::size_t j = 0; j < r.states.size(); ++j)
            for (std::size_t i = 0; i < state_size(r.states[j]); ++i)
                if (std::abs(r.states[j][i]) > out.first) out = {std::abs(r.states[j][i]), static_cast<double>(r.times[j])};
        return out;
    }

    /// Where a purely relative tolerance (atol = 0) cannot judge the run with a steps against
    /// `scale_at(j)` (another run's states, or the truth's) at output j: a component whose value
    /// there is no larger than its difference (|y_a - y_s| >= |y_s| / 2: zero, or zero up to the
    /// runs' own error). Returns (component, time, value, difference), or nullopt if none.
    template <class Scale>
    std::optional<std::array<double, 4>> value_within_its_error(std::size_t a, const Scale& scale_at) {
        if (tol_.atol > 0.0) return std::nullopt;
        const auto& ra = at(a);
        for (std::size_t j = 1; j < ra.states.size(); ++j) {
            const state& scale = scale_at(j);
            for (std::size_t i = 0; i < state_size(scale); ++i) {
                const double d = std::abs(ra.states[j][i] - scale[i]);
                if (d > 0.0 && d >= 0.5 * std::abs(scale[i]))
                    return std::array<double, 4>{static_cast<double>(i), static_cast<double>(ra.times[j]), scale[i], d};
            }
        }
        return std::nullopt;
    }

    /// Largest (or final) weighted difference between two runs' states on the grid.
    double difference(std::size_t a, std::size_t b) {
        const auto& ra = at(a);
        const auto& rb = at(b);
        return measure([&](std::size_t j) { return tol_(ra.states[j], rb.states[j]); }, ra.states.size());
    }

    /// Largest (or final) weighted error of the run with n steps against truth[j - 1] at grid point j.
    template <class Truth>
    double error_against(std::size_t n, const Truth& truth) {
        const auto& r = at(n);
        return measure([&](std::size_t j) { return tol_(r.states[j], truth[j - 1]); }, r.states.size());
    }

    /// The round-off level of a run with n steps, in tolerance units: factor sqrt(n) eps |y| at
    /// the run's largest state (rounding of early large values stays in the result).
    double round_off_floor_units(std::size_t n) {
        const auto& r = at(n);
        double units = 0.0;
        for (const auto& y : r.states) {
            state e = y;
            for (std::size_t i = 0; i < state_size(e); ++i)
                e[i] = round_off_floor(opt_.round_off_factor, n, std::numeric_limits<double>::epsilon(), std::abs(y[i]));
            units = std::max(units, tol_.of_difference(e, y));
        }
        return units;
    }

    std::size_t evaluations() const { return evaluations_; }

    /// Step counts of the runs completed so far, ascending.
    std::vector<std::size_t> completed() const {
        std::vector<std::size_t> out;
        for (const auto& [n, run] : runs_) out.push_back(n);
        return out;
    }

private:
    template <class F>
    double measure(F&& at_point, std::size_t points) const {
        return worst_on_grid(opt_.measured_at, points, at_point);
    }

    const P& p_;
    const M& m_;
    weighted_norm tol_;
    certify_options opt_;
    std::map<std::size_t, run_type> runs_;
    std::map<std::size_t, non_finite_value> failed_;  ///< runs that blew up, by step count: not run twice
    std::size_t failed_steps_ = 0;               ///< their steps, not yet charged
    std::size_t evaluations_ = 0;
};

} // namespace stepcert::detail
