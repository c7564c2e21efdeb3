// The reflection rule (HANDCALC.md section 1): a resistance below a common-gate or
// common-base device is seen at its drain or collector multiplied by about its intrinsic
// gain. Sources: Razavi, Design of Analog CMOS Integrated Circuits, degenerated
// common-source stage and cascode; Gray, Hurst, Lewis, Meyer, Analysis and Design of
// Analog Integrated Circuits, output resistance of the degenerated bipolar stage.
// Both results follow from KCL at the source/emitter node with the control terminal at
// AC ground; tests/integration/test_reflection_ngspice.cpp checks them against ngspice.
#include "src/analyse/reflection.hpp"

namespace mirrorcheck {

double reflect_mos(double gm, double gmb, double gds, double rs) {
    const double ro = 1.0 / gds;
    return ro + (1.0 + (gm + gmb) * ro) * rs;
}

double reflect_bjt(double gm, double gpi, double go, double re, double rb) {
    const double ro = 1.0 / go;
    const double rpi = 1.0 / gpi;
    if (re == 0.0) return ro;
    const double re_parallel = re * (rpi + rb) / (re + rpi + rb);
    return ro + re_parallel * (1.0 + gm * ro * rpi / (rpi + rb));
}

}  // namespace mirrorcheck
