// Output that cannot be written (found by a hostile probe: a full disk gave exit 0 and a
// truncated report): every command fails with status 2 and says what it could not write,
// and a file is written whole or not at all (through a temporary file and a rename).
// /dev/full is Linux's device on which every write fails with ENOSPC.
#include <filesystem>
#include <string>

#include <doctest/doctest.h>

#include "src/output/write_file.hpp"
#include "support/ngspice_run.hpp"
#include "support/run_cli.hpp"

namespace fs = std::filesystem;
using mirrorcheck::test::run_cli;

namespace {
const std::string sample = std::string(MIRRORCHECK_SOURCE_DIR) + "/samples/tamarack/";

// The command with its standard output on /dev/full (run_cli redirects it to a file).
mirrorcheck::test::CliResult run_to_full_disk(const std::string& args) {
    const auto dir = mirrorcheck::test::make_temp_dir("mc-full");
    const int raw = std::system(("'" + std::string(MIRRORCHECK_EXE) + "' " + args + " > /dev/full 2> '" +
                                 (dir / "err").string() + "'").c_str());
    mirrorcheck::test::CliResult r{WIFEXITED(raw) ? WEXITSTATUS(raw) : -1, "", mirrorcheck::test::read_text(dir / "err")};
    fs::remove_all(dir);
    return r;
}
}  // namespace

TEST_CASE("a report to a full disk is exit 2 with the reason, for every command that prints one") {
    for (const std::string& args :
         {"review " + sample + "bias.cir --op " + sample + "bias_op.raw --format json",
          "review " + sample + "bias.cir --op " + sample + "bias_op.raw",
          "list " + sample + "bias.cir --format json", "peek " + sample + "bias_op.raw",
          "sweep " + sample + "bias.cir --op " + sample + "bias_op.raw --format junit"}) {
        CAPTURE(args);
        const auto r = run_to_full_disk(args);
        CHECK(r.status == 2);
        CHECK(r.err.find("[usage.cannot-write]") != std::string::npos);
        CHECK(r.err.find("standard output") != std::string::npos);
    }
}

TEST_CASE("prepare -o on a full disk is exit 2, and a failed write leaves no partial file") {
    const auto full = run_cli("prepare " + sample + "bias.cir -o /dev/full");
    CHECK(full.status == 2);
    CHECK(full.err.find("No space left on device") != std::string::npos);
    CHECK(full.out.find("wrote") == std::string::npos);
    CHECK(fs::is_character_file("/dev/full"));  // written in place, never renamed over

    const auto dir = mirrorcheck::test::make_temp_dir("mc-write");
    const fs::path target = dir / "report.json";
    mirrorcheck::test::write_text(target, "the earlier report\n");
    CHECK_FALSE(mirrorcheck::write_file_whole(target, "the new report\n"));
    CHECK(mirrorcheck::test::read_text(target) == "the new report\n");
    // A folder that cannot take the temporary file: the reason, and the target as it was.
    const auto failed = mirrorcheck::write_file_whole(dir / "missing" / "report.json", "text");
    REQUIRE(failed);
    CHECK(failed->find("No such file") != std::string::npos);
    std::size_t files = 0;
    for ([[maybe_unused]] const auto& e : fs::directory_iterator(dir)) ++files;
    CHECK(files == 1);  // no .partial file left behind
    fs::remove_all(dir);
}
