// The impedance to ground at nodes of a small-signal network against frequency, and the
// frequency where its magnitude falls 3 dB below the DC value. See impedance_spectrum.cpp.
#pragma once

#include <complex>
#include <optional>
#include <string>
#include <vector>

#include "src/analyse/small_signal_network.hpp"

namespace mirrorcheck {

// Z(j·2·pi·f) at each port of `network` (small_signal_network.hpp) for each frequency:
// result[frequency][node]. One factorisation per frequency serves every node. The values
// at a frequency where the matrix is singular are NaN. `gmin` siemens are added from
// every node to ground, as in the DC solve.
std::vector<std::vector<std::complex<double>>> compute_impedance_spectrum(const SmallSignalNetwork& network,
                                                                          const std::vector<Port>& nodes,
                                                                          const std::vector<double>& frequencies,
                                                                          double gmin);

struct CornerFrequency {
    std::optional<double> frequency;  // Hz
    std::string note;                 // why it is absent
};

// Per node, the lowest frequency at which |Z| falls to `dc_magnitude`/sqrt(2) (the 3 dB
// point of the DC value), searched between 1 uHz and 1 THz.
std::vector<CornerFrequency> find_corner_frequencies(const SmallSignalNetwork& network, const std::vector<Port>& nodes,
                                                     const std::vector<double>& dc_magnitude, double gmin);

}  // namespace mirrorcheck
