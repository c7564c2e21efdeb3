// libFuzzer target: the netlist reader with its includes, libraries, parameters and the
// expression evaluator, then the circuit built from it, its mirrors recognised and both
// dumped as `list` would. Anything but an InputError is a finding.
//
// One input is several files: a line `*@file NAME` (a comment to ngspice, so that every
// seed is still a deck) starts the file NAME, which the deck can `.include` or `.lib`;
// the text before the first such line is the deck. Names keep [A-Za-z0-9._-/] and may not
// climb out of the scratch folder.
#include <cstddef>
#include <cstdint>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

#include "parsers/common/input_error.hpp"
#include "parsers/netlist/netlist.hpp"
#include "src/model/circuit_build.hpp"
#include "src/recognise/find_mirrors.hpp"
#include "src/report/circuit_dump.hpp"
#include "src/report/json_text.hpp"
#include "src/report/mirror_list.hpp"
#include "tests/fuzz/fuzz_files.hpp"

using namespace mirrorcheck;

namespace {

constexpr std::string_view marker = "*@file ";

// A file name from the fuzzer's bytes, or "" when it cannot be one of ours.
std::string safe_name(std::string_view raw) {
    std::string name;
    for (char c : raw.substr(0, 40))
        if ((c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z') || (c >= '0' && c <= '9') || c == '.' || c == '_' ||
            c == '-' || c == '/')
            name += c;
    while (!name.empty() && name.front() == '/') name.erase(0, 1);
    if (name.empty() || name.find("..") != std::string::npos || name.back() == '/') return {};
    return name;
}

// (name, text) for the deck and every `*@file` part.
std::vector<std::pair<std::string, std::string_view>> split_files(std::string_view bytes) {
    std::vector<std::pair<std::string, std::string_view>> files;
    std::string name = "deck.cir";
    std::size_t start = 0, pos = 0;
    while (pos <= bytes.size()) {
        const std::size_t eol = std::min(bytes.find('\n', pos), bytes.size());
        const std::string_view line = bytes.substr(pos, eol - pos);
        if (line.substr(0, marker.size()) == marker && files.size() < 8) {
            files.emplace_back(name, bytes.substr(start, pos - start));
            name = safe_name(line.substr(marker.size()));
            start = eol + 1;
        }
        pos = eol + 1;
    }
    files.emplace_back(name, bytes.substr(std::min(start, bytes.size())));
    return files;
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    const fuzz::Scratch& scratch = fuzz::scratch();
    scratch.clear();
    for (const auto& [name, text] : split_files(fuzz::as_text(data, size))) {
        if (name.empty()) continue;
        std::error_code ec;
        std::filesystem::create_directories((scratch.dir() / name).parent_path(), ec);
        if (!std::filesystem::is_directory(scratch.dir() / name)) scratch.write(name, text);
    }
    netlist::ReadLimits limits;
    // The limit's error, not a million devices per input; 2,000 keeps a unit under a second
    // (5,661 devices from a 4.5 KB deck made a 24 MB JSON dump, 12 s under the sanitizers).
    limits.max_devices = 2'000;
    try {
        const Circuit circuit = read_circuit(scratch.dir() / "deck.cir", limits);
        const auto mirrors = find_mirrors(circuit);
        (void)report::write_circuit_table(circuit);
        (void)report::json_text(report::circuit_to_json(circuit));
        (void)report::write_mirror_table(circuit, mirrors);
        (void)report::json_text(report::mirrors_to_json(circuit, mirrors));
    } catch (const InputError&) {
    }
    return 0;
}
