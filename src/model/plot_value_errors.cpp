#include "src/model/plot_value_errors.hpp"

#include <cmath>

#include <fmt/format.h>

namespace mirrorcheck::errors {
namespace {

std::string describe(double value) {
    return std::isnan(value) ? "not a number (NaN)" : value > 0 ? "+infinity" : "-infinity";
}

}  // namespace

InputError op_value_not_finite(const Location& where, std::string_view plot, std::string_view vector, double value) {
    return {"op.not-finite", where,
            fmt::format("`{}` in the plot `{}` is {}; an operating point needs finite values (did the run "
                        "converge?)",
                        vector, plot, describe(value))};
}

InputError ac_bad_frequency(const Location& where, std::string_view plot, std::size_t point, double value) {
    return {"ac.bad-frequency", where,
            fmt::format("point {} of the plot `{}` is at frequency {}; expected a finite frequency, 0 Hz or above", point + 1,
                        plot, std::isfinite(value) ? fmt::format("{:g} Hz", value) : describe(value))};
}

}  // namespace mirrorcheck::errors
