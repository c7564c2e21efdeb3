// Renders a raw file's contents for `peek`: a summary by default, variable tables on
// request, and values with their unit and an SI prefix (JSON keeps every digit).
#include "src/report/raw_dump.hpp"

#include <algorithm>
#include <cmath>
#include <numbers>

#include <fmt/format.h>

#include "parsers/common/si_format.hpp"
#include "parsers/common/text.hpp"

namespace mirrorcheck::report {
namespace {

std::string join(const std::vector<std::string>& words, std::string_view sep) {
    std::string out;
    for (const auto& w : words) out += (out.empty() ? "" : std::string(sep)) + w;
    return out;
}

std::string plural(std::size_t n, std::string_view word) {
    return fmt::format("{} {}{}", n, word, n == 1 ? "" : "s");
}

// The unit of a raw file's variable type, for people; empty when it has none.
std::string_view unit_of(const raw::Variable& v) {
    static const std::pair<std::string_view, std::string_view> units[] = {
        {"voltage", "V"}, {"current", "A"}, {"admittance", "S"}, {"impedance", "Ω"}, {"frequency", "Hz"},
        {"time", "s"},    {"capacitance", "F"}, {"inductance", "H"}, {"temperature", "°C"}};
    for (auto [type, unit] : units)
        if (v.type == type) return unit;
    return {};
}

std::string quantity_text(double x, std::string_view unit) {
    return unit.empty() ? format_plain(x, 6) : format_si(x, unit);
}

// "221 variables: 13 voltage, 4 current, 204 admittance".
std::string variables_by_type(const raw::Plot& plot) {
    std::vector<std::pair<std::string, std::size_t>> types;
    for (const auto& v : plot.variables) {
        auto it = std::find_if(types.begin(), types.end(), [&](const auto& t) { return t.first == v.type; });
        if (it == types.end()) types.emplace_back(v.type, 1);
        else ++it->second;
    }
    std::string s = plural(plot.variables.size(), "variable");
    for (std::size_t k = 0; k < types.size(); ++k)
        s += fmt::format("{}{} {}", k == 0 ? ": " : ", ", types[k].second, types[k].first);
    return s;
}

// "from 1 Hz to 1 kHz": the range of the plot's scale, when decoded and longer than a point.
std::string scale_range(const raw::Plot& plot) {
    if (!plot.decoded || plot.point_count < 2 || plot.variables.empty()) return {};
    const std::string_view unit = unit_of(plot.variables[0]);
    const double first = plot.complex ? plot.cplx[0].front().real() : plot.real[0].front();
    const double last = plot.complex ? plot.cplx[0].back().real() : plot.real[0].back();
    return fmt::format(" from {} to {}", quantity_text(first, unit), quantity_text(last, unit));
}

void write_plot_summary(std::string& out, const raw::Plot& plot, std::size_t number) {
    fmt::format_to(std::back_inserter(out), "  plot {}: {} [{}], {}, {}{}, {}\n", number, plot.name,
                   plot.kind().empty() ? "?" : plot.kind(), plot.complex ? "complex" : "real",
                   plural(plot.point_count, "point"), scale_range(plot), variables_by_type(plot));
}

void write_plot_header(std::string& out, const raw::Plot& plot, std::size_t number) {
    fmt::format_to(std::back_inserter(out), "plot {}: {} [{}]  flags: {}  {}, {}{}\n", number, plot.name,
                   plot.kind().empty() ? "?" : plot.kind(), join(plot.flags, " "), plural(plot.point_count, "point"),
                   plural(plot.variables.size(), "variable"), plot.decoded ? "" : " (data not read)");
    if (!plot.title.empty()) fmt::format_to(std::back_inserter(out), "  title: {}\n", plot.title);
    for (std::size_t i = 0; i < plot.variables.size(); ++i) {
        const auto& v = plot.variables[i];
        fmt::format_to(std::back_inserter(out), "  {:>4}  {:<40} {}{}{}\n", i, v.name, v.type,
                       v.extras.empty() ? "" : " ", join(v.extras, " "));
    }
}

bool selected(const raw::Plot& plot, const std::vector<std::string>& plots) {
    for (const auto& p : plots)
        if (iequals(p, plot.kind()) || iequals(p, plot.name)) return true;
    return false;
}

std::string complex_text(std::complex<double> z, std::string_view unit) {
    return fmt::format("{} ∠ {:.3g}°", quantity_text(std::abs(z), unit), std::arg(z) * 180.0 / std::numbers::pi);
}

void write_vector(std::string& out, const raw::Plot& plot, std::size_t number, std::size_t index,
                  const std::string& asked) {
    const raw::Variable& v = plot.variables[index];
    const std::string_view unit = unit_of(v);
    auto it = std::back_inserter(out);
    if (plot.point_count == 1) {
        const std::string value =
            plot.complex ? complex_text(plot.cplx[index][0], unit) : quantity_text(plot.real[index][0], unit);
        fmt::format_to(it, "{} = {}  (plot {}, {})\n", asked, value, number, plot.name);
        return;
    }
    fmt::format_to(it, "{} in plot {}, {} ({}):\n", asked, number, plot.name, plural(plot.point_count, "point"));
    const std::string_view scale_unit = unit_of(plot.variables[0]);
    for (std::size_t p = 0; p < plot.point_count; ++p) {
        const double scale = plot.complex ? plot.cplx[0][p].real() : plot.real[0][p];
        const std::string value =
            plot.complex ? complex_text(plot.cplx[index][p], unit) : quantity_text(plot.real[index][p], unit);
        fmt::format_to(it, "  {:>10}  {}\n", quantity_text(scale, scale_unit), value);
    }
}

nlohmann::json number(double x) {
    if (std::isfinite(x)) return x;
    return std::isnan(x) ? "nan" : (x > 0 ? "inf" : "-inf");
}

nlohmann::json vector_json(const raw::Plot& plot, std::size_t index) {
    nlohmann::json values = nlohmann::json::array();
    for (std::size_t p = 0; p < plot.point_count; ++p) {
        if (plot.complex) values.push_back({number(plot.cplx[index][p].real()), number(plot.cplx[index][p].imag())});
        else values.push_back(number(plot.real[index][p]));
    }
    return values;
}

}  // namespace

std::string write_raw_table(const raw::RawFile& file, const std::vector<std::string>& plots) {
    std::string out = fmt::format("{}: ngspice raw file, {}\n", file.path, plural(file.plots.size(), "plot"));
    if (plots.empty()) {
        for (std::size_t i = 0; i < file.plots.size(); ++i) write_plot_summary(out, file.plots[i], i + 1);
        out += "(`--plot KIND` lists a plot's variables, `--vector NAME` prints a vector's values)\n";
        return out;
    }
    for (std::size_t i = 0; i < file.plots.size(); ++i)
        if (selected(file.plots[i], plots)) {
            out += "\n";
            write_plot_header(out, file.plots[i], i + 1);
        }
    return out;
}

std::string write_raw_vectors(const raw::RawFile& file, const std::vector<std::string>& vectors) {
    std::string out;
    for (const auto& name : vectors)
        for (std::size_t i = 0; i < file.plots.size(); ++i)
            if (auto index = file.plots[i].find(name); index && file.plots[i].decoded)
                write_vector(out, file.plots[i], i + 1, *index, name);
    return out;
}

nlohmann::json raw_to_json(const raw::RawFile& file, const std::vector<std::string>& vectors) {
    nlohmann::json plots = nlohmann::json::array();
    for (const auto& plot : file.plots) {
        nlohmann::json vars = nlohmann::json::array();
        for (const auto& v : plot.variables) vars.push_back({{"name", v.name}, {"type", v.type}, {"extras", v.extras}});
        nlohmann::json vecs = nlohmann::json::object();
        for (const auto& name : vectors)
            if (auto index = plot.find(name); index && plot.decoded) vecs[name] = vector_json(plot, *index);
        plots.push_back({{"name", plot.name},
                         {"kind", plot.kind()},
                         {"title", plot.title},
                         {"flags", plot.flags},
                         {"complex", plot.complex},
                         {"encoding", plot.encoding == raw::Encoding::binary ? "binary" : "ascii"},
                         {"points", plot.point_count},
                         {"variables", vars},
                         {"vectors", vecs}});
    }
    return {{"file", file.path}, {"kind", "raw"}, {"plots", plots}};
}

}  // namespace mirrorcheck::report
