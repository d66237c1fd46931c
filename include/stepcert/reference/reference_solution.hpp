#pragma once
// reference_solution(problem, digits, times): the solution at the output times, computed from
// the user's own right-hand side in a multiprecision type Real, with the number of significant
// digits its self-check supports ("vouched digits", defined in reference/agreement.hpp).
//
// The runs (figures from bench/bench_reference_cost.cpp; all use odeint's extrapolation
// stepper of order 20 under step control, reference/extrapolation_method.hpp):
//  1. The answer A in Real at tolerance tau_a = 10^-(d+6) (not below Real's floor).
//  2. A narrow check C in a type K at least 10 bits narrower than Real (and more than half as
//     wide) at tau_c = 10^-(d+4), or where K is at its best if that is looser (tighter only
//     grows K's round-off): the narrowest K expected to carry d digits (about
//     bits*log10(2) - 9: float128 up to 25, cpp_bin_float_38 up to 29), else the widest narrower
//     K. The method's actual error runs 500-5000x above its tolerance on the Arenstorf orbit
//     (more at looser tolerances), hence 10^-(d+4). If |A - C| vouches d digits: done.
//  3. Otherwise a same-type check C2 in Real at tau_c; then the answer is tightened 100x at a
//     time, each new answer checked against the previous one, until the digits are reached,
//     the tolerance floor of Real is hit, or a step gains < 0.5 digit.
//
// Why the checks bound the error of the answer returned (an argument, not a proof).
// Let eA, eC be the true errors. |A - C| >= eC - eA, so if eA <= q eC with q < 1, then
// eA <= (q / (1 - q)) |A - C|.
//  * Step 2: C is worse in every source of error: >= 100x looser tolerance (truncation), and
//    >= 2^10 = 1024x the unit round-off, which covers both the arithmetic and the rounding of
//    the problem's data (constants, y0, t) to the working type. q <= 1/2 is a wide margin:
//    bound = |A - C| (kappa 1).
//  * Step 3: C2 shares Real's arithmetic and data rounding, so |A - C2| sees only the
//    truncation error: q <= 3/4 gives 3 |A - C2|. The part it cannot see, round-off and data
//    rounding common to both runs, is taken from step 2: round-off scales with the unit
//    round-off, so it is at most 10 * 2^-(bits(Real) - bits(K)) * |A - C| (factor 10 for
//    safety). bound = 3 |A - C2| + that. (Measured need: at 28 digits on the Arenstorf orbit in
//    cpp_bin_float_38 the same-type difference alone claimed 29.3 digits while the true error,
//    dominated by rounding the data to 128 bits, allowed 29.27.)
//  * Without a narrower type the right-hand side accepts (the double-only path), only step 3
//    runs, with kappa 10 (q up to 0.9): the two runs' round-off is then of one size, and
//    measured on Kepler's problem in long double kappa 3 left a margin of only 0.07 digit. The
//    problem's data are then the user's doubles themselves, so no data rounding is hidden.
// What no check can see: an error in the problem itself (constants given as double literals,
// a wrong right-hand side). The bound is about discretization and round-off only.
#include <algorithm>
#include <cmath>
#include <cstdio>
#include <limits>
#include <string>
#include <type_traits>
#include <utility>
#include <vector>

#include "stepcert/core/error.hpp"
#include "stepcert/core/problem.hpp"
#include "stepcert/core/state.hpp"
#include "stepcert/methods/dormand_prince54.hpp"
#include "stepcert/reference/agreement.hpp"
#include "stepcert/reference/extrapolation_method.hpp"
#include "stepcert/reference/multiprecision_types.hpp"
#include "stepcert/reference/reference_result.hpp"
#include "stepcert/run/run.hpp"

namespace stepcert {
namespace detail {

/// double and long double: too narrow for order-20 extrapolation.
template <class T>
inline constexpr bool narrow_real = significand_bits<T> <= 64;

template <class T>
constexpr const auto& reference_method_for() {
    if constexpr (narrow_real<T>)
        return extrapolation12_adaptive;
    else
        return extrapolation20_adaptive;
}

/// Tightest tolerance asked of T: 10^-(digits10 - 2); for double and long double
/// 10^-(digits10 - 1) (measured: order-12 extrapolation in double still gains down to 1e-14).
template <class T>
double tolerance_floor() {
    return std::pow(10.0, -static_cast<double>(carried_digits<T> - (narrow_real<T> ? 1 : 2)));
}

/// Digits a check type is expected to carry: its precision less 9 digits of round-off growth
/// (measured on the Arenstorf orbit: float128 bottoms out near 25.5 digits, 128 bits near 29.3).
template <class T>
double expected_check_digits() {
    return significand_bits<T> * 0.30102999566398120 - 9.0;
}

inline std::string sci(double x, int prec = 1) {
    char buf[40];
    std::snprintf(buf, sizeof buf, "%.*e", prec, x);
    return buf;
}
inline std::string fixed2(double x) {
    char buf[40];
    std::snprintf(buf, sizeof buf, "%.2f", x);
    return buf;
}

template <class P, class Real, class Checks>
class reference_builder {
public:
    using user_state = typename P::state_type;
    using real_state = rebind_state<user_state, Real>;
    using result_type = reference_result<real_state>;
    /// Output times are held in the wider of the problem's type and Real, so evenly spaced
    /// times (uniform_times) are not rounded to the problem's double first.
    using time_type = wider_scalar_t<typename P::scalar_type, Real>;

    reference_builder(const P& p, int digits, const std::vector<double>& times, const reference_options& opt)
        : reference_builder(p, digits, opt) {
        // The default output time is t1 exactly, in the problem's own scalar type.
        if (times.empty()) times_.push_back(t1_);
        for (std::size_t i = 0; i < times.size(); ++i) {
            if (!std::isfinite(times[i]))
                throw non_finite_value(who_ + "output time " + std::to_string(i) + " is NaN or infinite.");
            time_type t = static_cast<time_type>(times[i]);
            // A double that rounds t0 or t1 of a multiprecision problem means that endpoint.
            const double ulps4 = 4 * std::numeric_limits<double>::epsilon();
            if (std::abs(times[i] - static_cast<double>(t1_)) <= ulps4 * std::abs(static_cast<double>(t1_))) t = t1_;
            if (std::abs(times[i] - static_cast<double>(t0_)) <= ulps4 * std::abs(static_cast<double>(t0_))) t = t0_;
            if (t < t0_ || t > t1_)
                throw invalid_input(who_ + "output time " + time_text(times[i]) + " lies outside [t0, t1] = [" +
                                    time_text(t0_) + ", " + time_text(t1_) + "]; give times inside the problem's interval.");
            if (i > 0 && !(t > times_.back()))
                throw invalid_input(who_ + "output times must increase strictly (time " + std::to_string(i) + " is " +
                                    time_text(times[i]) + " after " + time_text(times[i - 1]) + ").");
            times_.push_back(t);
        }
        finish_times();
    }

    reference_builder(const P& p, int digits, uniform_times grid, const reference_options& opt)
        : reference_builder(p, digits, opt) {
        if (grid.count == 0) throw invalid_input(who_ + "uniform_times needs a count of at least 1.");
        times_ = grid.in<time_type>(t0_, t1_);
        finish_times();
    }

    /// Absolute part of the controller tolerance (per unit of tolerance): relative control down
    /// to 1e-3 of the solution's size. A state that starts at rest (y0 = 0) has no size at t0,
    /// and pure relative control of a zero component divides by zero, so the size is taken over
    /// the whole interval from a cheap pilot run in double, made on first use (after the input
    /// checks, so a refused request costs no evaluation).
    double atol_factor() {
        if (!(atol_factor_ > 0.0)) atol_factor_ = 1e-3 * solution_scale();
        return atol_factor_;
    }

    /// max |y_i(t)| over y0 and a pilot run; 1 if all of it is zero or the pilot fails.
    double solution_scale() {
        using std::abs;
        double scale = 0.0;
        for (std::size_t k = 0; k < p_.dimension(); ++k) scale = std::max(scale, static_cast<double>(abs(p_.y0()[k])));
        if constexpr (P::template rhs_accepts<double>) {
            try {
                std::vector<double> grid;
                const double a = static_cast<double>(p_.t0()), b = static_cast<double>(p_.t1());
                for (int j = 1; j <= 64; ++j) grid.push_back(j == 64 ? b : a + (b - a) * j / 64.0);
                const auto pilot = run_adaptive<double>(p_, dormand_prince54_adaptive, controller_tolerance{1e-8 * std::max(scale, 1e-12), 1e-8},
                                                        grid, run_options{std::min<std::size_t>(opt_.max_evaluations / 4 + 1, 1'000'000)});
                used_ += pilot.stats.evaluations;  // the pilot is part of the reference's cost
                cost_.evaluations += pilot.stats.evaluations;
                for (const auto& y : pilot.states)
                    for (std::size_t k = 0; k < p_.dimension(); ++k) scale = std::max(scale, std::abs(static_cast<double>(y[k])));
            } catch (const error&) {
                // The pilot only sizes the tolerance; the reference runs below report real failures.
            }
        }
        return scale > std::numeric_limits<double>::min() ? scale : 1.0;
    }

    result_type build() {
        if (run_times_.empty()) return initial_value_only();
        if constexpr (P::template rhs_accepts<Real>)
            return build_in_real();
        else
            return build_double_only();
    }

private:
    reference_builder(const P& p, int digits, const reference_options& opt)
        : p_(p), d_(digits), opt_(opt), who_("stepcert::reference_solution: problem '" + p.name() + "': "),
          t0_(static_cast<time_type>(p.t0())), t1_(static_cast<time_type>(p.t1())) {
        if (digits < 1) throw invalid_input(who_ + "digits must be at least 1 (got " + std::to_string(digits) + ").");
    }

    void finish_times() {
        with_t0_ = times_.front() == t0_;
        run_times_.assign(times_.begin() + (with_t0_ ? 1 : 0), times_.end());
    }

    struct run_record {
        std::vector<real_state> states;
        int bits = 0;
    };

    /// Where a search for the digits ended.
    struct outcome {
        run_record answer;
        double digits = 0.0;
        std::string basis;  ///< why the bound holds
        std::string stop;   ///< why it stopped short, if it did
    };

    template <class K>
    run_record run(double tol, const char* role) {
        using k_state = rebind_state<user_state, K>;
        std::vector<K> tk;
        tk.reserve(run_times_.size());
        for (const time_type& t : run_times_) tk.push_back(static_cast<K>(t));
        const double atol_per_tol = atol_factor();  // may run the pilot: before the budget is read
        if (used_ >= opt_.max_evaluations) throw out_of_budget(role);
        const auto& m = reference_method_for<K>();
        trajectory<k_state> tr;
        try {
            tr = run_adaptive<K>(p_, m, controller_tolerance{tol * atol_per_tol, tol}, std::move(tk),
                                 run_options{opt_.max_evaluations - used_});
        } catch (const budget_exhausted&) {
            used_ = opt_.max_evaluations;
            throw out_of_budget(role);
        } catch (const accuracy_unreachable& e) {
            throw accuracy_unreachable(who_ + "the " + std::string(role) + " run in " + real_type_name<K>() +
                                       " failed: " + e.what() + " Ask for fewer digits or use a wider type.");
        }
        used_ += tr.stats.evaluations;
        cost_.steps += tr.stats.steps;
        cost_.rejected += tr.stats.rejected;
        cost_.evaluations += tr.stats.evaluations;
        run_record r;
        r.bits = significand_bits<K>;
        r.states.reserve(run_times_.size());
        for (std::size_t i = 1; i < tr.states.size(); ++i) r.states.push_back(convert_state<real_state>(tr.states[i]));
        log_ += std::string(log_.empty() ? "" : "; ") + role + " in " + real_type_name<K>() + " at tolerance " +
                sci(tol, 0) + " (" + std::to_string(tr.stats.evaluations) + " evaluations)";
        return r;
    }

    /// Largest relative difference between two runs, logged.
    double difference(const run_record& a, const run_record& b) {
        const run_agreement g = compare_runs(a.states, b.states, atol_factor());
        log_ += " [difference " + sci(g.largest_relative_difference) + " at t = " +
                time_text(run_times_[g.worst_index]) + "]";
        return g.largest_relative_difference;
    }

    /// A check type: accepted by the right-hand side, at least 10 bits narrower than W (so at
    /// least 1024x its unit round-off) and more than half as wide (a narrower one could vouch
    /// for too few digits to matter; leaving it out also saves compile time).
    template <class W, class K>
    static constexpr bool usable_check = P::template rhs_accepts<K> && significand_bits<K> + 10 <= significand_bits<W> &&
                                         2 * significand_bits<K> > significand_bits<W>;

    template <class W>
    double digits_of(double relative_bound) const {
        return agreement_digits(relative_bound, 1.0, static_cast<double>(carried_digits<W>));
    }

    /// Index in reference_check_types of the step-2 check type, or -1 if none is usable:
    /// the narrowest expected to carry `target` digits, else the widest.
    template <class W, class... Ks>
    static int choose_check(int target, type_list<Ks...>) {
        int index = 0, chosen = -1, widest = -1;
        (
            [&] {
                if constexpr (usable_check<W, Ks>) {
                    widest = index;
                    if (chosen < 0 && expected_check_digits<Ks>() >= target) chosen = index;
                }
                ++index;
            }(),
            ...);
        return chosen >= 0 ? chosen : widest;
    }

    /// Runs the step-2 check in the type at `index` and returns |A - C| (relative) and its bits.
    template <class W, class... Ks>
    std::pair<double, int> narrow_check(int index, const run_record& answer, double tau_c, type_list<Ks...>) {
        std::pair<double, int> out{std::numeric_limits<double>::infinity(), 0};
        int i = 0;
        (
            [&] {
                if constexpr (usable_check<W, Ks>) {
                    if (i == index) {
                        const run_record check = run<Ks>(tau_c, "check");
                        out = {difference(answer, check), significand_bits<Ks>};
                    }
                }
                ++i;
            }(),
            ...);
        return out;
    }

    /// The check type's best tolerance (no tighter: its round-off would only grow), by index.
    template <class... Ks>
    static double best_check_tolerance(int index, type_list<Ks...>) {
        double out = 0.0;
        int i = 0;
        ((out = (i++ == index ? std::pow(10.0, -(std::floor(expected_check_digits<Ks>()) + 3)) : out)), ...);
        return out;
    }

    /// The three steps of the header comment, in working type W, aiming at `target` digits.
    template <class W>
    outcome search(int target) {
        const double floor = tolerance_floor<W>();
        const int k = choose_check<W>(target, Checks{});
        double tau_a = std::max(std::pow(10.0, -(target + 6)), floor);
        const double tau_c = std::max(std::pow(10.0, -(target + 4)), 100 * tau_a);  // same-type check
        outcome o;
        o.answer = run<W>(tau_a, "answer");

        // Step 2: a narrower check bounds everything at once.
        double roundoff = 0.0;  // common round-off bound for step 3, relative
        std::string roundoff_text = " No narrower type the right-hand side accepts, so round-off is covered by the factor 10 only.";
        if (k >= 0) {
            const auto [r, bits] = narrow_check<W>(k, o.answer, std::max(tau_c, best_check_tolerance(k, Checks{})), Checks{});
            o.digits = digits_of<W>(r);
            o.basis = "the check is at least 100x looser in tolerance and 2^" +
                      std::to_string(significand_bits<W> - bits) +
                      " coarser in round-off, so its difference from the answer bounds the answer's error.";
            if (o.digits >= target) return o;
            roundoff = 10.0 * std::ldexp(r, bits - significand_bits<W>);
            roundoff_text = " Round-off common to runs in " + real_type_name<W>() + ": at most " + sci(roundoff) +
                            ", the narrow check's difference scaled by the unit round-off ratio 2^-" +
                            std::to_string(significand_bits<W> - bits) + " and a safety factor 10.";
        }

        // Step 3: a same-type check for the truncation error, then tightening. Without a
        // narrower type the round-off is not bounded apart, and kappa 10 has to cover it.
        const double kappa = k >= 0 ? 3.0 : 10.0;
        const std::string same_type_basis =
            "the check is 100x or more looser in the same arithmetic; " + std::string(k >= 0 ? "3x" : "10x") +
            " the difference bounds the truncation error" + (k >= 0 ? "." : " and the round-off of both runs.");
        {
            const run_record check = run<W>(tau_c, "same-type check");
            const double d = digits_of<W>(kappa * difference(o.answer, check) + roundoff);
            if (k < 0 || d > o.digits) {
                o.digits = d;
                o.basis = same_type_basis + roundoff_text;
            }
        }
        while (o.digits < target) {
            if (tau_a / 100 < floor * 0.999) {
                o.stop = "the tolerance reached the tightest " + real_type_name<W>() + " supports (" + sci(floor, 0) + ").";
                break;
            }
            tau_a /= 100;
            run_record tighter = run<W>(tau_a, "tighter answer");
            const double d = digits_of<W>(kappa * difference(tighter, o.answer) + roundoff);
            const bool progress = d >= o.digits + 0.5;
            if (d >= o.digits) {
                o.answer = std::move(tighter);
                o.digits = d;
                o.basis = same_type_basis + roundoff_text;
            }
            if (!progress && o.digits < target) {
                o.stop = "a 100x tighter tolerance gained less than half a digit: the runs sit at the round-off floor of " +
                         real_type_name<W>() + " for this problem.";
                break;
            }
        }
        return o;
    }

    result_type build_in_real() {
        if (d_ > carried_digits<Real> - 3)
            throw accuracy_unreachable(who_ + std::to_string(d_) + " digits asked, but " + real_type_name<Real>() +
                                       " carries " + std::to_string(carried_digits<Real>) +
                                       " and 3 are kept for round-off growth, so at most " +
                                       std::to_string(carried_digits<Real> - 3) +
                                       " can be vouched; use a wider type (e.g. reference_solution<cpp_bin_float_50>"
                                       " or cpp_bin_float_100) or ask for fewer digits.");
        outcome o = search<Real>(d_);
        if (o.digits >= d_) return finish(std::move(o), "");
        throw accuracy_unreachable(who_ + "could not vouch for " + std::to_string(d_) + " digits in " +
                                   real_type_name<Real>() + ": " + o.stop + " Best: " + fixed2(o.digits) +
                                   " digits. Runs: " + log_ +
                                   ". Use a wider type (e.g. reference_solution<cpp_bin_float_50>) or ask for fewer digits.");
    }

    // The right-hand side does not accept Real: the same search in the widest type it takes.
    result_type build_double_only() {
        using user_scalar = scalar_of<user_state>;
        using W = std::conditional_t<(P::template rhs_accepts<long double> &&
                                      significand_bits<long double> > significand_bits<user_scalar>),
                                     long double, user_scalar>;
        const int reachable = carried_digits<W> - 3;
        const std::string why = "The right-hand side does not accept " + real_type_name<Real>() +
                                ", so the reference was computed in " + real_type_name<W>() +
                                ", which carries at most about " + std::to_string(reachable) +
                                " digits; write the right-hand side generic ([](const auto& y, auto& dydt, auto t){...})"
                                " for more. ";
        if (d_ > reachable && !opt_.allow_fewer_digits_if_double_only)
            throw accuracy_unreachable(who_ + std::to_string(d_) + " digits asked, but " + why);
        outcome o = search<W>(std::min(d_, reachable));
        if (o.digits >= d_) return finish(std::move(o), why);
        if (opt_.allow_fewer_digits_if_double_only && o.digits >= 1.0)
            return finish(std::move(o), why + "Vouched fewer digits than the " + std::to_string(d_) + " requested" +
                                            (o.stop.empty() ? std::string(". ") : ": " + o.stop + " "));
        throw accuracy_unreachable(who_ + "could not vouch for " + std::to_string(d_) + " digits. " + why + o.stop +
                                   " Best: " + fixed2(o.digits) + " digits. Runs: " + log_ + ".");
    }

    result_type finish(outcome o, const std::string& preface) {
        result_type out;
        out.requested_digits = d_;
        out.vouched_digits = o.digits;
        out.cost = cost_;
        out.how = preface + "Runs (" + std::string(extrapolation20_adaptive.name()) + ", order 12 in double and long double): " +
                  log_ + ". Vouched " + fixed2(o.digits) + " digits: " + o.basis +
                  " Discretization and round-off only: the problem as given is taken as exact.";
        out.times.reserve(times_.size());
        for (const time_type& t : times_) out.times.push_back(static_cast<Real>(t));
        if (with_t0_) out.states.push_back(convert_state<real_state>(p_.y0()));
        for (auto& s : o.answer.states) out.states.push_back(std::move(s));
        return out;
    }

    result_type initial_value_only() {
        result_type out;
        out.requested_digits = d_;
        out.vouched_digits = carried_digits<Real>;
        out.how = "Only t0 was requested: the initial value, exact in " + real_type_name<Real>() + ".";
        out.times.push_back(static_cast<Real>(times_.front()));
        out.states.push_back(convert_state<real_state>(p_.y0()));
        return out;
    }

    accuracy_unreachable out_of_budget(const char* role) const {
        return accuracy_unreachable(who_ + "the evaluation budget (reference_options::max_evaluations = " +
                                    std::to_string(opt_.max_evaluations) + ") ran out during the " + role +
                                    " run, before " + std::to_string(d_) + " digits could be vouched" +
                                    (log_.empty() ? std::string() : " (runs so far: " + log_ + ")") +
                                    "; raise the budget or ask for fewer digits.");
    }

    const P& p_;
    int d_;
    reference_options opt_;
    std::string who_;
    time_type t0_, t1_;
    std::vector<time_type> times_, run_times_;
    bool with_t0_ = false;
    double atol_factor_ = 0.0;  ///< set by atol_factor() on first use
    std::size_t used_ = 0;
    run_stats cost_;
    std::string log_;
};

} // namespace detail

template <class T>
struct is_type_list : std::false_type {};
template <class... Ts>
struct is_type_list<type_list<Ts...>> : std::true_type {};

/// The solution of p at the output times: a list (default {t1}, exact in the problem's scalar
/// type; t0 may be included; a double within 4 ulps of t0 or t1 means that endpoint) or
/// uniform_times{n}, computed in Real from the problem's own right-hand side and vouched for
/// `digits` significant digits. Throws accuracy_unreachable when it cannot vouch for them (the
/// message says why and what to do), invalid_input for digits < 1 or times outside [t0, t1] or
/// not increasing. A right-hand side that accepts only double is handled (see above).
/// Checks lists the types the narrow check may use, narrowest first (reference_check_types).
template <class Real = default_reference_real, class Checks = reference_check_types, problem_like P>
auto reference_solution(const P& p, int digits, const output_times& times = {}, const reference_options& options = {}) {
    static_assert(std::numeric_limits<Real>::is_specialized && !std::numeric_limits<Real>::is_integer,
                  "stepcert::reference_solution: Real must be a floating-point type with numeric_limits "
                  "(e.g. cpp_bin_float_38, cpp_bin_float_50, float128, mpfr_float_50).");
    static_assert(is_type_list<Checks>::value,
                  "stepcert::reference_solution: Checks must be a stepcert::type_list of scalar types, narrowest first.");
    if (times.is_uniform()) return detail::reference_builder<P, Real, Checks>(p, digits, times.grid(), options).build();
    return detail::reference_builder<P, Real, Checks>(p, digits, times.list(), options).build();
}

} // namespace stepcert
