// Reader for SPICE netlists in the ngspice dialect: reads a deck and everything it includes
// and returns plain data: the flattened devices, every one named as ngspice names it, their
// models, and what a tool needs to write a derived copy of the deck (the statements that
// describe no part of the circuit, and where each file names another).
//
// Paths are resolved as ngspice 39 resolves them when it runs the deck from the deck's own
// folder (the "working folder"), found with decks of our own and in its inpcom.c:
//   `.include X` in file F      ./X (the working folder), else F's folder / X
//   `.lib X section` read from the top file or a file it includes
//                               ./X, else the top file's folder / X (the same folder here)
//   `.lib X section` inside a library section of the file L
//                               ./X, else the folder of L (symbolic links resolved) / X
// An absolute path is taken as it is.
#pragma once

#include <cstddef>
#include <cstdint>
#include <filesystem>
#include <map>
#include <optional>
#include <span>
#include <string>
#include <string_view>
#include <vector>

#include "parsers/common/input_error.hpp"

namespace mirrorcheck::netlist {

enum class ElementKind {
    resistor, capacitor, inductor, coupling, vsource, isource, vcvs, cccs, vccs, ccvs, behavioural,
    diode, mosfet, bjt, jfet,
    other,  // anything else ngspice accepts (switches, lines, XSPICE A devices), kept with its nets
};

// A line of a source file.
struct FileLine {
    std::string file;
    std::size_t line = 0;
};

// A `.model` card evaluated for the devices that use it.
struct FlatModel {
    std::string name;          // as the device line names it
    std::string ngspice_name;  // the bin ("nch.9"), prefixed for subcircuit-local models ("xm1:nch")
    std::string type;          // lower case: nmos, pmos, npn, d, r, ...
    double level = 1;
    std::optional<double> version;
    std::map<std::string, double> parameters;  // the parameters that evaluate to numbers
    std::map<std::string, std::string> text;   // the others, as written
    FileLine source;
};

inline constexpr std::uint32_t no_index = 0xffffffff;

// One X line on the way from the top level to a device: an instance of a subcircuit.
struct FlatInstance {
    std::string instance;  // lower case, as written ("xm1")
    std::string subckt;
    FileLine source;
    std::uint32_t parent = no_index;  // the instance it sits in; no_index at the top level
};

// A device's terminals, parameters and texts are kept in tables of the netlist, every net
// and parameter name once (a million-element deck reads into well under 300 MB); read
// them through FlatNetlist's accessors.
struct FlatTerminal {
    std::uint32_t role = 0;  // into FlatNetlist::words: d g s b, c b e s, pos neg, ...
    std::uint32_t net = 0;   // into FlatNetlist::nets: ngspice's flattened net name; ground is "0"
};

struct FlatParameter {
    std::uint32_t name = 0;  // into FlatNetlist::words
    double value = 0;
};

struct FlatText {
    std::string key;  // "transient", "expression", "control", ...
    std::string text;
};

struct FlatRange {
    std::uint32_t first = 0;
    std::uint32_t count = 0;
};

struct FlatDevice {
    ElementKind kind = ElementKind::other;
    std::uint32_t local_length = 0;     // the name on its own line is the last local_length characters
    std::uint32_t instance = no_index;  // into FlatNetlist::instances: the innermost X line above it
    std::uint32_t model = no_index;     // into FlatNetlist::models
    std::uint32_t file = 0;             // into FlatNetlist::source_files
    std::uint32_t line = 0;             // its element line
    FlatRange terminals;   // in FlatNetlist::terminal_table, in the order of the element line
    FlatRange parameters;  // in FlatNetlist::parameter_table: instance parameters, evaluated; MOS geometry scaled
    FlatRange texts;       // in FlatNetlist::text_table
    std::optional<double> value;  // R, C, L, source dc, gain
    std::string name;             // ngspice's flattened name: "m.x1.m2"

    // The name on its own line: "m2".
    std::string_view local_name() const { return std::string_view(name).substr(name.size() - local_length); }
};

// A statement that describes no part of the circuit: a `.control` ... `.endc` block, an
// analysis (`.op .ac .dc .tran .tf .noise .pz .sens .disto .pss .sp`), an output request
// (`.save .probe .print .plot .meas .four .width`), or `.end`.
struct Card {
    enum class Kind { control_block, analysis, output, end } kind = Kind::analysis;
    std::string keyword;  // lower case, with its dot: ".tran", ".control", ".end"
    FileLine first;       // its first physical line
    std::size_t last_line = 0;  // its last physical line (a continuation, or `.endc`)
    std::string text;     // as written, continuations joined; `.control` for a control block
};

// A file named by `.include` or `.lib FILE SECTION`, where it is named and what it resolved to.
struct FileReference {
    FileLine where;           // the statement's line
    std::size_t column = 0;   // where the name starts on that physical line, 1-based (its quote, if quoted)
    std::size_t length = 0;   // characters of the name as written, quotes included
    std::string written;      // the name without quotes
    std::filesystem::path resolved;  // absolute and normal
    bool library = false;     // `.lib FILE SECTION`
    bool via_working_folder = false;  // found through ./ rather than the naming file's own folder
};

// A file the deck read, and how.
struct ReadFile {
    std::filesystem::path path;  // absolute and normal
    // top: the deck itself; included: reached by `.include` from the top file (not through a
    // library); library: a `.lib` file, or a file reached from one.
    enum class Role { top, included, library } role = Role::included;
};

struct FlatNetlist {
    std::string title;  // the first line
    std::vector<FlatDevice> devices;
    std::vector<FlatModel> models;
    std::vector<std::string> control_blocks;  // each block's text between `.control` and `.endc`
    std::vector<Card> cards;                  // in reading order
    std::vector<FileReference> references;    // in reading order
    std::vector<ReadFile> files;              // in the order first read
    std::optional<double> temperature;        // `.temp`

    // The tables the devices point into.
    std::vector<FlatInstance> instances;
    std::vector<std::string> nets;          // each net once
    std::vector<std::string> words;         // terminal roles and parameter names, each once
    std::vector<std::string> source_files;  // the files element lines were read from
    std::vector<FlatTerminal> terminal_table;
    std::vector<FlatParameter> parameter_table;
    std::vector<FlatText> text_table;

    std::span<const FlatTerminal> terminals(const FlatDevice& d) const {
        return {terminal_table.data() + d.terminals.first, d.terminals.count};
    }
    std::span<const FlatParameter> parameters(const FlatDevice& d) const {
        return {parameter_table.data() + d.parameters.first, d.parameters.count};
    }
    std::span<const FlatText> texts(const FlatDevice& d) const { return {text_table.data() + d.texts.first, d.texts.count}; }
    const std::string& net(const FlatTerminal& t) const { return nets[t.net]; }
    const std::string& role(const FlatTerminal& t) const { return words[t.role]; }
    const std::string& name(const FlatParameter& p) const { return words[p.name]; }
    FileLine source(const FlatDevice& d) const { return {source_files[d.file], d.line}; }
    // The X lines above a device, outermost first.
    std::vector<const FlatInstance*> hierarchy(const FlatDevice& d) const;
};

// How far the reader goes before it calls a deck hostile (or a mistake): each limit is
// far above real designs, and reaching one is an InputError naming it and where.
struct ReadLimits {
    // Devices after flattening: a few subcircuit levels that each instantiate the next
    // twice multiply into millions. The reader needs about 270 bytes a device, the commands
    // that keep the whole circuit (list, peek, review) about 1 to 5 kB.
    // 2^20: a million-element deck reads; the 2^20 + 1 devices of a 20-level bomb do not.
    std::size_t max_devices = std::size_t{1} << 20;
};

// Reads, expands and flattens the netlist at `path`. Throws InputError (codes "netlist.*",
// "input.*") naming file:line:column and what was expected.
FlatNetlist read_netlist(const std::filesystem::path& path, const ReadLimits& limits = {});

}  // namespace mirrorcheck::netlist
