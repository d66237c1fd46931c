#pragma once
// Symplectic Runge–Kutta–Nyström method of R. I. McLachlan (SIAM J. Sci. Comput. 16 (1995)
// 151–168; odeint's symplectic_rkn_sb3a_mclachlan): order 4, six stages, for separable systems
// y = (q, p), q' = g(p), p' = h(q), declared with problem.as_separable(). run_uniform refuses
// other problems (requires_separable).
// Splitting the user's full right-hand side: odeint asks for g(p) and h(q) separately; each is
// one call of the full rhs on a scratch state that holds the latest other half (which g and h
// do not read), keeping the half asked for. Each such half-evaluation is one counted
// evaluation: odeint's sb3a loop makes 6 of each, so 12 evaluations per step.
// odeint's symplectic steppers pass no time: the system must be autonomous (as the separable
// form says); the rhs is called with the time at the start of the step.
// In multiprecision the two irrational coefficients are odeint's double literals, so the order
// conditions hold only to about 1e-17: fine for order studies, not a reference-grade method.
#include "stepcert/methods/odeint_types.hpp"

#include <array>
#include <cstddef>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

#include <boost/numeric/odeint/stepper/symplectic_rkn_sb3a_mclachlan.hpp>

#include "stepcert/core/error.hpp"
#include "stepcert/core/state.hpp"
#include "stepcert/methods/detail/uniform_loop.hpp"
#include "stepcert/methods/method.hpp"

namespace stepcert {
namespace detail {

/// The type of one half (q or p) of a state: std::array<T, N/2> for arrays, std::vector<T> otherwise.
template <class S>
struct half_state {
    using type = std::vector<scalar_of<S>>;
};
template <class T, std::size_t N>
struct half_state<std::array<T, N>> {
    static_assert(N % 2 == 0, "stepcert::symplectic_rkn: a separable std::array state needs an even size (q, p).");
    using type = std::array<T, N / 2>;
};

/// Scratch shared by the two half right-hand sides.
template <class Rhs, class S>
struct separable_split {
    Rhs* rhs;
    S y;
    S dydt;
    std::size_t half;
    scalar_of<S> t;
};

/// q' = g(p): the full rhs on (latest q, p), first half kept.
template <class Split>
struct position_rate {
    Split* s;
    template <class P, class DQ>
    void operator()(const P& p, DQ& dqdt) const {
        for (std::size_t i = 0; i < s->half; ++i) s->y[s->half + i] = p[i];
        (*s->rhs)(static_cast<const decltype(s->y)&>(s->y), s->dydt, s->t);
        for (std::size_t i = 0; i < s->half; ++i) dqdt[i] = s->dydt[i];
    }
};

/// p' = h(q): the full rhs on (q, latest p), second half kept.
template <class Split>
struct momentum_rate {
    Split* s;
    template <class Q, class DP>
    void operator()(const Q& q, DP& dpdt) const {
        for (std::size_t i = 0; i < s->half; ++i) s->y[i] = q[i];
        (*s->rhs)(static_cast<const decltype(s->y)&>(s->y), s->dydt, s->t);
        for (std::size_t i = 0; i < s->half; ++i) dpdt[i] = s->dydt[s->half + i];
    }
};

} // namespace detail

namespace odeint_stepper {
/// H is the half-state type (q and p alike).
template <class H, class Algebra = default_algebra<H>, class Operations = default_operations<H>>
using symplectic_rkn_sb3a =
    boost::numeric::odeint::symplectic_rkn_sb3a_mclachlan<H, H, scalar_of<H>, H, H, scalar_of<H>, Algebra, Operations>;
} // namespace odeint_stepper

struct symplectic_rkn_method {
    static constexpr step_control control = step_control::fixed;
    static constexpr bool requires_separable = true;
    /// Counted evaluations per step: six stages, each one g(p) and one h(q) call of the full rhs.
    static constexpr std::size_t evaluations_per_step = 12;

    std::string_view name() const { return "symplectic RKN (McLachlan sb3a)"; }
    int order() const { return 4; }

    template <class Rhs, class S, class T, class Obs>
    void integrate_uniform(Rhs rhs, S& y, T t0, T h, std::size_t n, std::size_t stride, Obs obs) const {
        using H = typename detail::half_state<S>::type;
        detail::check_uniform_arguments(name(), h, n, stride);
        const std::size_t size = state_size(y);
        if (size % 2 != 0)
            throw invalid_input("stepcert: method '" + std::string(name()) + "' needs a separable state (q, p) of even size, got " +
                                std::to_string(size) + " components.");
        const std::size_t half = size / 2;
        H q = state_traits<H>::make(half), p = state_traits<H>::make(half);
        for (std::size_t i = 0; i < half; ++i) {
            q[i] = y[i];
            p[i] = y[half + i];
        }
        using split_type = detail::separable_split<Rhs, S>;
        split_type split{&rhs, y, state_traits<S>::make(size), half, t0};
        const auto system = std::make_pair(detail::position_rate<split_type>{&split}, detail::momentum_rate<split_type>{&split});
        odeint_stepper::symplectic_rkn_sb3a<H> stepper;
        auto join = [&] {
            for (std::size_t i = 0; i < half; ++i) {
                y[i] = q[i];
                y[half + i] = p[i];
            }
        };
        auto full_obs = [&](const S&, const T& t) {
            join();
            obs(static_cast<const S&>(y), t);
        };
        detail::uniform_loop(
            [&](S&, const T& t, const T& dt) {
                split.t = t;
                stepper.do_step(system, q, p, t, dt);
            },
            y, t0, h, n, stride, full_obs);
        join();
    }
};

/// McLachlan's sb3a symplectic RKN: fixed step, order 4, 12 evaluations per step, separable problems only.
inline constexpr symplectic_rkn_method symplectic_rkn{};

} // namespace stepcert
