#pragma once
// The caution every export of error estimates, true errors and error ledgers carries (JSON: the
// "caution" field; CSV: a first line "# " + the caution, before the header line).
#include <string_view>

namespace stepcert {

inline constexpr std::string_view estimate_caution =
    "caution: these figures concern discretization error only (not model, data or round-off error in general); "
    "an estimated error comes from finitely many runs and first-order models, it is not a proof and not a bound; "
    "where the result matters, follow the verification-and-validation standards of the field and have it reviewed "
    "by a licensed professional.";

} // namespace stepcert
