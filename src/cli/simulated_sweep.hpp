// `sweep NETLIST --corners ... --temps ... --supply ... --monte-carlo N`: the runs simulated
// for the user with local ngspice processes, each run's review deck derived into the work
// folder (never beside the user's files), then each run reviewed.
#pragma once

#include <chrono>
#include <string>
#include <vector>

#include "src/cli/review_command.hpp"
#include "src/sweep/run_record.hpp"
#include "src/sweep/sweep_plan.hpp"

namespace mirrorcheck::cli {

struct SimulationRequest {
    sweep::SweepAxes axes;
    std::size_t jobs = 1;         // ngspice processes at once
    std::string keep;             // work folder to keep; empty: a temporary one, removed
    std::string ngspice = "ngspice";
    std::string engine = "local";             // local, parallel (GNU parallel) or slurm (sbatch --array)
    std::vector<std::string> engine_options;  // words passed to parallel or sbatch, e.g. --sshlogin=host
    std::chrono::seconds timeout{0};          // local runs: ngspice ended after this; 0: no limit
};

// Thrown when Ctrl-C (or SIGTERM, SIGHUP) stopped the sweep: the signal, and what to tell
// the user (where the finished runs' reports are, how to merge them).
struct SweepInterrupted {
    int signal;
    std::string message;
};

// One record per planned run, in plan order; a run whose simulation failed is a failed
// record with the end of ngspice's log.
std::vector<sweep::RunRecord> simulate_and_review(const ReviewOptions& review, const SimulationRequest& request);

}  // namespace mirrorcheck::cli
