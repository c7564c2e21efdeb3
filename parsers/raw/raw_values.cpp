// The raw reader's values. Binary data (little-endian doubles, point-major, two per
// complex value) is read with pread in windows and transposed in cache-sized blocks;
// text data (`Values:`: a point index, then one value per line, `re,im` when complex) is
// decoded with std::from_chars, on several cores for large plots. Skipped plots are
// passed over without decoding: binary data by its size, text data by counting lines.
#include <algorithm>
#include <bit>
#include <charconv>
#include <cstdint>
#include <cstring>
#include <thread>

#include "parsers/raw/raw_cursor.hpp"
#include "parsers/raw/raw_errors.hpp"
#include "parsers/raw/raw_header_grammar.hpp"

static_assert(std::endian::native == std::endian::little,
              "binary raw files hold little-endian doubles; a big-endian host would need byte swaps");

namespace mirrorcheck::raw::detail {
namespace {

void allocate_columns(Plot& plot) {
    if (plot.complex) {
        plot.cplx.assign(plot.variables.size(), {});
        for (auto& col : plot.cplx) col.resize(plot.point_count);
    } else {
        plot.real.assign(plot.variables.size(), {});
        for (auto& col : plot.real) col.resize(plot.point_count);
    }
}

// Point-major rows to columns, a block of rows at a time: the block stays in cache while
// each column's share of it is written in one sequential run.
template <typename Value>
void transpose_rows(const char* rows, std::size_t points, std::vector<Value*>& columns) {
    constexpr std::size_t block = 256;
    const std::size_t row = sizeof(Value) * columns.size();
    for (std::size_t p0 = 0; p0 < points; p0 += block) {
        const std::size_t m = std::min(block, points - p0);
        for (std::size_t v = 0; v < columns.size(); ++v) {
            const char* src = rows + p0 * row + sizeof(Value) * v;
            Value* out = columns[v] + p0;
            for (std::size_t k = 0; k < m; ++k, src += row) std::memcpy(static_cast<void*>(out + k), src, sizeof(Value));
        }
    }
}

template <typename Value, typename Column>
void decode_binary_columns(const MappedFile& file, std::size_t offset, std::size_t points, std::vector<Column>& out) {
    std::vector<Value*> columns;
    for (auto& col : out) columns.push_back(col.data());
    std::vector<Value*> at(columns.size());
    const std::size_t row = sizeof(Value) * columns.size();
    const std::size_t rows_per_chunk = std::max<std::size_t>(1, (std::size_t{256} << 10) / row);
    std::vector<char> chunk(rows_per_chunk * row);
    for (std::size_t p0 = 0; p0 < points; p0 += rows_per_chunk) {
        const std::size_t m = std::min(rows_per_chunk, points - p0);
        file.copy_out(offset + p0 * row, m * row, chunk.data());
        for (std::size_t v = 0; v < columns.size(); ++v) at[v] = columns[v] + p0;
        transpose_rows(chunk.data(), m, at);
    }
}

// Reads the rows a chunk at a time into a small buffer and transposes each chunk.
void decode_binary(const MappedFile& file, std::size_t offset, Plot& plot) {
    if (plot.complex) decode_binary_columns<std::complex<double>>(file, offset, plot.point_count, plot.cplx);
    else decode_binary_columns<double>(file, offset, plot.point_count, plot.real);
}

}  // namespace

void read_binary(Cursor& c, Plot& plot, bool wanted) {
    const std::uint64_t row = plot.variables.size() * (plot.complex ? 16u : 8u);
    const std::uint64_t available = c.remaining();
    c.after_binary = true;
    if (plot.point_count > available / row)
        throw errors::raw_truncated_binary(c.at_byte(c.pos), plot.point_count, row, available);
    const std::uint64_t size = plot.point_count * row;
    if (wanted) {
        allocate_columns(plot);
        decode_binary(*c.file, c.pos, plot);
        plot.decoded = true;
    }
    c.pos += size;
}

namespace {

bool is_blank(char ch) { return ch == ' ' || ch == '\t' || ch == '\r' || ch == '\n'; }

// Decodes a text plot's values in one pass: `<index> <value>` opens each point, then one
// value per line (`re,im` when complex). Lines are counted only to name them in errors.
// The text is read through a window filled with pread() (see MappedFile::copy_out); the
// window is refilled between tokens, so that every token starts with at least
// `token_room` bytes after it or the end of the file.
class AsciiDecoder {
public:
    AsciiDecoder(Cursor& c, Plot& plot) : c_(c), plot_(plot), line_(c.line), window_(std::min(std::size_t{1} << 20, c.remaining())) {
        fill_from(c.pos);
    }

    // Decodes points [first, end) from the cursor's position, where point `first` starts.
    void run(std::uint64_t first, std::uint64_t end) {
        const std::size_t n = plot_.variables.size();
        for (std::uint64_t p = first; p < end; ++p) {
            read_index(p);
            for (std::size_t v = 0; v < n; ++v) read_value(v, p, p + 1 == plot_.point_count && v + 1 == n);
        }
        sync();
    }

private:
    static constexpr std::size_t token_room = 256;

    void fill_from(std::size_t file_offset) {
        offset_ = file_offset;
        const std::size_t len = std::min(window_.size(), c_.bytes.size() - file_offset);
        c_.file->copy_out(file_offset, len, window_.data());
        s_ = window_.data();
        end_ = s_ + len;
        at_eof_ = file_offset + len == c_.bytes.size();
    }

    void make_room() {
        if (!at_eof_ && static_cast<std::size_t>(end_ - s_) < token_room) fill_from(position());
    }

    std::size_t position() const { return offset_ + static_cast<std::size_t>(s_ - window_.data()); }

    void sync() {
        c_.pos = position();
        c_.line = line_;
    }

    void skip_blanks(std::uint64_t p) {
        for (;;) {
            while (s_ != end_ && is_blank(*s_)) {
                line_ += *s_ == '\n';
                ++s_;
            }
            if (s_ != end_ || at_eof_) break;
            fill_from(position());
        }
        if (s_ == end_) {
            sync();
            throw errors::raw_truncated_values(c_.value_here(), p, plot_.point_count);
        }
        make_room();
    }

    bool ends_token(const char* e) const { return e == end_ || is_blank(*e); }

    void read_index(std::uint64_t p) {
        skip_blanks(p);
        std::uint64_t index = 0;
        auto [e, ec] = std::from_chars(s_, end_, index);
        if (ec != std::errc{} || index != p || !ends_token(e)) {
            sync();
            throw errors::raw_bad_point_index(c_.value_here(), p);
        }
        s_ = e;
    }

    // A number ending at a blank (or at `terminator`); a number cut by the end of the
    // file is truncation, unless it is the very last value.
    const char* read_number(const char* from, double& out, bool last, std::uint64_t p, char terminator) {
        auto [e, ec] = std::from_chars(from, end_, out);
        if (ec == std::errc{} && e == end_ && at_eof_ && !last) {
            sync();
            throw errors::raw_truncated_values(c_.value_here(), p, plot_.point_count);
        }
        if (ec != std::errc{} || !(terminator ? (e != end_ && *e == terminator) : ends_token(e))) bad_number();
        return e;
    }

    void read_value(std::size_t v, std::uint64_t p, bool last) {
        skip_blanks(p);
        if (!plot_.complex) {
            s_ = read_number(s_, plot_.real[v][p], last, p, 0);
            return;
        }
        double re = 0, im = 0;
        const char* comma = read_number(s_, re, false, p, ',');
        s_ = read_number(comma + 1, im, last, p, 0);
        plot_.cplx[v][p] = {re, im};
    }

    [[noreturn]] void bad_number() {
        const char* e = s_;
        while (!ends_token(e)) ++e;
        sync();
        throw errors::raw_bad_number(c_.value_here(), std::string_view(s_, static_cast<std::size_t>(e - s_)), plot_.complex);
    }

    Cursor& c_;
    Plot& plot_;
    std::size_t line_;
    std::vector<char> window_;
    std::size_t offset_ = 0;  // file offset of window_[0]
    const char* s_ = nullptr;
    const char* end_ = nullptr;
    bool at_eof_ = false;
};

// Passes over the values by counting non-blank lines (one per value), converting nothing.
void skip_ascii(Cursor& c, const Plot& plot) {
    // Saturated: a count past 2^64 lines runs into the end of the file like any other too large.
    std::uint64_t lines = 0;
    if (__builtin_mul_overflow(plot.point_count, plot.variables.size(), &lines)) lines = UINT64_MAX;
    for (std::uint64_t seen = 0; seen < lines;) {
        c.skip_space();
        if (c.at_end())
            throw errors::raw_truncated_values(c.value_here(), seen / plot.variables.size(), plot.point_count);
        const void* nl = std::memchr(c.bytes.data() + c.pos, '\n', c.remaining());
        c.pos = nl ? static_cast<std::size_t>(static_cast<const char*>(nl) - c.bytes.data()) : c.bytes.size();
        ++seen;
    }
}

// Where a point's line starts (at its index) after byte `from`: a line whose first
// non-space character is a digit; value lines start with a tab.
std::optional<std::size_t> next_point_start(std::string_view bytes, std::size_t from) {
    while (from < bytes.size()) {
        const void* nl = std::memchr(bytes.data() + from, '\n', bytes.size() - from);
        if (!nl) return std::nullopt;
        std::size_t i = static_cast<std::size_t>(static_cast<const char*>(nl) - bytes.data()) + 1;
        while (i < bytes.size() && bytes[i] == ' ') ++i;
        if (i < bytes.size() && bytes[i] >= '0' && bytes[i] <= '9') return i;
        from = i;
    }
    return std::nullopt;
}

struct Segment {
    std::uint64_t first_point = 0;
    std::size_t offset = 0;  // where that point's index is
};

// Splits a text plot's points into about equal parts at point starts near even fractions
// of the values' estimated extent (ngspice writes about 23.5 bytes per real value).
std::vector<Segment> split_points(const Cursor& c, const Plot& plot, unsigned parts) {
    std::vector<Segment> segments{{0, c.pos}};
    const double per_value = plot.complex ? 46.0 : 23.5;
    const double values = static_cast<double>(plot.point_count) * static_cast<double>(plot.variables.size());
    const auto extent = static_cast<std::size_t>(std::min(static_cast<double>(c.remaining()), per_value * values));
    for (unsigned k = 1; k < parts; ++k) {
        auto start = next_point_start(c.bytes, c.pos + extent / parts * k);
        if (!start) break;
        std::uint64_t index = 0;
        auto [end, ec] = std::from_chars(c.bytes.data() + *start, c.bytes.data() + c.bytes.size(), index);
        if (ec != std::errc{} || index <= segments.back().first_point || index >= plot.point_count) break;
        segments.push_back({index, *start});
    }
    return segments;
}

// Decodes a large text plot on several cores, one run of points each. Returns false,
// leaving the cursor where it was, when the plot is small, the split finds no point
// starts, a part fails, or the parts do not join up exactly; the caller then decodes
// it in one pass, which also gives any error its exact line.
bool decode_ascii_parallel(Cursor& c, Plot& plot) {
    const unsigned cores = std::min(4u, std::thread::hardware_concurrency());
    std::uint64_t values = 0;
    if (__builtin_mul_overflow(plot.point_count, plot.variables.size(), &values)) values = UINT64_MAX;
    if (cores < 2 || values < (std::uint64_t{1} << 18)) return false;
    const std::vector<Segment> segments = split_points(c, plot, cores);
    if (segments.size() < 2) return false;
    std::vector<Cursor> cursors(segments.size(), c);
    std::vector<char> failed(segments.size(), 0);
    std::vector<std::thread> workers;
    for (std::size_t k = 0; k < segments.size(); ++k) {
        cursors[k].pos = segments[k].offset;
        cursors[k].line = 0;
        const std::uint64_t end = k + 1 < segments.size() ? segments[k + 1].first_point : plot.point_count;
        workers.emplace_back([&, k, end] {
            try {
                AsciiDecoder(cursors[k], plot).run(segments[k].first_point, end);
            } catch (...) {
                failed[k] = 1;
            }
        });
    }
    for (auto& w : workers) w.join();
    if (std::find(failed.begin(), failed.end(), 1) != failed.end()) return false;
    std::size_t lines = c.line + cursors.back().line;
    for (std::size_t k = 0; k + 1 < segments.size(); ++k) {
        Cursor gap = cursors[k];
        gap.line = 0;
        gap.skip_space();
        if (gap.pos != segments[k + 1].offset) return false;
        lines += cursors[k].line + gap.line;
    }
    c.pos = cursors.back().pos;
    c.line = lines;
    return true;
}

}  // namespace

void read_ascii(Cursor& c, Plot& plot, bool wanted) {
    // A value takes at least 2 bytes (a digit and a newline).
    const std::uint64_t n = plot.variables.size();
    if (plot.point_count > c.remaining() / 2 / n)
        throw errors::raw_too_many_points(c.value_here(), plot.point_count, c.remaining() / 2 / n);
    if (wanted) {
        allocate_columns(plot);
        if (!decode_ascii_parallel(c, plot)) AsciiDecoder(c, plot).run(0, plot.point_count);
        plot.decoded = true;
    } else {
        skip_ascii(c, plot);
    }
    c.skip_space();
    if (!c.at_end() && !detail::parse_header_line(c.peek_line()))
        throw errors::raw_trailing_data(c.value_here(), plot.point_count);
}

}  // namespace mirrorcheck::raw::detail
