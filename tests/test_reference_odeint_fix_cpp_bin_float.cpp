// The odeint fix (reference/odeint_multiprecision.hpp) for cpp_bin_float: controlled
// Dormand–Prince 5(4) and Bulirsch–Stoer compile for states of Boost.Multiprecision numbers
// and integrate y' = -y on [0, 1] to far beyond double's reach. The comparison value e^-1
// comes from Boost.Multiprecision's own exp, outside stepcert.
#include "test_reference_odeint_fix.hpp"

namespace {

using fix_types = ::testing::Types<stepcert::cpp_bin_float_50, stepcert::cpp_bin_float_38, stepcert::cpp_bin_float_quad>;
INSTANTIATE_TYPED_TEST_SUITE_P(CppBinFloat, OdeintMultiprecisionFix, fix_types);

} // namespace
