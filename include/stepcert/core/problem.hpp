#pragma once
// An initial value problem y' = f(t, y), y(t0) = y0 on [t0, t1], with optional extras:
// an exact solution (generic in the scalar type), a Jacobian, and the separable
// (position, momentum) layout that symplectic methods need.
#include <cmath>
#include <string>
#include <type_traits>
#include <utility>

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

    /// Adds an exact solution exact(t, y), callable for every scalar type the user wants checked.
    template <class F>
    auto with_exact(F exact) const {
        static_assert(exact_solution_for<F, State>,
                      "stepcert: the exact solution must be callable as exact(t, y), writing y(t) into "
                      "the state y (make it generic, e.g. [](auto t, auto& y){...}, for multiprecision).");
        return problem<State, Rhs, F, Jacobian>(name_, rhs_, y0_, t0_, t1_, std::move(exact), jacobian_,
                                                separable_);
    }

    /// Adds a Jacobian jac(y, t, J) writing df_i/dy_j into J(i, j).
    template <class F>
    auto with_jacobian(F jac) const {
        return problem<State, Rhs, Exact, F>(name_, rhs_, y0_, t0_, t1_, exact_, std::move(jac), separable_);
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

    /// The same problem on another interval (reuses the right-hand side and extras).
    problem on_interval(scalar_type t0, scalar_type t1) const {
        problem p = *this;
        p.t0_ = t0;
        p.t1_ = t1;
        p.validate();
        return p;
    }

private:
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

} // namespace stepcert
