#pragma once
// An initial value problem y' = f(t, y), y(t0) = y0 on [t0, t1], with optional extras:
// an exact solution (generic in the scalar type), a Jacobian, the separable (position, momentum)
// layout that symplectic methods need, and breakpoints: times where the right-hand side is not
// smooth (a forcing that switches, a valve that opens), which the runs land on.
#include <algorithm>
#include <cmath>
#include <string>
#include <type_traits>
#include <utility>
#include <vector>

#include "stepcert/core/concepts.hpp"
#include "stepcert/core/error.hpp"
#include "stepcert/core/state.hpp"

namespace stepcert {

/// Marks "no exact solution" / "no Jacobian".
struct none_given {};

template <state State, class Rhs, class Exact = none_given, class Jacobian = none_given>
class problem {
public:
    using state_type = State;
    using scalar_type = scalar_of<State>;
    using rhs_type = Rhs;
    using exact_type = Exact;
    using jacobian_type = Jacobian;

    static constexpr bool has_exact = !std::is_same_v<Exact, none_given>;
    static constexpr bool has_jacobian = !std::is_same_v<Jacobian, none_given>;

    problem(std::string name, Rhs rhs, State y0, scalar_type t0, scalar_type t1, Exact exact = {},
            Jacobian jacobian = {}, bool separable = false)
        : name_(std::move(name)), rhs_(std::move(rhs)), y0_(std::move(y0)), t0_(t0), t1_(t1),
          exact_(std::move(exact)), jacobian_(std::move(jacobian)), separable_(separable) {
        validate();
    }

    const std::string& name() const { return name_; }
    const Rhs& rhs() const { return rhs_; }
    const State& y0() const { return y0_; }
    scalar_type t0() const { return t0_; }
    scalar_type t1() const { return t1_; }
    std::size_t dimension() const { return state_size(y0_); }
    const Exact& exact() const { return exact_; }
    const Jacobian& jacobian() const { return jacobian_; }
    /// True when y = (q, p) with q' depending on p only and p' on q only (first half q).
    bool separable() const { return separable_; }

    /// True when the right-hand side also accepts the same state shape in scalar T.
    template <class T>
    static constexpr bool rhs_accepts = rhs_for<Rhs, rebind_state<State, T>>;

    /// Times strictly inside (t0, t1) where the right-hand side is not smooth, ascending.
    const std::vector<scalar_type>& breakpoints() const { return breakpoints_; }

    /// Adds an exact solution exact(t, y), callable for every scalar type the user wants checked.
    template <class F>
    auto with_exact(F exact) const {
        static_assert(exact_solution_for<F, State>,
                      "stepcert: the exact solution must be callable as exact(t, y), writing y(t) into "
                      "the state y (make it generic, e.g. [](auto t, auto& y){...}, for multiprecision).");
        problem<State, Rhs, F, Jacobian> out(name_, rhs_, y0_, t0_, t1_, std::move(exact), jacobian_, separable_);
        out.breakpoints_ = breakpoints_;
        return out;
    }

    /// Adds a Jacobian jac(y, t, J) writing df_i/dy_j into J(i, j).
    template <class F>
    auto with_jacobian(F jac) const {
        problem<State, Rhs, Exact, F> out(name_, rhs_, y0_, t0_, t1_, exact_, std::move(jac), separable_);
        out.breakpoints_ = breakpoints_;
        return out;
    }

    /// Declares known breakpoints: times where the right-hand side jumps or kinks (a forcing that
    /// switches, a valve that opens). Fixed-step runs then take uniform steps between them and
    /// land on each one, evaluating the right-hand side just inside the segment being stepped (so
    /// a switch written as `t > tb` or `t >= tb` gives the segment's own side at tb); adaptive
    /// runs and references restart there. Give each as the very value the model switches at.
    problem with_breakpoints(std::vector<scalar_type> times) const {
        using std::isfinite;
        std::sort(times.begin(), times.end());
        for (std::size_t k = 0; k < times.size(); ++k) {
            if (!(boost::math::isfinite)(times[k]))
                throw non_finite_value("stepcert: problem '" + name_ + "': breakpoint " + std::to_string(k) +
                                       " is NaN or infinite; give finite times inside (t0, t1).");
            if (!(times[k] > t0_ && times[k] < t1_))
                throw invalid_input("stepcert: problem '" + name_ + "': a breakpoint lies outside the open interval (t0, t1); "
                                    "give only times strictly between t0 and t1 (the ends are landed on anyway).");
            if (k > 0 && !(times[k] > times[k - 1]))
                throw invalid_input("stepcert: problem '" + name_ + "': a breakpoint is given twice; give each time once.");
        }
        problem p = *this;
        p.breakpoints_ = std::move(times);
        return p;
    }

    /// Declares y = (q, p), q' = g(p), p' = h(q); required by the symplectic method.
    problem as_separable() const {
        if (dimension() % 2 != 0)
            throw invalid_input("stepcert: problem '" + name_ + "' cannot be separable: its dimension " +
                                std::to_string(dimension()) + " is odd; a separable state is (q, p) of equal halves.");
        problem p = *this;
        p.separable_ = true;
        return p;
    }

    /// The same problem on another interval (reuses the right-hand side and extras; keeps the
    /// breakpoints inside the new interval).
    problem on_interval(scalar_type t0, scalar_type t1) const {
        problem p = *this;
        p.t0_ = t0;
        p.t1_ = t1;
        p.validate();
        std::erase_if(p.breakpoints_, [&](const scalar_type& b) { return !(b > t0 && b < t1); });
        return p;
    }

private:
    template <state, class, class, class>
    friend class problem;

    void validate() const {
        using std::isfinite;
        if (dimension() == 0)
            throw invalid_input("stepcert: problem '" + name_ + "' has an empty initial state; give y0 at least one component.");
        if (!all_finite(y0_))
            throw non_finite_value("stepcert: problem '" + name_ + "' has a NaN or infinite component in y0; give finite initial values.");
        if (!(boost::math::isfinite)(t0_) || !(boost::math::isfinite)(t1_))
            throw non_finite_value("stepcert: problem '" + name_ + "' has a non-finite t0 or t1.");
        if (!(t1_ > t0_))
            throw invalid_input("stepcert: problem '" + name_ + "' has t1 <= t0 (empty or backward interval); "
                                "give t1 > t0 (for backward integration substitute s = -t).");
    }

    std::string name_;
    Rhs rhs_;
    State y0_;
    scalar_type t0_, t1_;
    Exact exact_;
    Jacobian jacobian_;
    bool separable_ = false;
    std::vector<scalar_type> breakpoints_;
};

namespace detail {
/// The time type make_problem takes: the state's scalar, or double while the state type is
/// refused (so that the refusal is the one message, not a failed deduction).
template <class State>
struct make_problem_time {
    using type = double;
};
template <state State>
struct make_problem_time<State> {
    using type = scalar_of<State>;
};
} // namespace detail

/// Builds a problem; the right-hand side is rhs(const State& y, State& dydt, Scalar t).
/// State is any stepcert::state (core/state.hpp; Eigen vectors with core/state_eigen.hpp,
/// uBLAS vectors with core/state_ublas.hpp); any other type stops here with one message.
template <class Rhs, class State>
auto make_problem(std::string name, Rhs rhs, State y0, typename detail::make_problem_time<State>::type t0,
                  typename detail::make_problem_time<State>::type t1) {
    if constexpr (!detail::require_state<State>()) {
        return none_given{};  // not reached at run time: require_state failed the compilation
    } else {
        static_assert(rhs_for<Rhs, State>,
                      "stepcert::make_problem: the right-hand side must be callable as rhs(const State& y, "
                      "State& dydt, Scalar t) with the state type of y0 (write it generic, e.g. "
                      "[](const auto& y, auto& dydt, auto t){...}, to allow multiprecision references).");
        return problem<State, Rhs>(std::move(name), std::move(rhs), std::move(y0), t0, t1);
    }
}

/// Accepts brace lists: make_problem("x", rhs, {1.0, 0.0}, 0.0, 1.0) gives a std::vector<double> state.
template <class Rhs>
auto make_problem(std::string name, Rhs rhs, std::initializer_list<double> y0, double t0, double t1) {
    return make_problem(std::move(name), std::move(rhs), std::vector<double>(y0), t0, t1);
}

template <class P>
concept problem_like = requires(const P& p) {
    typename P::state_type;
    typename P::scalar_type;
    p.rhs();
    p.y0();
    p.t0();
    p.t1();
    p.name();
};

namespace detail {
/// The problem's breakpoints, or none for a problem-like type that has no such notion.
template <problem_like P>
const std::vector<typename P::scalar_type>& breakpoints_of(const P& p) {
    if constexpr (requires { { p.breakpoints() } -> std::same_as<const std::vector<typename P::scalar_type>&>; }) {
        return p.breakpoints();
    } else {
        static const std::vector<typename P::scalar_type> none;
        return none;
    }
}

/// For the parts that step on their own and do not land on breakpoints yet: refuse rather than
/// straddle a breakpoint silently.
template <problem_like P>
void refuse_breakpoints(const P& p, const std::string& who) {
    if (!breakpoints_of(p).empty())
        throw unsupported_operation(who + ": problem '" + p.name() + "' declares breakpoints, which this does not land on "
                                    "(its steps would straddle them). Run it on each segment between breakpoints "
                                    "(problem.on_interval(a, b)), or use run_uniform, run_adaptive, reference_solution, "
                                    "certify or certify_step_count, which honour them.");
}
} // namespace detail

} // namespace stepcert
