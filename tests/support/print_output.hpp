// Test support: reads what ngspice's own `print` command writes, so tests can compare
// our readers with ngspice. Two forms: `name = value` lines (one-point plots) and tables
// (`Index  scale  vec...` header lines, then rows `i  x  y...`, complex values `re,  im`).
#pragma once

#include <charconv>
#include <complex>
#include <map>
#include <sstream>
#include <string>
#include <vector>

namespace mirrorcheck::test {

using PrintedVectors = std::map<std::string, std::vector<std::complex<double>>>;

inline double to_double(const std::string& s) {
    double x = 0;
    std::from_chars(s.data(), s.data() + s.size(), x);
    return x;
}

inline std::vector<std::string> split_ws(const std::string& line) {
    std::istringstream in(line);
    std::vector<std::string> out;
    for (std::string w; in >> w;) out.push_back(w);
    return out;
}

// Tokens of a table row turned into values: `1.0,` followed by `2.0` is one complex value.
inline std::vector<std::complex<double>> row_values(const std::vector<std::string>& tokens) {
    std::vector<std::complex<double>> out;
    for (std::size_t i = 1; i < tokens.size(); ++i) {
        if (!tokens[i].empty() && tokens[i].back() == ',' && i + 1 < tokens.size()) {
            out.emplace_back(to_double(tokens[i].substr(0, tokens[i].size() - 1)), to_double(tokens[i + 1]));
            ++i;
        } else {
            out.emplace_back(to_double(tokens[i]), 0.0);
        }
    }
    return out;
}

inline PrintedVectors parse_print_output(const std::string& text) {
    PrintedVectors out;
    std::vector<std::string> columns;  // current table's names, scale first
    std::istringstream in(text);
    for (std::string line; std::getline(in, line);) {
        auto tokens = split_ws(line);
        if (tokens.size() == 3 && tokens[1] == "=") {
            out[tokens[0]].emplace_back(to_double(tokens[2]), 0.0);
        } else if (!tokens.empty() && tokens[0] == "Index") {
            columns.assign(tokens.begin() + 1, tokens.end());
        } else if (!tokens.empty() && !columns.empty() && std::isdigit(static_cast<unsigned char>(tokens[0][0]))) {
            auto values = row_values(tokens);
            for (std::size_t i = 0; i < values.size() && i < columns.size(); ++i) out[columns[i]].push_back(values[i]);
        }
    }
    return out;
}

}  // namespace mirrorcheck::test
