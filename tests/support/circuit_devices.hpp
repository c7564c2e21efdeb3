// Test support: a Circuit's devices as JSON without the source lines, to compare two
// readings of one circuit written in different files (a deck and its derived copy).
#pragma once

#include <nlohmann/json.hpp>

#include "src/model/circuit.hpp"
#include "src/report/circuit_dump.hpp"

namespace mirrorcheck::test {

inline nlohmann::json devices_without_sources(const mirrorcheck::Circuit& c) {
    auto devices = mirrorcheck::report::circuit_to_json(c)["devices"];
    for (auto& d : devices) {
        d.erase("source");
        for (auto& level : d["hierarchy"]) level.erase("source");
    }
    return devices;
}

}  // namespace mirrorcheck::test
