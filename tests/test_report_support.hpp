#pragma once
// Helpers shared by the report tests (text parsing only; no check values live here, so no source
// is named: the values and their sources are beside the checks in test_report_*.cpp).
#include <functional>
#include <initializer_list>
#include <sstream>
#include <string>
#include <vector>

#include <gtest/gtest.h>

#include "stepcert/core/error.hpp"

namespace report_test {

/// The lines of a text, without their line ends.
inline std::vector<std::string> lines_of(const std::string& text) {
    std::vector<std::string> out;
    std::istringstream is(text);
    for (std::string line; std::getline(is, line);) out.push_back(line);
    return out;
}

/// `read` throws invalid_input whose message holds every part.
inline void expect_rejected(const std::function<void()>& read, std::initializer_list<const char*> parts) {
    try {
        read();
        ADD_FAILURE() << "accepted a malformed document";
    } catch (const stepcert::invalid_input& e) {
        const std::string message = e.what();
        for (const char* part : parts) EXPECT_NE(message.find(part), std::string::npos) << "'" << part << "' not in: " << message;
    }
}

} // namespace report_test
