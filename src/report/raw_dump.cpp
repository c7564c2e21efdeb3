// Renders a raw file's contents for `peek`. Values are printed in full (shortest text that
// reads back to the same double), since this view is for checking what a file holds.
#include "src/report/raw_dump.hpp"

#include <cmath>

#include <fmt/format.h>

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

void write_vector(std::string& out, const raw::Plot& plot, std::size_t index) {
    fmt::format_to(std::back_inserter(out), "\n{} in plot `{}` ({}):\n", plot.variables[index].name, plot.name,
                   plural(plot.point_count, "point"));
    for (std::size_t p = 0; p < plot.point_count; ++p) {
        if (plot.complex) {
            auto z = plot.cplx[index][p];
            fmt::format_to(std::back_inserter(out), "  {:>6}  {}  {}\n", p, z.real(), z.imag());
        } else {
            fmt::format_to(std::back_inserter(out), "  {:>6}  {}\n", p, plot.real[index][p]);
        }
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

std::string write_raw_table(const raw::RawFile& file, const std::vector<std::string>& vectors) {
    std::string out = fmt::format("{}: ngspice raw file, {}\n", file.path, plural(file.plots.size(), "plot"));
    for (std::size_t i = 0; i < file.plots.size(); ++i) {
        out += "\n";
        write_plot_header(out, file.plots[i], i + 1);
    }
    for (const auto& name : vectors)
        for (const auto& plot : file.plots)
            if (auto index = plot.find(name); index && plot.decoded) write_vector(out, plot, *index);
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
