// Names the decks that mirrorcheck writes give their own elements and files.
#pragma once

#include <filesystem>
#include <string>

#include <fmt/format.h>

#include "src/model/circuit.hpp"

namespace mirrorcheck {

// `wanted`, or `wanted_2`, `wanted_3`, ...: the first that names no device or net of `circuit`.
inline std::string unique_name(const Circuit& circuit, const std::string& wanted) {
    std::string name = wanted;
    for (int k = 2; circuit.find_device(name) || circuit.find_net(name); ++k) name = fmt::format("{}_{}", wanted, k);
    return name;
}

// A path as an ngspice control command takes it.
inline std::string command_path(const std::filesystem::path& p) {
    std::string s = p.string();
    return s.find_first_of(" \t") == std::string::npos ? s : "\"" + s + "\"";
}

}  // namespace mirrorcheck
