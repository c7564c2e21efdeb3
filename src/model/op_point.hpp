// The operating point of one simulation run, in one sign convention for every model.
//
// Sign convention ("device polarity"): every value is given so that a normally biased
// device reads positive, whatever its type and model level.
//   MOS   id    drain current: into the drain for NMOS, out of it for PMOS
//         vgs, vds  NMOS v(g)-v(s), v(d)-v(s); PMOS v(s)-v(g), v(s)-v(d)
//         vbs   NMOS v(b)-v(s), PMOS v(s)-v(b): negative when the junction is reverse biased
//         vth, vdsat  positive for enhancement devices of either type
//         gm, gds, gmb  small-signal conductances, positive
//   BJT   ic, ib  into collector and base for NPN, out of them for PNP
//         vbe, vbc  NPN v(b)-v(e), v(b)-v(c); PNP v(e)-v(b), v(c)-v(b); vce = vbe - vbc
//         gm, gpi, gmu, go  small-signal conductances, positive
// Capacitances (farads, optional: read only when the run saved them; see CapacitanceSet):
//   MOS, Meyer models      cgs, cgd, cgb (gate to each terminal, overlaps included), cbd, cbs
//                          (junctions): two-terminal capacitances between the physical terminals
//   MOS, charge models     cxyb = dQx/dVy for x in {g, d, b} and y in {g, d, s} (cggb, cgdb, ...,
//                          cbsb), in the device's forward frame (drain and source exchanged when
//                          vds < 0), without the gate overlaps; cbd, cbs the junctions
//   BJT                    cpi (b-e), cmu (b-c), cbx (external b - c), csub (substrate)
// Capacitances need no sign change for p-type devices.
// Currents and conductances are per instance, with its multiplier m (and bipolar area)
// included, as ngspice reports them. This is what BSIM3/BSIM4 print for PMOS already;
// op_point_build.cpp converts every other model level's names and signs to it.
#pragma once

#include <map>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "src/model/quantity_values.hpp"

namespace mirrorcheck {

struct Model;  // circuit.hpp

enum class Polarity { n_type, p_type };

struct DeviceOp {
    std::string name;  // ngspice's flattened name
    Polarity polarity = Polarity::n_type;
    bool is_mos = true;
    // Quantities by name: those of mos_quantities() or bjt_quantities(), in the
    // convention above. A quantity the run did not provide is absent.
    QuantityValues values;
    std::string origin;  // where the values came from, e.g. "run.raw: Operating Point"

    std::optional<double> get(std::string_view quantity) const;
};

struct OpPoint {
    std::string origin;                                 // file and plot (or listing) read
    std::map<std::string, double> node_voltages;        // net name (lower case) -> volts
    std::map<std::string, DeviceOp> devices;            // ngspice name -> values
    std::vector<std::string> notes;                     // e.g. cut listing names matched

    std::optional<double> voltage(std::string_view net) const;  // ground ("0") is 0 V
    const DeviceOp* device(std::string_view name) const;
};

// The quantities a review needs of each kind of transistor.
const std::vector<std::string_view>& mos_quantities();
const std::vector<std::string_view>& bjt_quantities();

// Which capacitances a transistor's model reports in ngspice's op data (checked against
// ngspice 39): Meyer for MOS levels 1, 2, 3, 6 and 9; the charge derivatives for BSIM3
// (levels 8, 49) and BSIM4 (levels 14, 54); bipolar for Gummel-Poon (npn, pnp); none
// for the other models, whose capacitances are not read.
enum class CapacitanceSet { none, meyer, charge, bipolar };
CapacitanceSet capacitance_set(const Model& model);
// The optional capacitance quantities of each set, in the convention above.
const std::vector<std::string_view>& capacitance_quantities(CapacitanceSet set);

}  // namespace mirrorcheck
