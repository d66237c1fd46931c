#pragma once
// A large system by the method of lines (a scenario of our own, invented data): the temperature
// excess u(x, t) along a battery pack's copper busbar of unit length whose two ends are held at
// the coolant temperature, u_t = k u_xx, discretized on n interior cells of width dx = 1/(n + 1):
//   u_i' = k (u_(i-1) - 2 u_i + u_(i+1)) / dx^2,  u_0 = u_(n+1) = 0,  u_i(0) = sin(j pi x_i),
// a hot spot pattern of mode j (1: one arch). The semi-discrete system has an exact solution,
// u_i(t) = sin(j pi x_i) e^(mu t) with mu = -(4 k / dx^2) sin^2(j pi dx / 2): sin(j pi x_i) is an
// eigenvector of the second-difference matrix (common practice, no source). So errors of a run are measured against the
// exact solution of the ODE system itself, at any size n, with no reference run.
// Its stiffness grows as n^2 (largest |lambda| = (4 k / dx^2) cos^2(pi dx / 2)): explicit methods
// need h k / dx^2 below about 0.7 (RK4), which is what makes large n a cost test.
#include <cmath>
#include <cstddef>
#include <string>
#include <type_traits>
#include <vector>

#include <boost/math/constants/constants.hpp>

#include "stepcert/core/error.hpp"
#include "stepcert/core/problem.hpp"
#include "stepcert/problems/detail/real.hpp"

namespace stepcert::problems {

template <class T>
struct busbar_cooling_rhs {
    T diffusivity;  ///< k, in units of length^2 / time
    template <state S, class Time>
    void operator()(const S& u, S& dudt, const Time&) const {
        using U = scalar_of<S>;
        const std::size_t n = u.size();
        const U dx = U(1) / static_cast<U>(n + 1);
        const U c = static_cast<U>(diffusivity) / (dx * dx);
        // Plain loop over contiguous memory: the compiler vectorizes it; the odeint algebra
        // (e.g. OpenMP's) splits the stepper's own vector operations.
        for (std::size_t i = 0; i < n; ++i) {
            const U left = i > 0 ? u[i - 1] : U(0);
            const U right = i + 1 < n ? u[i + 1] : U(0);
            dudt[i] = c * (left - U(2) * u[i] + right);
        }
    }
};

template <class T>
struct busbar_cooling_exact {
    T diffusivity;
    std::size_t mode;
    template <class Time, state S>
    void operator()(const Time& t, S& u) const {
        using U = scalar_of<S>;
        using std::exp;
        using std::sin;
        const std::size_t n = u.size();
        const U pi = boost::math::constants::pi<U>();
        const U dx = U(1) / static_cast<U>(n + 1);
        const U j = static_cast<U>(mode);
        const U s = sin(j * pi * dx / U(2));
        const U mu = -U(4) * static_cast<U>(diffusivity) / (dx * dx) * s * s;
        const U decay = exp(mu * static_cast<U>(t));
        for (std::size_t i = 0; i < n; ++i) u[i] = sin(j * pi * static_cast<U>(i + 1) * dx) * decay;
    }
};

/// The busbar on n interior cells over [0, t1], k = diffusivity, initial mode 1 <= j <= n (higher
/// modes decay faster: mu ~ -(j pi)^2 k). State: std::vector<T> of size n.
/// Exact solution attached (of the semi-discrete system); no Jacobian (it is n x n: the stability
/// check refuses systems beyond a few thousand unknowns, see certify/stability_check.hpp).
template <class T = double>
auto busbar_cooling(std::size_t cells, std::type_identity_t<T> t1 = T(1) / T(100),
                    std::type_identity_t<T> diffusivity = T(1), std::size_t mode = 1) {
    detail::require_real<T>();
    if (cells < 2)
        throw invalid_input("stepcert::problems::busbar_cooling: need at least 2 cells (got " + std::to_string(cells) +
                            "); the method of lines needs interior points.");
    detail::require_finite(diffusivity, "diffusivity", "busbar_cooling");
    if (!(diffusivity > T(0)))
        throw invalid_input("stepcert::problems::busbar_cooling: the diffusivity must be > 0 (heat spreads, it does not "
                            "gather).");
    if (mode < 1 || mode > cells)
        throw invalid_input("stepcert::problems::busbar_cooling: the mode must be in 1 .. cells (got " +
                            std::to_string(mode) + " for " + std::to_string(cells) + " cells).");
    std::vector<T> u0(cells);
    busbar_cooling_exact<T>{diffusivity, mode}(T(0), u0);
    return make_problem("busbar_cooling(cells=" + std::to_string(cells) + ",mode=" + std::to_string(mode) + ")",
                        busbar_cooling_rhs<T>{diffusivity}, std::move(u0), T(0), t1)
        .with_exact(busbar_cooling_exact<T>{diffusivity, mode});
}

} // namespace stepcert::problems
