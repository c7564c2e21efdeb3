// Test support: run ngspice in batch mode on a deck written by the test, in a fresh
// temporary folder, and hand back the folder and ngspice's output.
#pragma once

#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <random>
#include <sstream>
#include <stdexcept>
#include <string>
#include <utility>

namespace mirrorcheck::test {

// Removes its folder when it goes out of scope, unless MIRRORCHECK_KEEP_TEST_DIRS is set.
struct NgspiceRun {
    std::filesystem::path dir;  // holds deck.cir and whatever the deck writes
    std::string output;         // ngspice's stdout and stderr
    int status = -1;
    std::filesystem::path file(const std::string& name) const { return dir / name; }

    NgspiceRun() = default;
    NgspiceRun(const NgspiceRun&) = delete;
    NgspiceRun& operator=(const NgspiceRun&) = delete;
    NgspiceRun(NgspiceRun&& other) noexcept
        : dir(std::exchange(other.dir, {})), output(std::move(other.output)), status(other.status) {}
    NgspiceRun& operator=(NgspiceRun&& other) noexcept {
        std::swap(dir, other.dir);
        output = std::move(other.output);
        status = other.status;
        return *this;
    }
    ~NgspiceRun() {
        std::error_code ignored;
        if (!dir.empty() && !std::getenv("MIRRORCHECK_KEEP_TEST_DIRS")) std::filesystem::remove_all(dir, ignored);
    }
};

inline std::filesystem::path make_temp_dir(const std::string& stem) {
    std::random_device rd;
    auto base = std::filesystem::temp_directory_path();
    for (int i = 0; i < 100; ++i) {
        auto p = base / (stem + "-" + std::to_string(rd()));
        if (std::filesystem::create_directory(p)) return p;
    }
    throw std::runtime_error("cannot make a temporary folder");
}

inline std::string read_text(const std::filesystem::path& p) {
    std::ifstream in(p, std::ios::binary);
    std::ostringstream s;
    s << in.rdbuf();
    return s.str();
}

inline void write_text(const std::filesystem::path& p, const std::string& text) {
    std::ofstream out(p, std::ios::binary);
    out << text;
}

// Runs `ngspice -b deck.cir` in a new temporary folder. The deck should end its control
// block with `quit 0` (ngspice exits 1 otherwise). Single-threaded, so that parallel
// test runs do not slow each other down.
inline NgspiceRun run_ngspice(const std::string& deck, const std::string& stem = "mirrorcheck-test") {
    NgspiceRun run;
    run.dir = make_temp_dir(stem);
    write_text(run.dir / "deck.cir", deck);
    write_text(run.dir / ".spiceinit", "set num_threads=1\n");
    std::string cmd = "cd '" + run.dir.string() + "' && ngspice -b deck.cir > ngspice.log 2>&1";
    run.status = std::system(cmd.c_str());
    run.output = read_text(run.dir / "ngspice.log");
    return run;
}

}  // namespace mirrorcheck::test
