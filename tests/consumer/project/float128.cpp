// An outside project linking stepcert::float128: the definition arrives, float128 is the
// first (cheapest) check type of reference solutions, and libquadmath links (printing uses it).
#include <cstdio>
#include <sstream>
#include <type_traits>

#include <stepcert/reference/multiprecision_types.hpp>

#if !defined(STEPCERT_HAVE_FLOAT128)
#error "stepcert::float128 should define STEPCERT_HAVE_FLOAT128"
#endif

static_assert(std::is_same_v<stepcert::reference_check_types,
                             stepcert::type_list<long double, stepcert::float128, stepcert::cpp_bin_float_38, stepcert::cpp_bin_float_50>>,
              "with stepcert::float128, the narrow check of reference solutions runs in float128");

int main() {
    const stepcert::float128 third = stepcert::float128(1) / 3;
    std::ostringstream os;
    os.precision(34);
    os << third;  // libquadmath's quadmath_snprintf
    // 1/3 to 34 digits (common practice, no source).
    const bool ok = os.str() == "0.3333333333333333333333333333333333";
    std::printf("consumer_float128: 1/3 = %s (%s)\n", os.str().c_str(), ok ? "ok" : "WRONG");
    return ok ? 0 : 1;
}
