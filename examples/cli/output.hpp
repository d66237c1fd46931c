#pragma once
// Where a command's result goes: standard output, or a file named by --output. The whole result
// is formed first, so a failed run never leaves half a file behind.
#include <fstream>
#include <iostream>
#include <string>

#include "stepcert/core/error.hpp"

namespace stepcert_cli {

inline void deliver(const std::string& text, const std::string& path) {
    if (path.empty() || path == "-") {
        std::cout << text;
        std::cout.flush();
        return;
    }
    std::ofstream out(path, std::ios::binary);
    if (!out) throw stepcert::invalid_input("cannot open '" + path + "' for writing; check that its folder exists and is writable.");
    out << text;
    out.close();
    if (!out) throw stepcert::invalid_input("could not write all of '" + path + "' (disk full?).");
}

} // namespace stepcert_cli
