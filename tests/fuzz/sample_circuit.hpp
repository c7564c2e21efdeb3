// The circuit the fuzz targets that need one review against: the shipped sample's, read once.
#pragma once

#include "src/model/circuit_build.hpp"

namespace mirrorcheck::fuzz {

inline const Circuit& sample_circuit() {
    static const Circuit circuit = read_circuit(MIRRORCHECK_SOURCE_DIR "/samples/tamarack/bias.cir");
    return circuit;
}

}  // namespace mirrorcheck::fuzz
