#include "parsers/common/input_kind.hpp"

#include "parsers/common/errors.hpp"
#include "parsers/common/mapped_file.hpp"
#include "parsers/listing/listing.hpp"
#include "parsers/raw/raw.hpp"

namespace mirrorcheck {

InputKind detect_input_kind(const std::filesystem::path& path) {
    MappedFile file(path);
    if (file.bytes().empty()) throw errors::empty_file(file.path());
    if (raw::looks_like_raw(file.bytes())) return InputKind::raw;
    if (listing::looks_like_listing(file.bytes())) return InputKind::listing;
    return InputKind::netlist;
}

}  // namespace mirrorcheck
