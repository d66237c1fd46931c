// State types that cannot work even with the Eigen and uBLAS traits included, and a state type
// odeint would step out of bounds: each must stop the compilation with exactly the message
// listed (ctest state_type_refusals, cmake/expect_compile_errors.cmake), one error each.
#include <cstddef>
#include <vector>

#include <boost/numeric/ublas/matrix.hpp>

#include "stepcert/core/problem.hpp"
#include "stepcert/core/state_eigen.hpp"
#include "stepcert/core/state_ublas.hpp"
#include "stepcert/methods/classic_rk4.hpp"
#include "stepcert/run/run.hpp"

namespace {

auto rhs = [](const auto& y, auto& dydt, auto) { dydt[0] = -y[0]; };

/// A run-time-size state odeint does not know as resizable (its is_resizeable covers
/// std::vector itself, not a type derived from it): odeint would leave the stepper's scratch
/// states empty and write past them.
struct derived_vector : std::vector<double> {
    using std::vector<double>::vector;
};

} // namespace

template <>
struct stepcert::state_traits<derived_vector> {
    using scalar_type = double;
    template <class U>
    using rebind = derived_vector;
    static std::size_t size(const derived_vector& s) { return s.size(); }
    static derived_vector make(std::size_t n) { return derived_vector(n); }
};

int main() {
    // expect-error: this Eigen type is not a state: a state is a column vector
    (void)stepcert::make_problem("row", rhs, Eigen::RowVectorXd(2), 0.0, 1.0);
    // expect-error: this Eigen type is not a state: a state is a column vector
    (void)stepcert::make_problem("matrix", rhs, Eigen::MatrixXd(2, 2), 0.0, 1.0);
    // expect-error: the scalar of this Eigen vector is not a real floating-point type
    (void)stepcert::make_problem("integers", rhs, Eigen::VectorXi(2), 0.0, 1.0);
    // expect-error: the scalar of this uBLAS vector is not a real floating-point type
    (void)stepcert::make_problem("integers", rhs, boost::numeric::ublas::vector<int>(2), 0.0, 1.0);
    // expect-error: this uBLAS type is not a state: a state is a boost::numeric::ublas::vector
    (void)stepcert::make_problem("matrix", rhs, boost::numeric::ublas::matrix<double>(2, 2), 0.0, 1.0);
    // expect-error: odeint does not resize this state type
    (void)stepcert::run_uniform(stepcert::make_problem("derived", rhs, derived_vector{1.0}, 0.0, 1.0), stepcert::classic_rk4, 4);
}
