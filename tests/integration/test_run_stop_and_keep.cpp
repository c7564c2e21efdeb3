// `run` and `sweep` against a stuck simulator and a hostile work folder (found by a hostile
// probe): a --keep folder that holds the user's files is refused before anything is
// written; --keep naming a file is a usage error; `prepare -o` never overwrites a file the
// netlist includes; a simulator that never ends is stopped at --timeout; SIGTERM ends the
// simulator's whole process group and removes the temporary folder.
//
// The stuck simulator is a shell script passed as --ngspice that sleeps; it writes its
// process id so that the test can check it is gone. Real ngspice runs where a deck must
// be simulated (the second --keep run).
#include <chrono>
#include <csignal>
#include <filesystem>
#include <string>
#include <thread>

#include <doctest/doctest.h>
#include <spawn.h>
#include <sys/wait.h>

#include "support/ngspice_run.hpp"
#include "support/run_cli.hpp"

namespace fs = std::filesystem;
using mirrorcheck::test::read_text;
using mirrorcheck::test::run_cli;
using mirrorcheck::test::write_text;

namespace {

const std::string mirror_deck =
    "* simple mirror\n.model nc nmos level=1 vto=0.5 kp=100u lambda=0.05\nvdd vdd 0 1.8\n"
    "iref vdd g dc 20u\nm1 g g 0 0 nc w=4u l=1u\nm2 out g 0 0 nc w=4u l=1u\nvout out 0 dc 0.9\n.end\n";

// A stand-in for ngspice that never finishes; it leaves its process id in `pid_file`.
fs::path stuck_simulator(const fs::path& dir) {
    const fs::path script = dir / "stuck-ngspice";
    write_text(script, "#!/bin/sh\necho $$ > '" + (dir / "stuck.pid").string() + "'\nexec sleep 300\n");
    fs::permissions(script, fs::perms::owner_all);
    return script;
}

// True while the process exists and is not a zombie (one killed but not yet reaped by init).
bool running(pid_t pid) {
    const std::string stat = read_text("/proc/" + std::to_string(pid) + "/stat");
    const auto close = stat.rfind(')');
    return close != std::string::npos && close + 2 < stat.size() && stat[close + 2] != 'Z';
}

bool process_alive(const fs::path& pid_file) {
    if (!fs::exists(pid_file)) return false;
    return running(std::stoi(read_text(pid_file)));
}

// A killed process takes a moment to go: true when it is still there after three seconds.
bool process_lingers(const fs::path& pid_file) {
    for (int tries = 0; tries < 60 && process_alive(pid_file); ++tries)
        std::this_thread::sleep_for(std::chrono::milliseconds(50));
    return process_alive(pid_file);
}

}  // namespace

TEST_CASE("run --keep refuses a folder holding the user's files, and a file; prepare -o an included file") {
    const auto dir = mirrorcheck::test::make_temp_dir("mc-keep");
    // The probe's case: the netlist itself is called review.cir and sits in the --keep folder.
    fs::create_directories(dir / "work");
    write_text(dir / "work" / "review.cir", mirror_deck);
    auto own = run_cli("run work/review.cir --keep work", dir);
    CHECK(own.status == 2);
    CHECK(own.err.find("[usage.keep]") != std::string::npos);
    CHECK(read_text(dir / "work" / "review.cir") == mirror_deck);
    CHECK(fs::directory_iterator(dir / "work") != fs::directory_iterator());
    CHECK_FALSE(fs::exists(dir / "work" / "ngspice.log"));
    // Any file of the user's, not only the netlist: a results file of the same name.
    write_text(dir / "mirror.cir", mirror_deck);
    fs::create_directories(dir / "theirs");
    write_text(dir / "theirs" / "review.raw", "not ours\n");
    auto theirs = run_cli("run mirror.cir --keep theirs", dir);
    CHECK(theirs.status == 2);
    CHECK(read_text(dir / "theirs" / "review.raw") == "not ours\n");
    auto sweep = run_cli("sweep mirror.cir --temps 27 --keep theirs", dir);
    CHECK(sweep.status == 2);
    CHECK(sweep.err.find("[usage.keep]") != std::string::npos);
    // --keep naming a file: a usage error, not an internal one.
    auto file = run_cli("run mirror.cir --keep mirror.cir", dir);
    CHECK(file.status == 2);
    CHECK(file.err.find("[usage.keep]") != std::string::npos);
    CHECK(read_text(dir / "mirror.cir") == mirror_deck);
    // A new folder, then the same folder again: the second run replaces the first's files.
    auto first = run_cli("run mirror.cir --keep fresh --format json", dir);
    REQUIRE_MESSAGE(first.status < 2, first.err);
    CHECK(fs::exists(dir / "fresh" / ".mirrorcheck-work"));
    auto again = run_cli("run mirror.cir --keep fresh --format json", dir);
    CHECK_MESSAGE(again.status < 2, again.err);
    // prepare -o over a file the netlist includes: refused, the include intact.
    write_text(dir / "models.inc", ".model nc nmos level=1 vto=0.5 kp=100u lambda=0.05\n");
    write_text(dir / "inc.cir", "* with an include\n.include models.inc\nvdd vdd 0 1.8\niref vdd g dc 20u\n"
                                "m1 g g 0 0 nc w=4u l=1u\nm2 out g 0 0 nc w=4u l=1u\nvout out 0 dc 0.9\n.end\n");
    auto over = run_cli("prepare inc.cir -o models.inc", dir);
    CHECK(over.status == 2);
    CHECK(over.err.find("[usage.output]") != std::string::npos);
    CHECK(read_text(dir / "models.inc") == ".model nc nmos level=1 vto=0.5 kp=100u lambda=0.05\n");
    fs::remove_all(dir);
}

TEST_CASE("a simulator that never ends is stopped at --timeout, with its process") {
    const auto dir = mirrorcheck::test::make_temp_dir("mc-timeout");
    write_text(dir / "mirror.cir", mirror_deck);
    const fs::path stuck = stuck_simulator(dir);
    const auto start = std::chrono::steady_clock::now();
    auto r = run_cli("run mirror.cir --timeout 1 --ngspice '" + stuck.string() + "'", dir);
    const auto took = std::chrono::steady_clock::now() - start;
    CHECK(r.status == 2);
    CHECK(r.err.find("[ngspice.timeout]") != std::string::npos);
    CHECK(r.err.find("longer than 1 s") != std::string::npos);
    CHECK(took < std::chrono::seconds(60));
    CHECK_FALSE(process_lingers(dir / "stuck.pid"));
    // In a sweep the run fails, counts against the yield, and the sweep goes on to its end.
    fs::remove(dir / "stuck.pid");
    auto s = run_cli("sweep mirror.cir --temps 27,50 --jobs 2 --timeout 1 --format json --ngspice '" +
                     stuck.string() + "'", dir);
    CHECK(s.status == 1);
    CHECK(s.out.find("ran longer than 1 s") != std::string::npos);
    CHECK(s.out.find("\"yield\": 0.0") != std::string::npos);
    CHECK_FALSE(process_lingers(dir / "stuck.pid"));
    // Nonsense limits are usage errors.
    CHECK(run_cli("run mirror.cir --timeout -5", dir).status == 2);
    CHECK(run_cli("run mirror.cir --timeout nan", dir).status == 2);
    fs::remove_all(dir);
}

TEST_CASE("SIGTERM during run ends ngspice's process group and removes the temporary folder") {
    const auto dir = mirrorcheck::test::make_temp_dir("mc-sigterm");
    write_text(dir / "mirror.cir", mirror_deck);
    const fs::path stuck = stuck_simulator(dir);
    fs::create_directories(dir / "tmp");
    const std::string command = "cd '" + dir.string() + "' && TMPDIR='" + (dir / "tmp").string() + "' exec '" +
                                MIRRORCHECK_EXE + "' run mirror.cir --ngspice '" + stuck.string() +
                                "' > out.txt 2> err.txt";
    const char* argv[] = {"sh", "-c", command.c_str(), nullptr};
    pid_t pid = 0;
    REQUIRE(posix_spawn(&pid, "/bin/sh", nullptr, nullptr, const_cast<char* const*>(argv), environ) == 0);
    for (int tries = 0; tries < 600 && !process_alive(dir / "stuck.pid"); ++tries)
        std::this_thread::sleep_for(std::chrono::milliseconds(50));
    REQUIRE(process_alive(dir / "stuck.pid"));
    CHECK(fs::directory_iterator(dir / "tmp") != fs::directory_iterator());  // the run's folder exists
    kill(pid, SIGTERM);
    int raw = 0;
    REQUIRE(waitpid(pid, &raw, 0) == pid);
    REQUIRE(WIFEXITED(raw));
    CHECK(WEXITSTATUS(raw) == 128 + SIGTERM);
    CHECK(read_text(dir / "err.txt").find("stopped by signal 15") != std::string::npos);
    CHECK_FALSE(process_lingers(dir / "stuck.pid"));
    CHECK(fs::directory_iterator(dir / "tmp") == fs::directory_iterator());  // and is gone
    fs::remove_all(dir);
}
