// Runs ngspice in batch mode in a given folder and reads the end of its log on failure.
#include "src/deck/ngspice_runner.hpp"

#include "src/deck/child_process.hpp"
#include "src/deck/deck_errors.hpp"

#include <fstream>
#include <sstream>
#include <vector>

#include <fmt/format.h>

#include "parsers/common/input_error.hpp"
#include "parsers/common/text.hpp"

namespace mirrorcheck {
namespace {

std::string shell_quoted(const std::string& s) {
    std::string q = "'";
    for (char c : s) q += c == '\'' ? std::string("'\\''") : std::string(1, c);
    return q + "'";
}

std::string read_all(const std::filesystem::path& p) {
    std::ifstream in(p, std::ios::binary);
    std::stringstream ss;
    ss << in.rdbuf();
    return ss.str();
}

// The last `count` non-empty lines, indented.
std::string tail(const std::string& log, std::size_t count) {
    std::vector<std::string> lines;
    std::istringstream in(log);
    for (std::string line; std::getline(in, line);)
        if (line.find_first_not_of(" \t\r") != std::string::npos) lines.push_back(line);
    std::string out;
    for (std::size_t k = lines.size() > count ? lines.size() - count : 0; k < lines.size(); ++k)
        out += "\n    " + lines[k];
    return out.empty() ? "\n    (the log is empty)" : out;
}

bool contains(const std::string& haystack, const char* needle) {
    return to_lower(haystack).find(needle) != std::string::npos;
}

}  // namespace

std::string ngspice_command(const NgspiceCall& call) {
    // A path given relative to where mirrorcheck runs must survive the change of folder.
    const std::string executable = call.executable.find('/') == std::string::npos
                                       ? call.executable
                                       : std::filesystem::absolute(call.executable).string();
    return fmt::format("cd {} && {} -b {} > {} 2>&1 < /dev/null", shell_quoted(call.run_folder.string()),
                       shell_quoted(executable), shell_quoted(call.deck.string()), shell_quoted(call.log.string()));
}

void run_ngspice_batch(const NgspiceCall& call) {
    const ChildOutcome outcome = run_child(ngspice_command(call), call.timeout);
    if (outcome.end == ChildOutcome::End::stopped) throw NgspiceStopped{stop_signal()};
    if (outcome.end == ChildOutcome::End::timed_out)
        throw errors::ngspice_timed_out(call.log.string(), static_cast<long>(call.timeout.count()), call.deck.string(),
                                        tail(read_all(call.log), 12));
    check_ngspice_run(call, outcome.status);
}

void check_ngspice_run(const NgspiceCall& call, int status) {
    const auto& log_path = call.log;
    const std::string log = read_all(log_path);
    if (status == 127 || status == 126)
        throw errors::ngspice_missing(call.executable, tail(log, 3));
    if (contains(log, "no convergence") || contains(log, "timestep too small") || contains(log, "iteration limit"))
        throw errors::ngspice_no_convergence(log_path.string(), tail(log, 12));
    if (status != 0 || contains(log, "simulation interrupted due to error"))
        throw ngspice_failure(call, status != 0 ? fmt::format("exited with status {}", status)
                                                : std::string("stopped on an error"));
}

InputError ngspice_failure(const NgspiceCall& call, const std::string& what) {
    return errors::ngspice_failed(call.log.string(), what, call.deck.string(), tail(read_all(call.log), 12));
}

}  // namespace mirrorcheck
