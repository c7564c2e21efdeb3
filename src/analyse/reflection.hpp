// The reflection rule of analysis by inspection: the small-signal resistance looking into
// a transistor's drain or collector when its gate or base is at AC ground and a
// resistance sits between its source or emitter and AC ground.
#pragma once

namespace mirrorcheck {

// MOS, bulk at AC ground: Rout = ro + (1 + (gm + gmb)·ro)·Rs, with ro = 1/gds.
// Exact for the small-signal model gm, gmb, gds (junction leakage neglected).
double reflect_mos(double gm, double gmb, double gds, double rs);

// Bipolar, base at AC ground through rb, emitter resistance re:
// Rout = ro + Re·(1 + gm·ro·rpi/(rpi + rb)), Re = re || (rpi + rb), ro = 1/go, rpi = 1/gpi.
// Exact for the hybrid-pi model without gmu and base spreading resistance. Tends to
// about beta·ro as re grows: the base current limits it.
double reflect_bjt(double gm, double gpi, double go, double re, double rb = 0.0);

}  // namespace mirrorcheck
