#pragma once
// Explicit midpoint rule (Runge 1895): odeint has no stepper of that name, so this is odeint's
// explicit_generic_rk with the two-stage tableau c = (0, 1/2), a21 = 1/2, b = (0, 1).
// Order 2, two evaluations per step. Coefficients are exact in every scalar type.
#include "stepcert/methods/odeint_types.hpp"

#include <boost/array.hpp>
#include <boost/fusion/include/make_vector.hpp>
#include <boost/numeric/odeint/stepper/explicit_generic_rk.hpp>

#include "stepcert/methods/odeint_fixed_step.hpp"

namespace stepcert {
namespace odeint_stepper {

template <class S, class Algebra = default_algebra<S>, class Operations = default_operations<S>>
class explicit_midpoint
    : public boost::numeric::odeint::explicit_generic_rk<2, 2, S, scalar_of<S>, S, scalar_of<S>, Algebra, Operations> {
    using T = scalar_of<S>;
    using base = boost::numeric::odeint::explicit_generic_rk<2, 2, S, T, S, T, Algebra, Operations>;

    static boost::array<T, 1> a21() { return {{T(1) / T(2)}}; }
    static boost::array<T, 2> b() { return {{T(0), T(1)}}; }
    static boost::array<T, 2> c() { return {{T(0), T(1) / T(2)}}; }

public:
    explicit explicit_midpoint(const Algebra& algebra = Algebra())
        : base(boost::fusion::make_vector(a21()), b(), c(), algebra) {}
};

} // namespace odeint_stepper

namespace detail {
template <class S>
using odeint_midpoint_default = odeint_stepper::explicit_midpoint<S>;
}

/// Explicit midpoint: k1 = f(t, y), k2 = f(t + h/2, y + h/2 k1), y += h k2; order 2, 2 evaluations per step.
inline constexpr odeint_fixed_step<detail::odeint_midpoint_default> explicit_midpoint{"explicit midpoint", 2};

} // namespace stepcert
