#include "src/cli/simulated_sweep.hpp"

#include <atomic>
#include <chrono>
#include <mutex>
#include <filesystem>
#include <fstream>
#include <iostream>
#include <sstream>
#include <thread>

#include <unistd.h>

#include <fmt/format.h>

#include "parsers/netlist/netlist.hpp"
#include "parsers/raw/raw.hpp"
#include "src/analyse/pipeline.hpp"
#include "src/cli/usage_errors.hpp"
#include "src/cli/work_folder.hpp"
#include "src/deck/child_process.hpp"
#include "src/deck/ngspice_runner.hpp"
#include "src/deck/review_deck.hpp"
#include "src/deck/run_variant.hpp"
#include "src/model/circuit_build.hpp"
#include "src/model/op_point_build.hpp"
#include "src/model/simulation_plots_build.hpp"
#include "src/output/write_file.hpp"
#include "src/report/review_report.hpp"
#include "src/sweep/run_labels.hpp"

namespace mirrorcheck::cli {
namespace {

namespace fs = std::filesystem;

// A run's deck, written into its own folder of the work folder.
struct RunJob {
    std::string label;
    NgspiceCall call;
    fs::path raw;
    std::string failure;  // set when the simulation failed
    bool not_run = false; // the sweep was interrupted first
};

// A progress line on standard error, only when it is a terminal and once the runs have
// taken more than a second: "sweep: 17 of 200 runs simulated".
class Progress {
public:
    explicit Progress(std::size_t total) : total_(total), shown_(isatty(STDERR_FILENO) != 0) {}
    ~Progress() {
        if (printed_) std::cerr << "\n";
    }
    void done_one() {
        const std::lock_guard<std::mutex> lock(mutex_);
        ++done_;
        if (!shown_ || std::chrono::steady_clock::now() - start_ < std::chrono::seconds(1)) return;
        std::cerr << fmt::format("\rsweep: {} of {} runs simulated", done_, total_) << std::flush;
        printed_ = true;
    }

private:
    std::size_t total_, done_ = 0;
    bool shown_, printed_ = false;
    std::mutex mutex_;
    std::chrono::steady_clock::time_point start_ = std::chrono::steady_clock::now();
};

class SimulatedSweep {
public:
    SimulatedSweep(const ReviewOptions& review, const SimulationRequest& request)
        : review_(review), request_(request), netlist_(netlist::read_netlist(review.netlist, review.limits)),
          circuit_(build_circuit(netlist_)), folder_(claim_work_folder(request.keep, "sweep")) {}

    ~SimulatedSweep() {
        std::error_code ec;
        if (request_.keep.empty() && !keep_folder_) fs::remove_all(folder_, ec);
    }

    std::vector<sweep::RunRecord> run() {
        const StopSignals guard;  // Ctrl-C, SIGTERM, SIGHUP: no further run starts, the running ones end
        // A supply that names no voltage source would give runs that all look alike and pass.
        for (const auto& [source, values] : request_.axes.supplies) {
            const Device* d = circuit_.find_device(source);
            if (!d || d->kind != DeviceKind::vsource) throw usage::supply_names_nothing(source);
        }
        const auto planned = sweep::plan_runs(request_.axes);
        const Recognition deck_recognition = recognise_circuit(circuit_);
        std::vector<RunJob> jobs;
        std::optional<std::vector<CornerLine>> corner_lines;
        Circuit probed = circuit_;
        for (std::size_t k = 0; k < planned.size(); ++k) {
            const fs::path dir = folder_ / fmt::format("run{}", k + 1);
            fs::create_directories(dir);
            DeckOptions options;
            options.alone = false;
            options.deck_path = dir / "review.cir";
            options.raw_path = dir / "review.raw";
            ReviewDeck deck = write_review_deck(netlist_, circuit_, deck_recognition.mirrors, options);
            refuse_overwrite(deck);
            if (k == 0) add_deck_probes(probed, deck);
            if (!request_.axes.corners.empty() && !corner_lines)
                corner_lines = find_corner_lines(deck.text, request_.axes.corners, review_.netlist);
            deck.text = write_run_variant(deck.text, planned[k].variant, corner_lines.value_or(std::vector<CornerLine>{}));
            save_review_deck(deck);
            NgspiceCall call{request_.ngspice, deck.path, dir / "ngspice.log", deck.run_folder, request_.timeout};
            std::error_code ec;
            fs::remove(options.raw_path, ec);  // a kept folder's results of an earlier sweep
            jobs.push_back({planned[k].label, call, options.raw_path, {}});
        }
        simulate(jobs);
        const int signal = stop_signal();
        const bool stopped = signal != 0;
        const Recognition recognition = recognise_circuit(probed);
        const ReviewSettings settings = review_settings(review_);
        std::vector<sweep::RunRecord> records;
        std::size_t finished = 0;
        for (const RunJob& job : jobs) {
            if (job.not_run) continue;
            records.push_back(review_run(job, probed, recognition, settings, stopped || !request_.keep.empty()));
            ++finished;
        }
        if (stopped) {
            keep_folder_ = true;
            throw SweepInterrupted{signal, fmt::format(
                "interrupted: {} of {} runs finished; their reports are in {}\n"
                "their statistics: cd {} && mirrorcheck merge $(find * -name '*.json')\n",
                finished, jobs.size(), (folder_ / "reports").string(), quoted((folder_ / "reports").string()))};
        }
        if (!request_.keep.empty())
            std::cerr << fmt::format("kept every run's deck, ngspice log and results in {}\n", folder_.string());
        return records;
    }

private:
    const ReviewOptions& review_;
    const SimulationRequest& request_;
    const netlist::FlatNetlist netlist_;
    const Circuit circuit_;
    const fs::path folder_;
    bool keep_folder_ = false;  // an interrupted sweep leaves its finished runs' reports

    // Never write over a file the deck reads (a --keep folder that holds the user's deck).
    void refuse_overwrite(const ReviewDeck& deck) const {
        std::vector<fs::path> written{deck.path};
        for (const auto& copy : deck.included) written.push_back(copy.path);
        for (const auto& path : written)
            for (const auto& f : netlist_.files)
                if (fs::exists(path) && fs::equivalent(path, f.path))
                    throw usage::would_overwrite_input(path.string(), f.path.string());
    }

    void simulate(std::vector<RunJob>& jobs) const {
        if (request_.engine == "local") return simulate_locally(jobs);
        hand_to_scheduler(jobs);
    }

    static fs::path status_file(const RunJob& job) { return job.raw.parent_path() / "ngspice.status"; }

    // GNU parallel or a Slurm job array runs one line of jobs.txt per run; each line leaves
    // ngspice's exit status beside its log, judged here as a local run's would be.
    void hand_to_scheduler(std::vector<RunJob>& jobs) const {
        const fs::path list = folder_ / "jobs.txt";
        std::string lines;
        for (const RunJob& job : jobs) {
            std::error_code ec;
            fs::remove(status_file(job), ec);
            lines += "(" + ngspice_command(job.call) + "); echo $? > " + quoted(status_file(job).string()) + "\n";
        }
        write_file(list, lines);
        std::string options;
        for (const auto& o : request_.engine_options) options += " " + quoted(o);
        std::string command;
        if (request_.engine == "parallel") {
            command = fmt::format("parallel --will-cite --jobs {}{} < {} > {} 2>&1", request_.jobs, options,
                                  quoted(list.string()), quoted((folder_ / "parallel.log").string()));
        } else {
            const fs::path script = folder_ / "sweep.sbatch";
            write_file(script, "#!/bin/sh\n#SBATCH --job-name=mirrorcheck-sweep\n#SBATCH --output=" +
                                   (folder_ / "slurm-%a.out").string() + "\nsh -c \"$(sed -n \"${SLURM_ARRAY_TASK_ID}p\" " +
                                   quoted(list.string()) + ")\"\n");
            command = fmt::format("sbatch --wait --array=1-{}{} {} > {} 2>&1", jobs.size(), options,
                                  quoted(script.string()), quoted((folder_ / "sbatch.log").string()));
        }
        // No time limit here: the scheduler's own (parallel --timeout, sbatch --time) apply.
        const ChildOutcome outcome = run_child(command, std::chrono::seconds(0));
        if (outcome.end == ChildOutcome::End::stopped) {
            for (RunJob& job : jobs) job.not_run = true;
            return;
        }
        const int status = outcome.status;
        if (status == 127 || status == 126 || (request_.engine == "slurm" && status != 0 && !any_status(jobs)))
            throw usage::engine_failed(request_.engine, command, status);
        for (RunJob& job : jobs) {
            try {
                std::ifstream in(status_file(job));
                int exit_status = -1;
                if (!(in >> exit_status)) throw ngspice_failure(job.call, "was not run by " + request_.engine);
                check_ngspice_run(job.call, exit_status);
                if (!fs::exists(job.raw)) throw ngspice_failure(job.call, "wrote no results");
            } catch (const InputError& e) {
                job.failure = e.where().to_string() + ": " + e.message();
            }
        }
    }

    static bool any_status(const std::vector<RunJob>& jobs) {
        for (const RunJob& job : jobs)
            if (fs::exists(status_file(job))) return true;
        return false;
    }

    static std::string quoted(const std::string& s) {
        std::string q = "'";
        for (char c : s) q += c == '\'' ? std::string("'\\''") : std::string(1, c);
        return q + "'";
    }

    static void write_file(const fs::path& path, const std::string& text) {
        if (auto failed = write_file_whole(path, text)) throw usage::cannot_write(path.string(), *failed);
    }

    // Runs the jobs, request_.jobs at a time; a failure is kept with its job.
    void simulate_locally(std::vector<RunJob>& jobs) const {
        std::atomic<std::size_t> next{0};
        Progress progress(jobs.size());
        const auto worker = [&] {
            for (std::size_t k; (k = next++) < jobs.size();) {
                if (stop_signal() != 0) {
                    jobs[k].not_run = true;
                    continue;
                }
                try {
                    run_ngspice_batch(jobs[k].call);
                    if (!fs::exists(jobs[k].raw)) throw ngspice_failure(jobs[k].call, "wrote no results");
                } catch (const NgspiceStopped&) {
                    jobs[k].not_run = true;  // ended by the stop signal
                } catch (const InputError& e) {
                    jobs[k].failure = e.where().to_string() + ": " + e.message();
                }
                progress.done_one();
            }
        };
        std::vector<std::thread> threads;
        for (std::size_t t = 0; t < std::max<std::size_t>(1, std::min(request_.jobs, jobs.size())); ++t)
            threads.emplace_back(worker);
        for (auto& t : threads) t.join();
    }

    // The run's review; with `save`, also its JSON report as reports/LABEL.json.
    sweep::RunRecord review_run(const RunJob& job, const Circuit& circuit, const Recognition& recognition,
                                const ReviewSettings& settings, bool save) const {
        const std::string source = job.raw.string();
        if (!job.failure.empty()) return sweep::failed_record(job.label, job.call.deck.string(), job.failure);
        try {
            const raw::RawFile file = raw::read_raw(job.raw, raw::Selection{{"op"}, false});
            const raw::Plot* op_plot = nullptr;
            for (const auto& plot : file.plots)
                if (!op_plot && plot.kind() == "op" && plot.decoded && plot.point_count > 0) op_plot = &plot;
            if (!op_plot) throw ngspice_failure(job.call, "wrote no operating point");
            OpPoint op = build_op_point(circuit, file, *op_plot);
            auto plots = simulation_plots_from_raw(raw::read_raw(job.raw, raw::Selection{{"ac", "tf"}, false}));
            ReviewInputs inputs{review_.netlist, op.origin, {source}, {}};
            const std::string origin = op.origin;
            const ReviewTree tree = run_review(circuit, recognition, std::move(op), std::move(plots), settings, inputs);
            if (save) {
                const fs::path report = folder_ / "reports" / (job.label + ".json");
                fs::create_directories(report.parent_path());
                // Whole or not at all: `merge` over an interrupted sweep's reports reads each one.
                std::ostringstream text;
                report::write_review_json(tree, text);
                write_file(report, text.str());
            }
            return sweep::record_from_review(tree, job.label, origin);
        } catch (const InputError& e) {
            return sweep::failed_record(job.label, source, e.where().to_string() + ": " + e.message());
        }
    }
};

}  // namespace

std::vector<sweep::RunRecord> simulate_and_review(const ReviewOptions& review, const SimulationRequest& request) {
    return SimulatedSweep(review, request).run();
}

}  // namespace mirrorcheck::cli
