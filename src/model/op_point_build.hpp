// Builds the OpPoint of one run from ngspice's output, converting each model level's
// parameter names and signs to the convention of op_point.hpp.
#pragma once

#include <string>
#include <vector>

#include "parsers/listing/listing.hpp"
#include "parsers/raw/raw.hpp"
#include "src/model/circuit.hpp"
#include "src/model/op_point.hpp"

namespace mirrorcheck {

// From a decoded plot of a raw file: an op plot (node voltages and the device parameters
// saved with `save @dev[param]`), or an AC plot, whose device parameters ngspice repeats
// as complex vectors holding the op values (its node voltages are AC values and are not
// taken).
OpPoint build_op_point(const Circuit& circuit, const raw::RawFile& file, const raw::Plot& plot);

// From a `show` listing: device parameters only (a listing has no node voltages).
OpPoint build_op_point(const Circuit& circuit, const listing::Listing& listing);

// The ngspice parameter names to save for one transistor (`save @m1[gm] ...`), by its
// model: those a review needs, and the optional ones: the capacitances the impedance against
// frequency uses, and the conductances and currents the exact solve takes when they are
// there (MOS junctions gbd, gbs; BSIM4 isub, igidl, igisl, gcrg; bipolar gx). Empty for
// other devices.
struct SaveNames {
    std::vector<std::string> required;
    std::vector<std::string> optional;      // the capacitances, then the exact solve's
    std::vector<std::string> capacitances;  // the capacitances alone
};
SaveNames ngspice_save_names(const Device& transistor);

// Throws InputError "op.missing-parameters" when any of these transistors lacks a
// quantity a review needs; the message lists each device with what it lacks and the
// lines to add to the deck (with the optional capacitances it also lacks, marked as such).
// Capacitances are never demanded.
void require_transistor_quantities(const OpPoint& op, const Circuit& circuit, const std::vector<std::string>& devices);

}  // namespace mirrorcheck
