#pragma once
// boost::numeric::ublas::vector as a stepcert state, rebound to other scalars as
// ublas::vector<U>. The same header includes odeint's uBLAS support (util/ublas_wrapper.hpp):
// odeint steps uBLAS vectors with vector_space_algebra, whose error checker needs the element-wise
// abs / quotient / scalar sum it defines, and only with it does odeint resize its steppers'
// scratch vectors (without it they stay empty and a step writes out of bounds).
#include <cstddef>

#include <boost/numeric/ublas/vector.hpp>

#include "stepcert/core/state.hpp"
#include "stepcert/reference/odeint_multiprecision.hpp"

#include <boost/numeric/odeint/algebra/algebra_dispatcher.hpp>
#include <boost/numeric/odeint/algebra/operations_dispatcher.hpp>
#include <boost/numeric/odeint/util/ublas_wrapper.hpp>

namespace stepcert {

template <class T, class A>
struct state_traits<boost::numeric::ublas::vector<T, A>> {
    using state_type = boost::numeric::ublas::vector<T, A>;
    using scalar_type = T;
    template <class U>
    using rebind = boost::numeric::ublas::vector<U>;
    static constexpr bool fixed_size = false;
    static std::size_t size(const state_type& s) { return s.size(); }
    /// Zeros, as std::vector gives (a new uBLAS vector of doubles is left unwritten).
    static state_type make(std::size_t n) { return state_type(n, T(0)); }
};

} // namespace stepcert
