#pragma once
// Eigen column vectors as stepcert states (needs Eigen; the core does not include it):
// Eigen::VectorXd, Eigen::Matrix<T, N, 1> and any Eigen::Matrix<T, Rows, 1, ...>, rebound to other
// scalars (Boost.Multiprecision through its Eigen interop header). The same header makes odeint
// step them: vector_space_algebra, the element-wise abs / quotient / scalar sum its error checker
// uses, and resizing of the steppers' scratch states (odeint's external/eigen support). They come
// together on purpose: a state stepcert accepts but whose scratch states odeint never resized
// would be stepped out of bounds.
// Row vectors, matrices, Eigen::Array, Map and expressions are not states; make_problem says so.
// Opt-in, also for the headers that need Eigen anyway (certify/, bound/, transport/): odeint's
// support declares element-wise operator/ (matrix / matrix), scalar + matrix and abs(matrix) in
// namespace Eigen, so code that Eigen itself refuses compiles once it is included.
#include <cstddef>

#include <Eigen/Core>
#include <boost/multiprecision/eigen.hpp>

#include "stepcert/core/state.hpp"
#include "stepcert/reference/odeint_multiprecision.hpp"

#include <boost/numeric/odeint/algebra/algebra_dispatcher.hpp>
#include <boost/numeric/odeint/algebra/operations_dispatcher.hpp>
#include <boost/numeric/odeint/external/eigen/eigen.hpp>

namespace stepcert {

template <class T, int Rows, int Options, int MaxRows>
struct state_traits<Eigen::Matrix<T, Rows, 1, Options, MaxRows, 1>> {
    using state_type = Eigen::Matrix<T, Rows, 1, Options, MaxRows, 1>;
    using scalar_type = T;
    template <class U>
    using rebind = Eigen::Matrix<U, Rows, 1, Options, MaxRows, 1>;
    static constexpr bool fixed_size = Rows != Eigen::Dynamic;
    static std::size_t size(const state_type& s) { return static_cast<std::size_t>(s.size()); }
    /// Zeros, as std::vector gives (Eigen leaves a new vector unwritten); n is ignored when fixed.
    static state_type make(std::size_t n) {
        if constexpr (fixed_size) {
            (void)n;
            return state_type::Zero();
        } else {
            return state_type::Zero(static_cast<Eigen::Index>(n));
        }
    }
};

} // namespace stepcert
