// Reader for the text ngspice prints for `show all` and `show <device>`.
#pragma once

#include <cstddef>
#include <filesystem>
#include <map>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

namespace mirrorcheck::listing {

struct DeviceListing {
    std::string name;              // as printed, lower case; ngspice cuts long names to 21 characters
    bool maybe_cut = false;        // true when the printed name may have been cut short
    std::string model;             // the `model` row, empty for devices without one (sources)
    bool model_maybe_cut = false;  // true when the printed model name may have been cut short
    std::string model_type;        // the header's name, e.g. "BSIM4v5", "Mos1", "Vsource"
    std::string model_description; // the header's text after the colon
    std::map<std::string, double> parameters;       // numeric rows; `-` placeholders left out
    std::map<std::string, std::string> text_values; // rows that are neither numbers nor `-`
    std::map<std::string, std::vector<double>> vectors; // rows printed over several lines (pulse, sin)
    std::size_t line = 0;          // line of the `device` row that named it
};

struct Listing {
    std::string path;
    std::vector<DeviceListing> devices;
    // The device of that printed name (case-insensitive), or nullptr.
    const DeviceListing* find(std::string_view name) const;
    // The devices that may stand for a full device name: the one printed with that name,
    // or those whose printed name was cut short and starts the full name.
    std::vector<const DeviceListing*> find_candidates(std::string_view full_name) const;
};

// The length ngspice cuts device and model names to in a `show` table.
inline constexpr std::size_t printed_name_length = 21;

// Reads a file holding `show` output, possibly mixed with other ngspice output.
// Throws mirrorcheck::InputError (file, line, what was expected) on malformed tables.
// A device shown more than once (`show m1`, then `show all`) is listed once: the later
// table's rows replace the earlier ones of the same name, other rows are kept. Names that
// may have been cut are never merged, since distinct devices can share a cut name.
Listing read_listing(const std::filesystem::path& path);

// The same on text already in memory; `path` is used in error messages only.
Listing parse_listing(std::string_view text, const std::string& path);

// True when the text holds at least one `show` table.
bool looks_like_listing(std::string_view text);

}  // namespace mirrorcheck::listing
