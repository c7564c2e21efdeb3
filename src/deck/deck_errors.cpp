// The deck writer's and the ngspice runner's error catalogue.
#include "src/deck/deck_errors.hpp"

#include <fmt/format.h>

namespace mirrorcheck::errors {

InputError deck_not_writable(const std::string& deck_path) {
    return {"ngspice.failed", Location(deck_path), "cannot write the deck into this folder"};
}

InputError ngspice_missing(const std::string& executable, const std::string& log_tail) {
    return {"ngspice.missing", Location(executable),
            fmt::format("cannot start `{}`: install ngspice (Debian: apt-get install ngspice) or give its path with "
                        "--ngspice{}",
                        executable, log_tail)};
}

InputError ngspice_no_convergence(const std::string& log_path, const std::string& log_tail) {
    return {"ngspice.no-convergence", Location(log_path),
            fmt::format("ngspice did not converge on the operating point; check the netlist's bias, or help it with "
                        ".nodeset or .option gmin/itl1. The end of its log:{}",
                        log_tail)};
}

InputError ngspice_timed_out(const std::string& log_path, long seconds, const std::string& deck_name,
                             const std::string& log_tail) {
    return {"ngspice.timeout", Location(log_path),
            fmt::format("ngspice ran longer than {} s on {} and was stopped; give --timeout more time (0: no "
                        "limit) or look at why it is slow. The end of its log:{}",
                        seconds, deck_name, log_tail)};
}

InputError ngspice_failed(const std::string& log_path, const std::string& what, const std::string& deck_name,
                          const std::string& log_tail) {
    return {"ngspice.failed", Location(log_path),
            fmt::format("ngspice {} on {}. The end of its log:{}", what, deck_name, log_tail)};
}

InputError card_in_library(const Location& where, std::string_view keyword) {
    return {"prepare.card-in-library", where,
            fmt::format("this library section holds `{}`, which the review deck must leave out, but a library is "
                        "read by ngspice from its own file and cannot be given a derived copy; move the card into "
                        "the deck",
                        keyword)};
}

InputError cannot_write(const Location& where, std::string_view what, std::string_view reason) {
    return {"prepare.cannot-write", where, fmt::format("cannot write {} here: {}", what, reason)};
}

InputError no_corner_lib(const std::string& deck_path) {
    return {"sweep.no-corner-lib", Location(deck_path),
            "--corners needs a `.lib FILE SECTION` line naming the deck's corner (e.g. `.lib \"models.lib\" tt`), or "
            "`.include` lines of files named after it with a file for every corner asked for beside each (e.g. "
            "`x__tt.corner.spice` beside `x__ss.corner.spice`); the deck has neither"};
}

InputError ambiguous_corner(const std::string& deck_path, std::size_t line, const std::vector<std::string>& words) {
    std::string listed;
    for (const auto& w : words) listed += (listed.empty() ? "`" : ", `") + w + "`";
    return {"sweep.ambiguous-corner", Location(deck_path, line),
            fmt::format("the deck includes files of one family named {}, and any could be its corner; name the deck's "
                        "own corner among --corners (e.g. --corners {},ss,ff)",
                        listed, words.front())};
}

InputError unknown_corner(const std::string& library, const std::string& corner, const std::string& sections) {
    return {"sweep.unknown-corner", Location(library),
            fmt::format("no section `{}` here: expected one of the library's sections ({})", corner, sections)};
}

}  // namespace mirrorcheck::errors
