#include "src/report/text_layout.hpp"

#include <cctype>
#include <vector>

#include "parsers/common/utf8.hpp"

namespace mirrorcheck::report {

std::size_t display_width(std::string_view text) {
    std::size_t width = 0;
    for (std::size_t k = 0; k < text.size(); ++k) {
        if (text[k] == '\x1b') {  // an ANSI sequence: ESC [ ... m
            while (k < text.size() && text[k] != 'm') ++k;
            continue;
        }
        if ((static_cast<unsigned char>(text[k]) & 0xC0) != 0x80) ++width;
    }
    return width;
}

std::string wrap(std::string_view line, std::size_t width, std::size_t indent) {
    if (display_width(line) <= width) return std::string(line) + "\n";
    // The leading spaces of the first line stay; words are split at single spaces.
    std::size_t lead = line.find_first_not_of(' ');
    if (lead == std::string_view::npos) return "\n";
    std::string out(line.substr(0, lead));
    std::size_t used = lead;
    bool first_word = true;
    std::string_view rest = line.substr(lead);
    while (!rest.empty()) {
        std::size_t space = rest.find(' ');
        std::string_view word = rest.substr(0, space);
        // keep runs of spaces inside the line (aligned columns) with the word that follows
        std::size_t gap = 0;
        if (space != std::string_view::npos) {
            std::size_t next = rest.find_first_not_of(' ', space);
            gap = (next == std::string_view::npos ? rest.size() : next) - space;
            rest = next == std::string_view::npos ? std::string_view() : rest.substr(next);
        } else {
            rest = {};
        }
        const std::size_t w = display_width(word);
        if (!first_word && used + 1 + w > width) {
            out += "\n" + std::string(indent, ' ');
            used = indent;
        } else if (!first_word) {
            out += ' ';
            used += 1;
        }
        out += word;
        used += w;
        first_word = false;
        // a run of several spaces is kept when the next word still fits after it
        if (gap > 1 && !rest.empty()) {
            const std::size_t next_space = rest.find(' ');
            const std::size_t next_w = display_width(rest.substr(0, next_space));
            if (used + gap + next_w <= width) {
                out += std::string(gap - 1, ' ');
                used += gap - 1;
            }
        }
    }
    return out + "\n";
}

std::string pad_right(std::string_view text, std::size_t width) {
    std::string s(text);
    const std::size_t w = display_width(text);
    if (w < width) s.append(width - w, ' ');
    return s;
}

std::string pad_left(std::string_view text, std::size_t width) {
    const std::size_t w = display_width(text);
    return (w < width ? std::string(width - w, ' ') : std::string()) + std::string(text);
}

std::string coloured(std::string_view text, Colour colour, bool enabled) {
    if (!enabled || colour == Colour::none) return std::string(text);
    const char* code = "";
    switch (colour) {
        case Colour::red: code = "\x1b[31m"; break;
        case Colour::yellow: code = "\x1b[33m"; break;
        case Colour::green: code = "\x1b[32m"; break;
        case Colour::dim: code = "\x1b[2m"; break;
        case Colour::bold: code = "\x1b[1m"; break;
        case Colour::none: break;
    }
    return std::string(code) + std::string(text) + "\x1b[0m";
}

std::string terminal_text(std::string_view text, bool colour) {
    std::string out;
    out.reserve(text.size());
    std::size_t plain = 0;  // start of the text not yet copied
    for (std::size_t k = 0; colour && (k = text.find("\x1b[", k)) != std::string_view::npos;) {
        std::size_t end = k + 2;
        while (end < text.size() && (std::isdigit(static_cast<unsigned char>(text[end])) || text[end] == ';')) ++end;
        if (end < text.size() && text[end] == 'm') {
            out += printable_text(text.substr(plain, k - plain));
            out += text.substr(k, end + 1 - k);
            plain = end + 1;
        }
        k = end;
    }
    out += printable_text(text.substr(plain));
    return out;
}

}  // namespace mirrorcheck::report
