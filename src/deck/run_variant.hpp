// One run of a sweep as ngspice is to simulate it: the review deck's text (review_deck.hpp,
// the derived copy of the user's deck with the review's probes and control block) with
// the run's corner, temperature, supplies, parameters and Monte Carlo seed put in. The
// user's files are never touched; the edits keep the deck's lines where they are:
//   - corner: the section word of the deck's `.lib FILE SECTION` line whose library holds
//     a section for every corner asked for (`.lib "sm141064.ngspice" typical` -> `ss`);
//     in a deck with no such line, the corner word of every `.include` whose file name
//     carries one, as SKY130's cell files do (`..._nfet_01v8__tt.corner.spice` -> `__ss.`):
//     a word of the file name is a corner word when a file named with each corner asked
//     for in its place sits beside it;
//   - temperature: the deck's own `.temp` lines become comments, and `.temp T` is added;
//   - parameters: `.param NAME=VALUE` added after the deck's own (the last one wins);
//   - Monte Carlo: `setseed S` and `reset` open the control block, so that ngspice reads
//     the deck again and draws its `agauss`/`gauss` values from that seed;
//   - supplies: `alter NAME dc=V` before the analyses.
// Added lines go just before the review's `.control` line and into its block.
#pragma once

#include <filesystem>
#include <optional>
#include <string>
#include <utility>
#include <vector>

namespace mirrorcheck {

struct RunVariant {
    std::optional<std::string> corner;
    std::optional<double> temperature;                     // °C
    std::vector<std::pair<std::string, double>> supplies;  // source name, DC volts
    std::vector<std::pair<std::string, std::string>> params;  // --param NAME=VALUE, as typed
    std::optional<unsigned long> seed;                     // Monte Carlo draw
};

// A line of the deck that a run's corner changes (0-based index): a `.lib` line's section
// (`word` empty), or the corner word `word`, at `at` in the file name of an `.include`.
struct CornerLine {
    std::size_t line = 0;
    std::string word;
    std::size_t at = 0;
};

// The `.lib` line of `deck_text` whose library file holds every one of `corners` as a
// section; else every `.include` line whose file name has a corner word for all of them.
// Throws InputError "sweep.no-corner-lib" when the deck has neither, "sweep.unknown-corner"
// naming the library that lacks a corner.
std::vector<CornerLine> find_corner_lines(const std::string& deck_text, const std::vector<std::string>& corners,
                                          const std::filesystem::path& deck_path);

// The deck text of one run; `corner_lines` from find_corner_lines when a corner is set.
std::string write_run_variant(const std::string& deck_text, const RunVariant& run,
                              const std::vector<CornerLine>& corner_lines);

}  // namespace mirrorcheck
