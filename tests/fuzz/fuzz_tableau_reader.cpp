// libFuzzer target for the tableau file reader: every input must either parse or throw
// stepcert::invalid_input; anything else (another exception, a crash, a sanitizer report) is a bug.
// No outside values are checked here (common practice, no source: a reader must reject, not crash);
// the malformed-input classes with their expected messages are in tests/test_tableau_json.cpp.
#include <cstddef>
#include <cstdint>
#include <string_view>

#include <boost/multiprecision/cpp_int.hpp>

#include "stepcert/tableau/order_conditions.hpp"
#include "stepcert/tableau/tableau_json.hpp"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    const std::string_view text(reinterpret_cast<const char*>(data), size);
    try {
        const auto t = stepcert::parse_tableau_json<boost::multiprecision::cpp_rational>(text);
        // What a user does next with a file that parsed: check its order (small claims only,
        // which keeps every run fast).
        if (t.claimed_order <= 6 && t.claimed_embedded_order <= 6) (void)stepcert::check_order_conditions(t);
    } catch (const stepcert::invalid_input&) {
    }
    return 0;
}
