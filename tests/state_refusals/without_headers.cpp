// State types make_problem refuses before the Eigen and uBLAS traits are included: each call
// below must stop the compilation with exactly the message listed (ctest state_type_refusals,
// cmake/expect_compile_errors.cmake), one error per call.
#include <vector>

#include <Eigen/Core>
#include <boost/numeric/ublas/vector.hpp>

#include "stepcert/core/problem.hpp"

namespace {

struct no_traits {
    double v[2];
};

auto rhs = [](const auto& y, auto& dydt, auto) { dydt[0] = -y[0]; };

} // namespace

int main() {
    // expect-error: Eigen vector states need #include <stepcert/core/state_eigen.hpp>
    (void)stepcert::make_problem("eigen", rhs, Eigen::VectorXd(2), 0.0, 1.0);
    // expect-error: boost::numeric::ublas::vector states need #include <stepcert/core/state_ublas.hpp>
    (void)stepcert::make_problem("ublas", rhs, boost::numeric::ublas::vector<double>(2), 0.0, 1.0);
    // expect-error: the state's scalar is not a real floating-point type
    (void)stepcert::make_problem("integers", rhs, std::vector<int>{1, 2}, 0.0, 1.0);
    // expect-error: this type is not a state: use std::vector<double>
    (void)stepcert::make_problem("no traits", rhs, no_traits{}, 0.0, 1.0);
}
