#pragma once
// Helpers shared by the report tests (text parsing only; no check values live here, so no source
// is named: the values and their sources are beside the checks in test_report_*.cpp).
#include <sstream>
#include <string>
#include <vector>

namespace report_test {

/// The lines of a text, without their line ends.
inline std::vector<std::string> lines_of(const std::string& text) {
    std::vector<std::string> out;
    std::istringstream is(text);
    for (std::string line; std::getline(is, line);) out.push_back(line);
    return out;
}

} // namespace report_test
