// `sweep --engine slurm` on a real single-node Slurm started by the test (Debian's slurm-wlm
// and munge): munged with its own socket and key, slurmctld and slurmd with a configuration
// in a temporary folder (SLURM_CONF), then a corner sweep of a copy of the corpus's GF180MCU
// deck submitted with `sbatch --array --wait`: the statistics equal those of local ngspice
// processes. The daemons need root and the Debian packages; where either is missing, or the
// daemons do not come up, the test says why and skips.
#include <chrono>
#include <csignal>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <string>
#include <thread>

#include <doctest/doctest.h>
#include <nlohmann/json.hpp>
#include <unistd.h>

#include "support/corpus.hpp"
#include "support/ngspice_run.hpp"
#include "support/report_schema.hpp"
#include "support/run_cli.hpp"

namespace {

namespace fs = std::filesystem;
using mirrorcheck::test::read_text;
using mirrorcheck::test::write_text;

bool sh(const std::string& command) { return std::system(command.c_str()) == 0; }

// A single-node cluster in `dir`; its daemons are stopped by their pid files at the end.
struct SingleNodeSlurm {
    fs::path dir;
    std::string why_not;  // empty when it runs

    explicit SingleNodeSlurm(const fs::path& folder) : dir(folder) {
        if (geteuid() != 0) {
            why_not = "the Slurm and munge daemons need root";
            return;
        }
        for (const char* exe : {"munged", "slurmctld", "slurmd", "sbatch", "sinfo"})
            if (!sh(std::string("command -v ") + exe + " > /dev/null 2>&1")) {
                why_not = std::string(exe) + " is not installed (Debian packages slurm-wlm and munge)";
                return;
            }
        fs::create_directories(dir / "state");
        fs::create_directories(dir / "spool");
        const std::string d = dir.string();
        if (!sh("head -c 1024 /dev/urandom > '" + d + "/munge.key' && chmod 600 '" + d + "/munge.key' && munged --force "
                "--socket='" + d + "/munge.sock' --key-file='" + d + "/munge.key' --log-file='" + d +
                "/munged.log' --pid-file='" + d + "/munged.pid' --seed-file='" + d + "/munged.seed' > /dev/null 2>&1")) {
            why_not = "munged did not start";
            return;
        }
        char host[256] = {};
        gethostname(host, sizeof host - 1);
        std::string name(host);
        name = name.substr(0, name.find('.'));
        const unsigned port = 20000 + static_cast<unsigned>(getpid() % 20000);
        write_text(dir / "slurm.conf",
                   "ClusterName=mirrorchecktest\nSlurmctldHost=" + name + "\nAuthType=auth/munge\nAuthInfo=socket=" + d +
                       "/munge.sock\nCredType=cred/munge\nSlurmUser=root\nSlurmdUser=root\nSlurmctldPort=" +
                       std::to_string(port) + "\nSlurmdPort=" + std::to_string(port + 1) + "\nStateSaveLocation=" + d +
                       "/state\nSlurmdSpoolDir=" + d + "/spool\nSlurmctldPidFile=" + d + "/slurmctld.pid\nSlurmdPidFile=" +
                       d + "/slurmd.pid\nSlurmctldLogFile=" + d + "/slurmctld.log\nSlurmdLogFile=" + d +
                       "/slurmd.log\nProctrackType=proctrack/linuxproc\nTaskPlugin=task/none\n"
                       "JobAcctGatherType=jobacct_gather/none\nSelectType=select/cons_tres\nSelectTypeParameters=CR_Core\n"
                       "ReturnToService=2\nMpiDefault=none\nNodeName=" + name + " CPUs=" +
                       std::to_string(std::max(1u, std::thread::hardware_concurrency())) +
                       " State=UNKNOWN\nPartitionName=test Nodes=" + name + " Default=YES MaxTime=INFINITE State=UP\n");
        setenv("SLURM_CONF", (dir / "slurm.conf").c_str(), 1);
        if (!sh("slurmctld -c > '" + d + "/start.log' 2>&1 && slurmd >> '" + d + "/start.log' 2>&1")) {
            why_not = "slurmctld or slurmd did not start: " + read_text(dir / "start.log");
            return;
        }
        for (int tries = 0; tries < 100; ++tries) {
            if (sh("sinfo -h -o %t 2>/dev/null | grep -q idle")) return;
            std::this_thread::sleep_for(std::chrono::milliseconds(100));
        }
        why_not = "the node did not become idle: " + read_text(dir / "slurmctld.log").substr(0, 2000);
    }

    ~SingleNodeSlurm() {
        for (const char* daemon : {"slurmd", "slurmctld", "munged"}) {
            std::ifstream in(dir / (std::string(daemon) + ".pid"));
            pid_t pid = 0;
            if (in >> pid && pid > 0) kill(pid, SIGTERM);
        }
        unsetenv("SLURM_CONF");
    }
};

}  // namespace

TEST_CASE("--engine slurm on a single-node Slurm: the same statistics as local processes") {
    if (!mirrorcheck::test::corpus_present()) return;
    const fs::path dir = mirrorcheck::test::make_temp_dir("mc-sweep-slurm");
    for (const auto& e : fs::directory_iterator(mirrorcheck::test::corpus_dir() / "gf180mcu"))
        if (e.is_regular_file()) fs::copy_file(e.path(), dir / e.path().filename());
    {
        SingleNodeSlurm slurm(dir / "cluster");
        if (!slurm.why_not.empty()) {
            MESSAGE("skipped: " << slurm.why_not);
        } else {
            const std::string args = "sweep corners_gf180.cir --corners ss,ff --format json";
            const auto local = mirrorcheck::test::run_cli(args, dir);
            const auto cluster = mirrorcheck::test::run_cli(args + " --engine slurm --keep kept", dir);
            REQUIRE(local.status == 0);
            REQUIRE_MESSAGE(cluster.status == 0, cluster.err);
            CHECK(mirrorcheck::test::sweep_schema_errors(cluster.out) == "");
            const auto a = nlohmann::json::parse(local.out), b = nlohmann::json::parse(cluster.out);
            CHECK(a["outputs"] == b["outputs"]);
            CHECK(a["devices"] == b["devices"]);
            CHECK(read_text(dir / "kept" / "sbatch.log").find("Submitted batch job") != std::string::npos);
            CHECK(fs::exists(dir / "kept" / "slurm-1.out"));  // task 1 of the array ran under Slurm
        }
    }
    std::error_code ec;
    fs::remove_all(dir, ec);
}
