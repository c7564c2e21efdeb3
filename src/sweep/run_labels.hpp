// The labels by which a sweep names its runs, everywhere a run is named (tables, JSON, JUnit).
#pragma once

#include <cstddef>
#include <string>

namespace mirrorcheck::sweep {

// The run of op plot `index` (0-based) of `count` in the file at `path`, as given: the path
// without its .raw extension, with "/opN" (1-based) when the file holds several op plots:
// "results/op", "corners/op3".
std::string op_plot_label(const std::string& path, std::size_t index, std::size_t count);

// The run of a per-run report: its path as given without the .json extension.
std::string report_label(const std::string& path);

}  // namespace mirrorcheck::sweep
