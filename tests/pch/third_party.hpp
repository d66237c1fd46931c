// Third-party headers every test program parses, precompiled once for all of them
// (STEPCERT_TESTS_PCH in tests/CMakeLists.txt). Library headers only, with one exception:
// stepcert's odeint + Boost.Multiprecision fix, which must come before odeint's headers. The rest
// of stepcert stays out, so a test still has to include what it uses from stepcert.
#include <gtest/gtest.h>

#include <boost/multiprecision/cpp_bin_float.hpp>
#include <boost/multiprecision/cpp_int.hpp>

#include "stepcert/reference/odeint_multiprecision.hpp"

#include <boost/numeric/odeint.hpp>

#include <Eigen/Dense>
