#pragma once
// Classic RK4 on odeint's OpenMP algebra: the stepper's vector operations (the stage sums) are
// split over OpenMP threads. It can only pay off on large states; on small ones the threads cost
// more than they save (bench/bench_large_systems.cpp).
// Compile and link with OpenMP (-fopenmp, CMake: OpenMP::OpenMP_CXX); without it the same code
// runs on one thread. The results are bitwise those of classic_rk4: each component is computed
// by the same operations, only on another thread.
// The right-hand side is the user's: parallelize it too, or it becomes the serial part.
// odeint's OpenMP algebra uses schedule(runtime): set OMP_SCHEDULE=static (or omp_set_schedule),
// since libgomp's default, dynamic with chunk 1, made a 10^5-unknown step 50x slower here; and
// measure: on a memory-bound stencil two threads of a 2-core machine were slower than one
// (README, bench/bench_large_systems.cpp).
#include "stepcert/methods/classic_rk4.hpp"

#include <boost/numeric/odeint/external/openmp/openmp_range_algebra.hpp>

namespace stepcert {
namespace odeint_stepper {
template <class S>
using rk4_openmp = rk4<S, boost::numeric::odeint::openmp_range_algebra>;
} // namespace odeint_stepper

/// classic_rk4 with odeint's openmp_range_algebra; for states that are contiguous ranges
/// (std::vector). 4 evaluations per step.
inline constexpr odeint_fixed_step<odeint_stepper::rk4_openmp> classic_rk4_openmp{"classic RK4, OpenMP algebra", 4};

} // namespace stepcert
