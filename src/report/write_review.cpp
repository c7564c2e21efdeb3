// Picks the back end for a review.
#include "src/report/junit_report.hpp"
#include "src/report/review_report.hpp"
#include "src/report/text_layout.hpp"

namespace mirrorcheck::report {

std::optional<Format> parse_format(std::string_view name) {
    if (name == "table") return Format::table;
    if (name == "json") return Format::json;
    if (name == "junit") return Format::junit;
    return std::nullopt;
}

void write_review(Format format, const ReviewTree& tree, std::ostream& out, const TableStyle& style) {
    switch (format) {
        case Format::table:
            out << terminal_text(write_review_table(tree, style), style.colour);
            break;
        case Format::json:
            write_review_json(tree, out);
            break;
        case Format::junit:
            out << review_to_junit(tree);
            break;
    }
}

}  // namespace mirrorcheck::report
