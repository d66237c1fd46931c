// libFuzzer target for the step-certificate reader: every input must either be read or throw
// stepcert::invalid_input; anything else (another exception, a crash, a sanitizer report) is a bug.
// A document that was read must also survive a round trip: written again and read back, it gives
// the same document (common practice, no source: a stored certificate must not change by being
// re-saved). The malformed-input classes with their expected messages are in
// tests/test_report_certificate.cpp.
#include <cstddef>
#include <cstdint>
#include <cstdlib>
#include <string_view>

#include "stepcert/report/certificate_json.hpp"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    const std::string_view text(reinterpret_cast<const char*>(data), size);
    try {
        const auto once = stepcert::to_json(stepcert::parse_step_certificate_json(text)).dump();
        const auto twice = stepcert::to_json(stepcert::parse_step_certificate_json(once)).dump();
        if (once != twice) std::abort();
    } catch (const stepcert::invalid_input&) {
    }
    return 0;
}
