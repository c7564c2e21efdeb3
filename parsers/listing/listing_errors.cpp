#include "parsers/listing/listing_errors.hpp"

#include <fmt/format.h>

namespace mirrorcheck::errors {

InputError listing_no_table(const std::string& path) {
    return {"listing.no-table", {path},
            "no `show` table found; expected ngspice's `show` output: a model-type line such as "
            "` Mos1: Level 1 MOSfet model ...` followed by a `device` row naming the devices"};
}

InputError listing_missing_device_row(const Location& where, std::string_view model_type) {
    return {"listing.missing-device-row", where,
            fmt::format("the `{}` table has no `device` row; expected the row naming the devices "
                        "right under the model-type line",
                        model_type)};
}

InputError listing_no_devices(const Location& where) {
    return {"listing.no-devices", where, "the `device` row names no device; expected one to three names"};
}

InputError listing_row_width(const Location& where, std::string_view row, std::size_t expected,
                             std::size_t found) {
    return {"listing.row-width", where,
            fmt::format("row `{}` has {} value{}; expected {}, one for each device of the table", row,
                        found, found == 1 ? "" : "s", expected)};
}

InputError listing_bad_number(const Location& where, std::string_view row, std::string_view text) {
    return {"listing.bad-number", where,
            fmt::format("`{}` in row `{}` is not a number; expected a value such as 1e-06, -0 or 0.000102008",
                        text, row)};
}

InputError listing_expected_number(const Location& where, std::string_view row, std::string_view text) {
    return {"listing.expected-number", where,
            fmt::format("`{}` in row `{}` is text where the other devices have numbers; expected a number "
                        "or the placeholder `-`",
                        text, row)};
}

InputError listing_stray_continuation(const Location& where) {
    return {"listing.stray-continuation", where,
            "a row without a parameter name that does not follow a parameter row; expected a parameter "
            "name in the first 11 columns"};
}

InputError listing_misaligned_row(const Location& where, std::string_view row) {
    return {"listing.misaligned-row", where,
            fmt::format("a continuation line of row `{}` has a value outside the device columns; expected "
                        "values right-aligned in ngspice's 22-character columns",
                        row)};
}

InputError listing_truncated(const Location& where, std::string_view model_type) {
    return {"listing.truncated", where,
            fmt::format("the file ends inside the `{}` table; expected the blank line ngspice prints after "
                        "each table (was the file cut short?)",
                        model_type)};
}

}  // namespace mirrorcheck::errors
