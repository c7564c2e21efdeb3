// Designer names (src/analyse/designer_names.cpp) on netlists of the recognition fixtures:
// a transistor alone in its subcircuit instance (a process kit's wrapper) is named by the
// X instance, as the schematic shows it; one of several in a subcircuit keeps its instance
// path; top-level devices keep their names; mirrors are labelled with the designer's name.
#include <string>

#include <doctest/doctest.h>

#include "src/model/circuit_build.hpp"
#include "src/analyse/designer_names.hpp"
#include "src/recognise/find_mirrors.hpp"

using namespace mirrorcheck;

namespace {

std::string fixture(const std::string& name) { return std::string(MIRRORCHECK_TEST_DATA) + "/recognise/" + name; }

}  // namespace

TEST_CASE("a wrapped transistor is named by its X instance, inside a designer's subcircuit too") {
    Circuit c = read_circuit(fixture("pdk_wrapped.cir"));
    const auto mirrors = find_mirrors(c);
    const DesignerNames names = find_designer_names(c, mirrors);
    REQUIRE(c.find_device("m.xbias.xm4.m0"));
    CHECK(designer_name(names, "m.xbias.xm4.m0") == "xbias.xm4");
    CHECK(designer_name(names, "m.xbias.xm1.m0") == "xbias.xm1");
    CHECK(designer_name(names, "vdd") == "vdd");  // top level: as written
    REQUIRE(mirrors.size() == 1);
    CHECK(mirrors[0].id == "nmos-cascode:m.xbias.xm4.m0");  // the stable id is ngspice's
    CHECK(designer_name(names, mirrors[0].id) == "nmos-cascode:xbias.xm4");
}

TEST_CASE("a transistor among several in a subcircuit keeps its instance path") {
    Circuit c = read_circuit(fixture("subckt_twice.cir"));
    const DesignerNames names = find_designer_names(c, find_mirrors(c));
    CHECK(designer_name(names, "m.x1.m2") == "x1.m2");
    CHECK(designer_name(names, "m.x2.m1") == "x2.m1");
}
