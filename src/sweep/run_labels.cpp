#include "src/sweep/run_labels.hpp"

namespace mirrorcheck::sweep {
namespace {

std::string without(const std::string& path, const std::string& extension) {
    if (path.size() > extension.size() && path.ends_with(extension)) return path.substr(0, path.size() - extension.size());
    return path;
}

}  // namespace

std::string op_plot_label(const std::string& path, std::size_t index, std::size_t count) {
    const std::string stem = without(path, ".raw");
    return count > 1 ? stem + "/op" + std::to_string(index + 1) : stem;
}

std::string report_label(const std::string& path) {
    const std::string label = without(path, ".json");
    return label.rfind("./", 0) == 0 ? label.substr(2) : label;
}

}  // namespace mirrorcheck::sweep
