#pragma once
// A cost–accuracy sweep: one problem, several methods of different types, each over its own
// ladder (step counts for fixed-step methods, controller tolerances for adaptive ones). run()
// computes the truth once, then runs every point in parallel and measures its error over the
// output grid, its cost and its wall time.
//
// Threads. Points are independent, so N workers pull point indices from an atomic counter and
// write each result to its own slot: the result does not depend on the number of threads or the
// order in which points finish (errors, evaluations and steps are bitwise those of a 1-thread
// run; only wall times differ). What the workers share, and why that is safe:
//  * the problem: used const. run_uniform / run_adaptive copy its right-hand side into the run
//    (`local_rhs`) and count evaluations in a counter of their own, so the right-hand side's
//    call operator must be const and must not write shared state (a function object that
//    counts its calls in a global, or caches into a captured pointer, would race);
//  * the methods: copied into the sweep when added and used const; every run builds its own
//    odeint stepper and state (odeint_fixed_step, odeint_controlled, odeint_dense_output);
//  * the truth: computed before the workers start and only read by them;
//  * the progress callback: called under the sweep's lock, one call at a time.
// Two sweeps may run at once (no global state); one sweep object must not run() from two threads.
#include <algorithm>
#include <atomic>
#include <chrono>
#include <cmath>
#include <cstddef>
#include <exception>
#include <functional>
#include <limits>
#include <memory>
#include <mutex>
#include <optional>
#include <string>
#include <system_error>
#include <thread>
#include <utility>
#include <vector>

#include "stepcert/core/error.hpp"
#include "stepcert/core/number_text.hpp"
#include "stepcert/core/problem.hpp"
#include "stepcert/core/state.hpp"
#include "stepcert/methods/method.hpp"
#include "stepcert/reference/reference_result.hpp"
#include "stepcert/run/run.hpp"
#include "stepcert/run/trajectory.hpp"
#include "stepcert/sweep/detail/sweep_truth.hpp"
#include "stepcert/sweep/sweep_options.hpp"
#include "stepcert/sweep/sweep_point.hpp"

namespace stepcert {

template <problem_like P>
class cost_accuracy_sweep {
public:
    using problem_type = P;
    using scalar_type = typename P::scalar_type;
    using run_state = rebind_state<typename P::state_type, scalar_type>;
    using truth_state = rebind_state<typename P::state_type, double>;

    explicit cost_accuracy_sweep(P problem, sweep_options options = {})
        : problem_(std::make_shared<const P>(std::move(problem))), options_(std::move(options)) {
        const std::string who = "stepcert::cost_accuracy_sweep: ";
        detail::refuse_breakpoints(*problem_, "stepcert::cost_accuracy_sweep");
        if (options_.output_times == 0)
            throw invalid_input(who + "sweep_options::output_times is 0; give at least 1 (1 measures the error at t1 only).");
        if (options_.repeats == 0)
            throw invalid_input(who + "sweep_options::repeats is 0; give at least 1 timed run per point (3 to 5 give a steadier median).");
        if (options_.max_evaluations == 0)
            throw invalid_input(who + "sweep_options::max_evaluations is 0; give the budget of one run in right-hand-side evaluations.");
        if (options_.truth_digits < 1)
            throw invalid_input(who + "sweep_options::truth_digits must be >= 1 (17 suits double runs).");
        options_.norm.validate();
    }

    /// Adds a fixed-step method over the given step counts (each >= 1 and a multiple of
    /// sweep_options::output_times). The method is copied.
    template <class M>
    cost_accuracy_sweep& add_fixed_step(const M& method, const std::vector<std::size_t>& step_counts) {
        static_assert(fixed_step_method<M>,
                      "stepcert::cost_accuracy_sweep::add_fixed_step: the method must be a fixed-step method (name(), order(), "
                      "control == step_control::fixed, integrate_uniform(...)); pass adaptive methods to add_adaptive.");
        const std::string name(method.name());
        if (step_counts.empty())
            throw invalid_input(who_adds("add_fixed_step", name) + "the step-count ladder is empty; give at least one step count, e.g. {16, 32, 64, 128}.");
        // A symplectic method on a problem not declared separable would fail at every point: say so now.
        detail::require_separable_if_needed(*problem_, method, "stepcert::cost_accuracy_sweep::add_fixed_step");
        job j{name, method.order(), sweep_kind::fixed_step, {}, {}};
        for (std::size_t k = 0; k < step_counts.size(); ++k) {
            j.ladder.push_back(sweep_setting::fixed(step_counts[k]));
            check_setting(j.ladder.back(), who_adds("add_fixed_step", name), k);
        }
        const std::size_t G = options_.output_times;
        j.run = [p = problem_, method, G](const sweep_setting& s, const run_options& o) {
            return run_uniform(*p, method, s.steps, s.steps / G, o);
        };
        jobs_.push_back(std::move(j));
        return *this;
    }

    /// Adds an adaptive method over the given controller tolerances (atol, rtol each finite and
    /// >= 0, not both zero). The method is copied.
    template <class M>
    cost_accuracy_sweep& add_adaptive(const M& method, const std::vector<controller_tolerance>& tolerances) {
        static_assert(adaptive_method<M>,
                      "stepcert::cost_accuracy_sweep::add_adaptive: the method must be an adaptive method (name(), order(), "
                      "control == step_control::adaptive, integrate_adaptive(...)); pass fixed-step methods to add_fixed_step.");
        const std::string name(method.name());
        if (tolerances.empty())
            throw invalid_input(who_adds("add_adaptive", name) + "the tolerance ladder is empty; give at least one tolerance, e.g. {1e-4, 1e-6, 1e-8}.");
        job j{name, method.order(), sweep_kind::adaptive, {}, {}};
        for (std::size_t k = 0; k < tolerances.size(); ++k) {
            j.ladder.push_back(sweep_setting::adaptive(tolerances[k]));
            check_setting(j.ladder.back(), who_adds("add_adaptive", name), k);
        }
        const std::vector<scalar_type> times = uniform_times{options_.output_times}.in<scalar_type>(
            static_cast<scalar_type>(problem_->t0()), static_cast<scalar_type>(problem_->t1()));
        j.run = [p = problem_, method, times](const sweep_setting& s, const run_options& o) {
            return run_adaptive(*p, method, s.tolerance, times, o);
        };
        jobs_.push_back(std::move(j));
        return *this;
    }

    /// The same with atol = rtol = tol for every tolerance of the ladder (each finite and > 0).
    template <class M>
    cost_accuracy_sweep& add_adaptive(const M& method, const std::vector<double>& tolerances) {
        std::vector<controller_tolerance> tols;
        for (std::size_t k = 0; k < tolerances.size(); ++k) {
            if (!(tolerances[k] > 0.0) || !std::isfinite(tolerances[k]))
                throw invalid_input(who_adds("add_adaptive", std::string(method.name())) + "tolerance " + std::to_string(k) + " is " +
                                    detail::formatted_number(tolerances[k], "%g") +
                                    "; every tolerance must be finite and > 0 (e.g. {1e-4, 1e-6, 1e-8}).");
            tols.push_back({tolerances[k], tolerances[k]});
        }
        return add_adaptive(method, tols);
    }

    const P& problem() const { return *problem_; }
    const sweep_options& options() const { return options_; }
    std::size_t method_count() const { return jobs_.size(); }
    const std::string& method_name(std::size_t i) const { return jobs_.at(i).name; }
    sweep_kind method_kind(std::size_t i) const { return jobs_.at(i).kind; }
    std::size_t point_count() const {
        std::size_t n = 0;
        for (const job& j : jobs_) n += j.ladder.size();
        return n;
    }

    /// Runs every point on options().threads workers; throws accuracy_unreachable when no truth
    /// can be had, invalid_input when no method was added. A point that fails is recorded with
    /// its status, never thrown.
    sweep_result run() {
        if (jobs_.empty())
            throw invalid_input("stepcert::cost_accuracy_sweep::run: no methods added; call add_fixed_step(method, step_counts) "
                                "or add_adaptive(method, tolerances) first.");
        ensure_truth();
        std::vector<std::pair<std::size_t, std::size_t>> index;  // (method, ladder position)
        for (std::size_t m = 0; m < jobs_.size(); ++m)
            for (std::size_t k = 0; k < jobs_[m].ladder.size(); ++k) index.emplace_back(m, k);
        const std::size_t total = index.size();
        // Longest first, so the last worker is not left alone with the largest run: fixed-step
        // points by step count (their cost), adaptive ones first, tightest tolerance first (their
        // cost is known only after the run). Results still go to their own slots.
        std::vector<std::size_t> order(total);
        for (std::size_t i = 0; i < total; ++i) order[i] = i;
        auto cost_rank = [&](std::size_t i) {
            const sweep_setting& s = jobs_[index[i].first].ladder[index[i].second];
            return s.kind == sweep_kind::fixed_step ? static_cast<double>(s.steps) : std::numeric_limits<double>::infinity();
        };
        auto tightness = [&](std::size_t i) { return jobs_[index[i].first].ladder[index[i].second].value(); };
        std::stable_sort(order.begin(), order.end(), [&](std::size_t a, std::size_t b) {
            const double ca = cost_rank(a), cb = cost_rank(b);
            if (ca != cb) return ca > cb;
            return std::isinf(ca) && tightness(a) < tightness(b);
        });
        std::vector<sweep_point> points(total);
        std::vector<std::exception_ptr> failures(total);
        std::atomic<std::size_t> next{0};
        std::mutex progress_lock;
        std::size_t done = 0;
        auto worker = [&] {
            for (;;) {
                const std::size_t k = next.fetch_add(1, std::memory_order_relaxed);
                if (k >= total) return;
                const std::size_t i = order[k];
                try {
                    points[i] = measure(index[i].first, jobs_[index[i].first].ladder[index[i].second], options_.repeats);
                    if (options_.progress) {
                        const std::lock_guard<std::mutex> lock(progress_lock);
                        options_.progress(++done, total);
                    }
                } catch (...) {
                    failures[i] = std::current_exception();  // not a stepcert error: rethrown after the join
                }
            }
        };
        std::size_t threads = options_.threads == 0 ? std::max<std::size_t>(1, std::thread::hardware_concurrency()) : options_.threads;
        threads = std::min(threads, total);
        std::vector<std::thread> helpers;
        for (std::size_t t = 1; t < threads; ++t) {
            try {
                helpers.emplace_back(worker);
            } catch (const std::system_error&) {
                break;  // fewer threads than asked: the points still all run
            }
        }
        worker();
        for (std::thread& t : helpers) t.join();
        for (const std::exception_ptr& f : failures)
            if (f) std::rethrow_exception(f);

        sweep_result r;
        r.problem = problem_->name();
        r.dimension = state_size(problem_->y0());
        r.t0 = static_cast<double>(problem_->t0());
        r.t1 = static_cast<double>(problem_->t1());
        r.output_times = options_.output_times;
        r.norm = options_.norm;
        r.truth = truth_->how;
        r.truth_digits = truth_->digits;
        r.truth_evaluations = truth_->evaluations;
        for (const job& j : jobs_) r.methods.push_back(j.name);
        r.points = std::move(points);
        return r;
    }

    /// One more point of method `method_index` at `setting` (one run, in the calling thread): what
    /// cheapest_method confirms its answer with. The setting is checked as a ladder entry.
    sweep_point run_point(std::size_t method_index, const sweep_setting& setting) {
        if (method_index >= jobs_.size())
            throw invalid_input("stepcert::cost_accuracy_sweep::run_point: method index " + std::to_string(method_index) + " but only " +
                                std::to_string(jobs_.size()) + " methods were added.");
        const job& j = jobs_[method_index];
        if (setting.kind != j.kind)
            throw invalid_input("stepcert::cost_accuracy_sweep::run_point: method '" + j.name + "' is " + std::string(to_string(j.kind)) +
                                " but the setting is " + std::string(to_string(setting.kind)) + ".");
        check_setting(setting, "stepcert::cost_accuracy_sweep::run_point: method '" + j.name + "': ", 0);
        ensure_truth();
        return measure(method_index, setting, 1);
    }

private:
    struct job {
        std::string name;
        int order = 0;
        sweep_kind kind = sweep_kind::fixed_step;
        std::vector<sweep_setting> ladder;
        std::function<trajectory<run_state>(const sweep_setting&, const run_options&)> run;
    };

    static std::string who_adds(const char* what, const std::string& method) {
        std::string s = "stepcert::cost_accuracy_sweep::";
        s += what;
        s += ": method '";
        s += method;
        s += "': ";
        return s;
    }

    void check_setting(const sweep_setting& s, const std::string& who, std::size_t k) const {
        const std::size_t G = options_.output_times;
        if (s.kind == sweep_kind::fixed_step) {
            if (s.steps == 0)
                throw invalid_input(who + "step count " + std::to_string(k) + " is 0; give step counts >= 1.");
            if (s.steps % G != 0)
                throw invalid_input(who + "step count " + std::to_string(s.steps) + " is not a multiple of sweep_options::output_times = " +
                                    std::to_string(G) + " (the output times must fall on steps); use e.g. " +
                                    std::to_string((s.steps / G + 1) * G) + ".");
        } else {
            const auto& t = s.tolerance;
            if (!(t.atol >= 0.0) || !(t.rtol >= 0.0) || !std::isfinite(t.atol) || !std::isfinite(t.rtol) || (t.atol == 0.0 && t.rtol == 0.0))
                throw invalid_input(who + "tolerance " + std::to_string(k) + " (atol " + detail::formatted_number(t.atol, "%g") + ", rtol " +
                                    detail::formatted_number(t.rtol, "%g") +
                                    ") must have atol and rtol finite and >= 0, not both zero (e.g. atol = rtol = 1e-6).");
        }
    }

    void ensure_truth() {
        if (!truth_) truth_ = detail::sweep_truth_for(*problem_, options_.output_times, options_.truth_digits);
    }

    /// Max over the output grid of the norm of (run - truth); +infinity when anything is not finite.
    double grid_error(const trajectory<run_state>& tr) const {
        double worst = 0.0;
        for (std::size_t j = 0; j < truth_->states.size(); ++j) {
            const double e = options_.norm(tr.states[j + 1], truth_->states[j]);
            if (!(e <= std::numeric_limits<double>::max())) return std::numeric_limits<double>::infinity();
            worst = std::max(worst, e);
        }
        return worst;
    }

    sweep_point measure(std::size_t method_index, const sweep_setting& setting, std::size_t repeats) const {
        using clock = std::chrono::steady_clock;
        const job& j = jobs_[method_index];
        sweep_point pt;
        pt.method = j.name;
        pt.method_index = method_index;
        pt.declared_order = j.order;
        pt.setting = setting;
        const run_options ro{options_.max_evaluations};
        std::vector<double> seconds;
        for (std::size_t r = 0; r < repeats; ++r) {
            const auto start = clock::now();
            auto elapsed = [&] { return std::chrono::duration<double>(clock::now() - start).count(); };
            try {
                const trajectory<run_state> tr = j.run(setting, ro);
                seconds.push_back(elapsed());
                if (r > 0) continue;  // later repeats are for timing; the run is deterministic
                if (tr.states.size() != truth_->states.size() + 1) {
                    pt.status = sweep_status::failed;
                    pt.message = "the run returned " + std::to_string(tr.states.size()) + " output states, expected " +
                                 std::to_string(truth_->states.size() + 1) + ".";
                    break;
                }
                pt.evaluations = tr.stats.evaluations;
                pt.steps = tr.stats.steps;
                pt.rejected = tr.stats.rejected;
                pt.error = grid_error(tr);
                if (std::isinf(pt.error)) {
                    pt.status = sweep_status::non_finite;
                    pt.message = "the error against the truth is not finite (the solution overflowed); use a smaller step or tolerance.";
                    pt.evaluations = pt.steps = pt.rejected = 0;
                    break;
                }
                pt.status = sweep_status::ok;
            } catch (const non_finite_value& e) {
                fail(pt, sweep_status::non_finite, e.what(), seconds, elapsed());
                break;
            } catch (const budget_exhausted& e) {
                fail(pt, sweep_status::budget, e.what(), seconds, elapsed());
                break;
            } catch (const accuracy_unreachable& e) {
                fail(pt, sweep_status::unreachable, e.what(), seconds, elapsed());
                break;
            } catch (const error& e) {
                fail(pt, sweep_status::failed, e.what(), seconds, elapsed());
                break;
            }
        }
        pt.repeats = seconds.size();
        std::sort(seconds.begin(), seconds.end());
        const std::size_t n = seconds.size();
        pt.seconds_min = seconds.front();
        pt.seconds_max = seconds.back();
        pt.seconds_median = n % 2 == 1 ? seconds[n / 2] : 0.5 * (seconds[n / 2 - 1] + seconds[n / 2]);
        return pt;
    }

    static void fail(sweep_point& pt, sweep_status s, const char* what, std::vector<double>& seconds, double elapsed) {
        pt.status = s;
        pt.message = what;
        pt.error = std::numeric_limits<double>::infinity();
        pt.evaluations = pt.steps = pt.rejected = 0;
        seconds.push_back(elapsed);
    }

    std::shared_ptr<const P> problem_;
    sweep_options options_;
    std::vector<job> jobs_;
    std::optional<detail::grid_truth<truth_state>> truth_;
};

} // namespace stepcert
