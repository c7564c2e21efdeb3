// Ctrl-C during a simulated sweep (SIGINT to mirrorcheck, as a terminal sends it): the sweep
// stops starting runs, leaves the finished runs' review reports in its work folder, says
// where they are and how to merge them, and exits with 130 (128 + SIGINT, as shells report
// a process stopped by it); `merge` as it says then gives the statistics of those runs.
#include <chrono>
#include <csignal>
#include <filesystem>
#include <string>
#include <thread>

#include <doctest/doctest.h>
#include <nlohmann/json.hpp>
#include <spawn.h>
#include <sys/wait.h>

#include "support/ngspice_run.hpp"
#include "support/report_schema.hpp"
#include "support/run_cli.hpp"

namespace fs = std::filesystem;

TEST_CASE("Ctrl-C leaves the finished runs' reports and says how to merge them") {
    const auto dir = mirrorcheck::test::make_temp_dir("mc-sweep-interrupt");
    mirrorcheck::test::write_text(dir / "mirror.cir",
                                  "* mirror with mismatch\n.model nc nmos level=54 version=4.8\nvdd vdd 0 1.8\n"
                                  "iref vdd g dc 20u\nm1 g g 0 0 nc w=4u l=1u delvto={agauss(0, 2m, 1)}\n"
                                  "m2 out g 0 0 nc w=4u l=1u delvto={agauss(0, 2m, 1)}\nvout out 0 dc 0.9\n.end\n");
    const std::string command = "cd '" + dir.string() + "' && exec '" + MIRRORCHECK_EXE +
                                "' sweep mirror.cir --monte-carlo 200 --jobs 1 --keep work > out.txt 2> err.txt";
    const char* argv[] = {"sh", "-c", command.c_str(), nullptr};
    pid_t pid = 0;
    REQUIRE(posix_spawn(&pid, "/bin/sh", nullptr, nullptr, const_cast<char* const*>(argv), environ) == 0);
    // Wait until a few runs have their results, then interrupt. The run under way then is
    // ended (ngspice's process group gets SIGTERM), so its raw file may exist unfinished:
    // four raw files mean three finished runs.
    const auto finished = [&] {
        int n = 0;
        for (int k = 1; k <= 200; ++k) n += fs::exists(dir / "work" / ("run" + std::to_string(k)) / "review.raw");
        return n;
    };
    for (int tries = 0; tries < 600 && finished() < 4; ++tries) std::this_thread::sleep_for(std::chrono::milliseconds(50));
    REQUIRE(finished() >= 4);
    kill(pid, SIGINT);
    int raw = 0;
    REQUIRE(waitpid(pid, &raw, 0) == pid);
    REQUIRE(WIFEXITED(raw));
    CHECK(WEXITSTATUS(raw) == 130);
    const std::string err = mirrorcheck::test::read_text(dir / "err.txt");
    CHECK(err.find("interrupted") != std::string::npos);
    CHECK(err.find("mirrorcheck merge") != std::string::npos);
    std::size_t reports = 0;
    for (const auto& e : fs::directory_iterator(dir / "work" / "reports")) reports += e.path().extension() == ".json";
    CHECK(reports >= 3);
    CHECK(reports < 200);
    // The merge the message names.
    const auto merged = mirrorcheck::test::run_cli("merge $(find * -name '*.json') --format json", dir / "work" / "reports");
    CHECK(merged.status < 2);
    CHECK(mirrorcheck::test::sweep_schema_errors(merged.out) == "");
    const auto j = nlohmann::json::parse(merged.out);
    CHECK(j["summary"]["runs"] == reports);
    CHECK(j["runs"][0]["label"].get<std::string>().rfind("mc", 0) == 0);
    fs::remove_all(dir);
}
