// The deck writer's error catalogue.
#include "src/deck/deck_errors.hpp"

#include <fmt/format.h>

namespace mirrorcheck::deck_errors {

InputError card_in_library(const Location& where, std::string_view keyword) {
    return {"prepare.card-in-library", where,
            fmt::format("this library section holds `{}`, which the review deck must leave out, but a library is "
                        "read by ngspice from its own file and cannot be given a derived copy; move the card into "
                        "the deck",
                        keyword)};
}

InputError cannot_write(const Location& where, std::string_view what) {
    return {"prepare.cannot-write", where, fmt::format("cannot write {} here", what)};
}

}  // namespace mirrorcheck::deck_errors
