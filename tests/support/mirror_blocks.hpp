// Test support: a large flat circuit built directly as a Circuit, for the recognition
// test and its benchmark (both count on its make-up: 4 mirrors per block).
#pragma once

#include <memory>
#include <string>

#include "src/model/circuit.hpp"

namespace mirrorcheck::test {

// A flat circuit of `blocks` copies of a 16-transistor block built directly as a Circuit: a
// standard cascode mirror (4), a Wilson mirror (3), a simple mirror with two outputs (3), a
// regulated cascode mirror (4) and a CMOS inverter (2), which is no mirror.
struct BlockBuilder {
    Circuit circuit;
    std::shared_ptr<mirrorcheck::Model> nch = model("nch", "nmos");
    std::shared_ptr<mirrorcheck::Model> pch = model("pch", "pmos");

    static std::shared_ptr<mirrorcheck::Model> model(const std::string& name, const std::string& type) {
        auto m = std::make_shared<mirrorcheck::Model>();
        m->name = m->ngspice_name = name;
        m->type = type;
        return m;
    }

    void mos(const std::string& name, const std::string& d, const std::string& g, const std::string& s, bool p = false) {
        mirrorcheck::Device dev;
        dev.kind = mirrorcheck::DeviceKind::mosfet;
        dev.name = dev.local_name = name;
        dev.terminals = {{"d", d}, {"g", g}, {"s", s}, {"b", p ? "vdd" : "0"}};
        dev.parameters = {{"w", 10e-6}, {"l", 1e-6}};
        dev.model = p ? pch : nch;
        circuit.add_device(std::move(dev));
    }

    void block(std::size_t i) {
        std::string n = "_" + std::to_string(i);
        mos("mc1" + n, "cg" + n, "cg" + n, "0");
        mos("mc3" + n, "cref" + n, "cref" + n, "cg" + n);
        mos("mc2" + n, "cmid" + n, "cg" + n, "0");
        mos("mc4" + n, "cout" + n, "cref" + n, "cmid" + n);
        mos("mw2" + n, "wg" + n, "wg" + n, "0");
        mos("mw1" + n, "wy" + n, "wg" + n, "0");
        mos("mw3" + n, "wout" + n, "wy" + n, "wg" + n);
        mos("ms1" + n, "sref" + n, "sref" + n, "0");
        mos("ms2" + n, "so1" + n, "sref" + n, "0");
        mos("ms3" + n, "so2" + n, "sref" + n, "0");
        mos("mr1" + n, "rref" + n, "rref" + n, "0");
        mos("mr2" + n, "rs" + n, "rref" + n, "0");
        mos("mr4" + n, "rout" + n, "ra" + n, "rs" + n);
        mos("mr5" + n, "ra" + n, "rs" + n, "0");
        mos("mn" + n, "inv" + n, "in" + n, "0");
        mos("mp" + n, "inv" + n, "in" + n, "vdd", true);
    }
};

}  // namespace mirrorcheck::test
