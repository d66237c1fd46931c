// The odeint fix (reference/odeint_multiprecision.hpp) for float128 (GCC, GNU mode, libquadmath)
// and MPFR (when STEPCERT_HAVE_MPFR is defined; Boost's mpfr_float_50 with expression templates
// and stepcert's without): the same checks as for cpp_bin_float.
// float128 parts run where the build has it (GCC: stepcert_dev links stepcert::float128).
#include "test_reference_odeint_fix.hpp"

namespace {

#if defined(STEPCERT_HAVE_FLOAT128) && defined(STEPCERT_HAVE_MPFR)
using fix_types = ::testing::Types<stepcert::float128, boost::multiprecision::mpfr_float_50, stepcert::mpfr_float_50>;
#elif defined(STEPCERT_HAVE_FLOAT128)
using fix_types = ::testing::Types<stepcert::float128>;
#elif defined(STEPCERT_HAVE_MPFR)
using fix_types = ::testing::Types<boost::multiprecision::mpfr_float_50, stepcert::mpfr_float_50>;
#endif

#if defined(STEPCERT_HAVE_FLOAT128) || defined(STEPCERT_HAVE_MPFR)
INSTANTIATE_TYPED_TEST_SUITE_P(QuadAndMpfr, OdeintMultiprecisionFix, fix_types);
#else
TEST(OdeintMultiprecisionFix, NeitherFloat128NorMpfrInThisBuild) {
    GTEST_SKIP() << "float128 and mpfr_float are not available in this build.";
}
#endif

} // namespace
