// Reads the tables ngspice prints for `show all` and `show <device>`.
//
// ngspice 39 prints, for each group of up to (width - 11) / 22 devices of one model type
// (3 at the default width of 80): a line ` Type: description`, a `device` row, a `model`
// row (only for devices that have a model), one row per parameter, and a blank line.
// Row names are right-aligned in the first 11 columns and cut to 11 characters. Each value
// is a space and 21 right-aligned characters: numbers as %.6g, names cut to 21 characters.
// A device without a value prints the 10-character placeholder `         -`, so placeholders
// are not column-aligned; on the first line of a row, values are therefore taken in order.
// Vector parameters (source waveforms such as `pulse`) go on over further lines whose name
// column is empty; there a device whose vector has ended prints 10 blanks, so those lines
// are read by column position. Text outside the tables is skipped.
#include "parsers/listing/listing.hpp"

#include <algorithm>
#include <charconv>
#include <map>
#include <optional>
#include <utility>

#include "parsers/common/errors.hpp"
#include "parsers/common/text.hpp"
#include "parsers/common/mapped_file.hpp"
#include "parsers/listing/listing_errors.hpp"

namespace mirrorcheck::listing {
namespace {

constexpr std::size_t name_columns = 11;
constexpr std::size_t value_cell_width = 22;
constexpr std::size_t empty_cell_width = 10;

struct Line {
    std::string_view text;
    std::size_t number = 0;
};

struct Cell {
    std::string_view text;
    std::size_t start = 0;  // offset of its first character in the line
    std::size_t end() const { return start + text.size(); }
};

// `unavailable` is ngspice's `<<NAN, error = N>>`, printed when a device cannot report a value.
enum class CellKind { number, placeholder, unavailable, text };

struct Value {
    CellKind kind = CellKind::placeholder;
    double number = 0.0;
    std::string_view text;
};

struct Header {
    std::string model_type;
    std::string description;
};

// A parameter row and its continuation lines: each device's values, in order.
struct Row {
    std::string name;
    std::vector<std::vector<Value>> values;
};

// One table while it is being read.
struct Table {
    std::string model_type;
    std::vector<DeviceListing> devices;
    std::optional<Row> row;
};

bool is_space(char c) { return c == ' ' || c == '\t' || c == '\r' || c == '\v' || c == '\f'; }

bool is_blank(std::string_view text) { return std::all_of(text.begin(), text.end(), is_space); }

bool is_alpha(char c) { return (c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z'); }

bool is_digit(char c) { return c >= '0' && c <= '9'; }

std::string_view trim_end(std::string_view text) {
    while (!text.empty() && is_space(text.back())) text.remove_suffix(1);
    return text;
}

std::vector<Line> split_lines(std::string_view text) {
    std::vector<Line> lines;
    for (std::size_t number = 1; !text.empty(); ++number) {
        std::size_t end = text.find('\n');
        std::string_view line = text.substr(0, end);
        if (!line.empty() && line.back() == '\r') line.remove_suffix(1);
        lines.push_back({line, number});
        if (end == std::string_view::npos) break;
        text.remove_prefix(end + 1);
    }
    return lines;
}

// `<<NAN, error = 7>>` holds spaces but is one cell.
std::size_t cell_end(std::string_view line, std::size_t start) {
    if (line.substr(start).starts_with("<<")) {
        std::size_t close = line.find(">>", start + 2);
        return close == std::string_view::npos ? line.size() : close + 2;
    }
    std::size_t end = start;
    while (end < line.size() && !is_space(line[end])) ++end;
    return end;
}

std::vector<Cell> split_cells(std::string_view line) {
    std::vector<Cell> cells;
    std::size_t at = 0;
    while (true) {
        while (at < line.size() && is_space(line[at])) ++at;
        if (at >= line.size()) break;
        std::size_t end = cell_end(line, at);
        cells.push_back({line.substr(at, end - at), at});
        at = end;
    }
    return cells;
}

std::string_view first_word(std::string_view line) {
    auto cells = split_cells(line);
    return cells.empty() ? std::string_view{} : cells.front().text;
}

bool is_type_name(std::string_view text) {
    return !text.empty() && is_alpha(text.front()) &&
           std::all_of(text.begin(), text.end(), [](char c) { return is_alpha(c) || is_digit(c) || c == '_'; });
}

// ` BSIM4v5: Berkeley Short Channel IGFET Model-4`
std::optional<Header> match_header(std::string_view line) {
    if (line.size() < 2 || line[0] != ' ') return std::nullopt;
    std::size_t colon = line.find(": ", 1);
    if (colon == std::string_view::npos || !is_type_name(line.substr(1, colon - 1))) return std::nullopt;
    std::string_view description = trim_end(line.substr(colon + 2));
    if (description.empty()) return std::nullopt;
    return Header{std::string(line.substr(1, colon - 1)), std::string(description)};
}

bool is_device_row(std::string_view line) { return !line.empty() && is_space(line[0]) && first_word(line) == "device"; }

bool starts_table(const std::vector<Line>& lines, std::size_t index) {
    return index + 1 < lines.size() && match_header(lines[index].text) && is_device_row(lines[index + 1].text);
}

// A row shaped like a table row: a word right-aligned in the name columns, then values.
bool looks_like_table_row(std::string_view line) {
    if (line.size() <= name_columns || is_space(line[name_columns - 1]) || !is_space(line[name_columns]))
        return false;
    std::string_view name = line.substr(0, name_columns);
    std::size_t first = name.find_first_not_of(' ');
    return name.find(' ', first) == std::string_view::npos && !is_blank(line.substr(name_columns));
}

bool is_continuation(std::string_view line) {
    return line.size() > name_columns && is_blank(line.substr(0, name_columns));
}

bool is_placeholder(std::string_view text) {
    auto all_of_char = [&](char c) { return std::all_of(text.begin(), text.end(), [c](char x) { return x == c; }); };
    return text == "-" || (text.size() > 1 && (all_of_char('?') || all_of_char('-')));
}

bool looks_numeric(std::string_view text) {
    if (!text.empty() && (text.front() == '+' || text.front() == '-')) text.remove_prefix(1);
    return !text.empty() && (is_digit(text.front()) || text.front() == '.');
}

std::optional<double> parse_number(std::string_view text) {
    if (text.size() > 1 && text.front() == '+' && text[1] != '-') text.remove_prefix(1);
    double value = 0.0;
    auto [end, status] = std::from_chars(text.data(), text.data() + text.size(), value);
    if (status != std::errc() || end != text.data() + text.size()) return std::nullopt;
    return value;
}

std::string join_texts(const std::vector<Value>& values) {
    std::string joined;
    for (const Value& value : values) {
        if (!joined.empty()) joined += ' ';
        joined += value.text;
    }
    return joined;
}

void store_values(DeviceListing& device, const std::string& name, std::vector<Value> values) {
    std::erase_if(values, [](const Value& v) { return v.kind == CellKind::placeholder; });
    if (values.empty()) return;
    bool all_numbers = std::all_of(values.begin(), values.end(), [](const Value& v) { return v.kind == CellKind::number; });
    if (!all_numbers) {
        device.text_values[name] = join_texts(values);
    } else if (values.size() == 1) {
        device.parameters[name] = values.front().number;
    } else {
        auto& vector = device.vectors[name];
        for (const Value& value : values) vector.push_back(value.number);
    }
}

void finish_row(Table& table) {
    if (!table.row) return;
    for (std::size_t d = 0; d < table.devices.size(); ++d)
        store_values(table.devices[d], table.row->name, std::move(table.row->values[d]));
    table.row.reset();
}

void forget_parameter(DeviceListing& device, const std::string& name) {
    device.parameters.erase(name);
    device.text_values.erase(name);
    device.vectors.erase(name);
}

template <typename Map>
void overwrite_rows(DeviceListing& earlier, const Map& later_rows, Map DeviceListing::*rows) {
    for (const auto& [name, value] : later_rows) {
        forget_parameter(earlier, name);
        (earlier.*rows)[name] = value;
    }
}

void merge_device(DeviceListing& earlier, DeviceListing&& later) {
    if (earlier.model_type != later.model_type) {
        earlier = std::move(later);
        return;
    }
    overwrite_rows(earlier, later.parameters, &DeviceListing::parameters);
    overwrite_rows(earlier, later.text_values, &DeviceListing::text_values);
    overwrite_rows(earlier, later.vectors, &DeviceListing::vectors);
    if (!later.model.empty()) {
        earlier.model = later.model;
        earlier.model_maybe_cut = later.model_maybe_cut;
    }
    earlier.line = later.line;
}

// Why cut names are never merged: two devices of a deep hierarchy, or a differential pair
// in identical bias, can share their first 21 characters and every printed value.
void add_device(Listing& listing, std::map<std::string, std::size_t>& by_name, DeviceListing device) {
    if (device.maybe_cut) {
        listing.devices.push_back(std::move(device));
        return;
    }
    auto [it, inserted] = by_name.try_emplace(device.name, listing.devices.size());
    if (inserted)
        listing.devices.push_back(std::move(device));
    else
        merge_device(listing.devices[it->second], std::move(device));
}

class ListingReader {
public:
    ListingReader(std::string_view text, std::string path)
        : path_(std::move(path)), lines_(split_lines(text)), last_line_complete_(text.ends_with('\n')) {}

    Listing read() const {
        Listing listing{path_, {}};
        std::map<std::string, std::size_t> by_name;
        for (std::size_t i = 0; i < lines_.size();) {
            if (!starts_table(lines_, i)) {
                check_not_headless(i++);
                continue;
            }
            std::vector<DeviceListing> devices;
            i = read_table(i, devices);
            for (DeviceListing& device : devices) add_device(listing, by_name, std::move(device));
        }
        if (listing.devices.empty()) throw errors::listing_no_table(path_);
        return listing;
    }

private:
    Location where(const Line& line, std::size_t offset) const { return {path_, line.number, offset + 1}; }

    void check_not_headless(std::size_t index) const {
        auto header = match_header(lines_[index].text);
        if (!header || index + 1 >= lines_.size() || !looks_like_table_row(lines_[index + 1].text)) return;
        throw errors::listing_missing_device_row(where(lines_[index + 1], 0), header->model_type);
    }

    std::size_t read_table(std::size_t index, std::vector<DeviceListing>& devices) const {
        Table table = start_table(*match_header(lines_[index].text), lines_[index + 1]);
        std::size_t i = index + 2;
        for (; i < lines_.size() && !ends_table(i); ++i) {
            check_not_cut_short(i, table);
            read_row(table, lines_[i], i == index + 2);
        }
        if (i == lines_.size()) throw errors::listing_truncated({path_, lines_.back().number}, table.model_type);
        finish_row(table);
        devices = std::move(table.devices);
        return i;
    }

    // Why the last line is checked first: a file cut mid-row is reported as cut, not as a short row.
    void check_not_cut_short(std::size_t index, const Table& table) const {
        const Line& line = lines_[index];
        if (index + 1 == lines_.size() && !last_line_complete_)
            throw errors::listing_truncated(where(line, line.text.size()), table.model_type);
    }

    bool ends_table(std::size_t index) const { return is_blank(lines_[index].text) || starts_table(lines_, index); }

    Table start_table(const Header& header, const Line& device_row) const {
        auto cells = split_cells(device_row.text);
        if (cells.size() < 2) throw errors::listing_no_devices(where(device_row, device_row.text.size()));
        Table table{header.model_type, {}, {}};
        for (auto cell = cells.begin() + 1; cell != cells.end(); ++cell) {
            DeviceListing device;
            device.name = to_lower(cell->text);
            device.maybe_cut = cell->text.size() == printed_name_length;
            device.model_type = header.model_type;
            device.model_description = header.description;
            device.line = device_row.number;
            table.devices.push_back(std::move(device));
        }
        return table;
    }

    void read_model_row(Table& table, const Line& line) const {
        auto cells = split_cells(line.text);
        cells.erase(cells.begin());
        check_width(cells, table.devices.size(), line, "model");
        for (std::size_t d = 0; d < cells.size(); ++d) {
            table.devices[d].model = std::string(cells[d].text);
            table.devices[d].model_maybe_cut = cells[d].text.size() == printed_name_length;
        }
    }

    void read_row(Table& table, const Line& line, bool first) const {
        if (first && first_word(line.text) == "model") {
            read_model_row(table, line);
        } else if (is_continuation(line.text)) {
            read_continuation(table, line);
        } else {
            finish_row(table);
            read_parameter_row(table, line);
        }
    }

    void read_parameter_row(Table& table, const Line& line) const {
        auto cells = split_cells(line.text);
        std::string name(cells.front().text);
        cells.erase(cells.begin());
        check_width(cells, table.devices.size(), line, name);
        auto values = classify_row(cells, line, name);
        Row row{name, std::vector<std::vector<Value>>(values.size())};
        for (std::size_t d = 0; d < values.size(); ++d) row.values[d].push_back(values[d]);
        table.row = std::move(row);
    }

    void read_continuation(Table& table, const Line& line) const {
        if (!table.row) throw errors::listing_stray_continuation(where(line, 0));
        auto cells = split_cells(line.text);
        auto slots = place_by_column(cells, line, *table.row);
        auto values = classify_row(cells, line, table.row->name);
        for (std::size_t k = 0; k < values.size(); ++k) table.row->values[slots[k]].push_back(values[k]);
    }

    void check_width(const std::vector<Cell>& cells, std::size_t devices, const Line& line,
                     std::string_view row) const {
        if (cells.size() < devices)
            throw errors::listing_row_width(where(line, line.text.size()), row, devices, cells.size());
        if (cells.size() > devices)
            throw errors::listing_row_width(where(line, cells[devices].start), row, devices, cells.size());
    }

    // The device column of each cell of a continuation line: a value ends a 22-character
    // column, an ended vector leaves 10 blanks, `<<NAN, ...>>` is printed unpadded.
    std::vector<std::size_t> place_by_column(const std::vector<Cell>& cells, const Line& line, const Row& row) const {
        std::vector<std::size_t> slots;
        std::size_t column = name_columns, slot = 0;
        for (const Cell& cell : cells) {
            std::size_t width = cell.text.starts_with("<<") ? cell.text.size() + 1
                                                           : std::max(value_cell_width, cell.text.size() + 1);
            std::size_t start = cell.end() >= width ? cell.end() - width : 0;
            if (cell.end() < width || start < column || (start - column) % empty_cell_width != 0)
                throw errors::listing_misaligned_row(where(line, cell.start), row.name);
            slot += (start - column) / empty_cell_width;
            if (slot >= row.values.size()) throw errors::listing_misaligned_row(where(line, cell.start), row.name);
            slots.push_back(slot++);
            column = cell.end();
        }
        return slots;
    }

    // Every device of a row answers the same parameter, so numbers and text never mix.
    std::vector<Value> classify_row(const std::vector<Cell>& cells, const Line& line, std::string_view row) const {
        std::vector<Value> values;
        for (const Cell& cell : cells) values.push_back(classify_cell(cell, line, row));
        auto is_kind = [](CellKind kind) { return [kind](const Value& v) { return v.kind == kind; }; };
        if (std::any_of(values.begin(), values.end(), is_kind(CellKind::number))) {
            auto text = std::find_if(values.begin(), values.end(), is_kind(CellKind::text));
            if (text != values.end()) {
                const Cell& cell = cells[static_cast<std::size_t>(text - values.begin())];
                throw errors::listing_expected_number(where(line, cell.start), row, cell.text);
            }
        }
        return values;
    }

    Value classify_cell(const Cell& cell, const Line& line, std::string_view row) const {
        if (is_placeholder(cell.text)) return {CellKind::placeholder, 0.0, cell.text};
        if (cell.text.starts_with("<<")) return {CellKind::unavailable, 0.0, cell.text};
        if (auto number = parse_number(cell.text)) return {CellKind::number, *number, cell.text};
        if (looks_numeric(cell.text)) throw errors::listing_bad_number(where(line, cell.start), row, cell.text);
        return {CellKind::text, 0.0, cell.text};
    }

    std::string path_;
    std::vector<Line> lines_;
    bool last_line_complete_ = true;
};

}  // namespace

const DeviceListing* Listing::find(std::string_view name) const {
    std::string wanted = to_lower(name);
    auto it = std::find_if(devices.begin(), devices.end(), [&](const DeviceListing& d) { return d.name == wanted; });
    return it == devices.end() ? nullptr : &*it;
}

std::vector<const DeviceListing*> Listing::find_candidates(std::string_view full_name) const {
    std::string wanted = to_lower(full_name);
    std::vector<const DeviceListing*> found;
    for (const DeviceListing& device : devices)
        if (device.name == wanted || (device.maybe_cut && wanted.starts_with(device.name))) found.push_back(&device);
    return found;
}

Listing read_listing(const std::filesystem::path& path) {
    MappedFile file(path);
    return parse_listing(file.bytes(), file.path());
}

Listing parse_listing(std::string_view text, const std::string& path) {
    if (text.empty()) throw errors::empty_file(path);
    return ListingReader(text, path).read();
}

bool looks_like_listing(std::string_view text) {
    auto lines = split_lines(text);
    for (std::size_t i = 0; i < lines.size(); ++i)
        if (starts_table(lines, i)) return true;
    return false;
}

}  // namespace mirrorcheck::listing
