// Test support for the netlist reader's differential tests: reads ngspice's `listing
// expand` and `show` output and checks a flattened Circuit against them.
#pragma once

#include <doctest/doctest.h>

#include <map>
#include <regex>
#include <sstream>
#include <string>
#include <vector>

#include "src/model/circuit.hpp"

namespace mirrorcheck::test::netlist {


struct Listed {
    std::string name;
    std::vector<std::string> tokens;  // after the name
};

// The element lines of `listing expand`: "   12 : m.x1.m2 d g 0 0 nch w=1u". ngspice lists
// the title first, unless it starts with `*`.
inline std::vector<Listed> listed_elements(const std::string& output, const std::string& title) {
    static const std::regex line_re(R"(^\s*\d+ : (.*)$)");
    std::vector<Listed> out;
    std::istringstream in(output);
    std::string line;
    while (std::getline(in, line)) {
        std::smatch m;
        if (!std::regex_match(line, m, line_re)) continue;
        if (out.empty() && mirrorcheck::to_lower(m[1].str()) == mirrorcheck::to_lower(title)) continue;
        std::istringstream words(m[1].str());
        Listed l;
        words >> l.name;
        if (l.name.empty() || l.name[0] == '.') continue;
        for (std::string w; words >> w;) l.tokens.push_back(w);
        out.push_back(std::move(l));
    }
    return out;
}

// `show all` blocks: the "device" row names the columns, later rows give their values.
inline std::map<std::string, std::map<std::string, std::string>> shown_devices(const std::string& output) {
    std::map<std::string, std::map<std::string, std::string>> out;
    std::istringstream in(output);
    std::string line;
    std::vector<std::string> columns;
    while (std::getline(in, line)) {
        std::istringstream words(line);
        std::string key;
        words >> key;
        std::vector<std::string> values;
        for (std::string w; words >> w;) values.push_back(w);
        if (key == "device") {
            columns = values;
            continue;
        }
        if (key.empty()) {
            columns.clear();
            continue;
        }
        if (values.size() != columns.size()) continue;
        for (std::size_t i = 0; i < columns.size(); ++i) out[columns[i]].try_emplace(key, values[i]);
    }
    return out;
}

inline std::string nets_of(const mirrorcheck::Device& d) {
    std::string s;
    for (const auto& t : d.terminals) s += t.net + " ";
    return s;
}

// Every element ngspice lists is ours with the same nets, and we have no others.
inline void check_against_listing(const mirrorcheck::Circuit& c, const std::vector<Listed>& listed) {
    REQUIRE(!listed.empty());
    CHECK(listed.size() == c.devices().size());
    for (const Listed& l : listed) {
        const mirrorcheck::Device* d = c.find_device(l.name);
        REQUIRE_MESSAGE(d != nullptr, "ngspice has " << l.name << ", we do not");
        CHECK(d->name == l.name);
        std::string theirs;
        for (std::size_t i = 0; i < d->terminals.size() && i < l.tokens.size(); ++i) theirs += l.tokens[i] + " ";
        CHECK_MESSAGE(nets_of(*d) == theirs, l.name);
        std::size_t after = d->terminals.size();
        if (d->kind == mirrorcheck::DeviceKind::coupling) {
            REQUIRE(l.tokens.size() >= 2);
            CHECK(d->text.at("inductor1") == l.tokens[0]);
            CHECK(d->text.at("inductor2") == l.tokens[1]);
        }
        if ((d->kind == mirrorcheck::DeviceKind::cccs || d->kind == mirrorcheck::DeviceKind::ccvs) && d->text.count("control")) {
            REQUIRE(l.tokens.size() > after);
            CHECK(d->text.at("control") == l.tokens[after]);
        }
        if (d->model) {
            // The model follows the nodes (after the value, for R C L); a bin is listed by its base name.
            const std::string& name = d->model->ngspice_name;
            bool found = false;
            for (std::size_t i = after; i < l.tokens.size(); ++i)
                found = found || l.tokens[i] == name || name.rfind(l.tokens[i] + ".", 0) == 0;
            CHECK_MESSAGE(found, l.name << ": ours " << name);
        }
    }
}

// ngspice's `show` cuts names to this many characters.
constexpr std::size_t shown_width = 21;

inline std::string cut(const std::string& name) { return name.substr(0, shown_width); }

// Models (bins resolved) and multipliers as `show` reports them; returns how many devices
// with a model were compared.
// `unset_m` is what ngspice shows for an m nobody gave: 0 before an analysis, 1 after.
inline std::size_t check_against_show(const mirrorcheck::Circuit& c, const std::string& output, double unset_m = 0) {
    auto shown = shown_devices(output);
    std::size_t models = 0;
    for (const mirrorcheck::Device& d : c.devices()) {
        if (!d.model || d.kind == mirrorcheck::DeviceKind::resistor || d.kind == mirrorcheck::DeviceKind::capacitor)
            continue;
        auto it = shown.find(cut(d.name));
        REQUIRE_MESSAGE(it != shown.end(), "ngspice shows no " << d.name);
        CHECK_MESSAGE(it->second.at("model") == cut(d.model->ngspice_name), d.name);
        ++models;
        if (auto m = it->second.find("m"); m != it->second.end() && d.kind == mirrorcheck::DeviceKind::mosfet)
            CHECK_MESSAGE(std::stod(m->second) == d.parameter("m").value_or(unset_m), d.name);
    }
    return models;
}

}  // namespace mirrorcheck::test::netlist
