#include "src/deck/child_process.hpp"

#include <cerrno>
#include <thread>

#include <spawn.h>
#include <sys/wait.h>
#include <unistd.h>

extern char** environ;

namespace mirrorcheck {
namespace {

volatile std::sig_atomic_t noted_signal = 0;
extern "C" void note_stop_signal(int signal) { noted_signal = signal; }

constexpr int stop_signals[3] = {SIGINT, SIGTERM, SIGHUP};

// Waits for `pid` at most `limit` (negative: for ever); true when it has ended.
bool wait_for(pid_t pid, int& raw, std::chrono::steady_clock::duration limit, bool until_stop) {
    const auto start = std::chrono::steady_clock::now();
    for (;;) {
        const pid_t done = waitpid(pid, &raw, WNOHANG);
        if (done == pid) return true;
        if (done < 0 && errno != EINTR) {
            raw = 0;
            return true;  // not our child any more: nothing left to wait for
        }
        if (until_stop && noted_signal != 0) return false;
        if (limit.count() >= 0 && std::chrono::steady_clock::now() - start >= limit) return false;
        std::this_thread::sleep_for(std::chrono::milliseconds(10));
    }
}

}  // namespace

StopSignals::StopSignals() {
    noted_signal = 0;
    struct sigaction a {};
    a.sa_handler = note_stop_signal;
    sigemptyset(&a.sa_mask);
    for (int k = 0; k < 3; ++k) sigaction(stop_signals[k], &a, &previous_[k]);
}

StopSignals::~StopSignals() {
    for (int k = 0; k < 3; ++k) sigaction(stop_signals[k], &previous_[k], nullptr);
}

int stop_signal() { return noted_signal; }

ChildOutcome run_child(const std::string& command, std::chrono::seconds timeout) {
    const char* argv[] = {"sh", "-c", command.c_str(), nullptr};
    posix_spawnattr_t attributes;
    posix_spawnattr_init(&attributes);
    // A group of its own: a terminal's Ctrl-C reaches mirrorcheck alone, which then ends
    // the child's whole group (the shell and ngspice) itself.
    posix_spawnattr_setpgroup(&attributes, 0);
    posix_spawnattr_setflags(&attributes, POSIX_SPAWN_SETPGROUP);
    pid_t pid = 0;
    const int spawned = posix_spawn(&pid, "/bin/sh", nullptr, &attributes, const_cast<char* const*>(argv), environ);
    posix_spawnattr_destroy(&attributes);
    if (spawned != 0) return {ChildOutcome::End::exited, 127};

    int raw = 0;
    const auto limit = timeout.count() > 0 ? std::chrono::steady_clock::duration(timeout)
                                           : std::chrono::steady_clock::duration(-1);
    ChildOutcome outcome;
    if (!wait_for(pid, raw, limit, true)) {
        outcome.end = noted_signal != 0 ? ChildOutcome::End::stopped : ChildOutcome::End::timed_out;
        kill(-pid, SIGTERM);
        if (!wait_for(pid, raw, std::chrono::seconds(2), false)) {
            kill(-pid, SIGKILL);
            wait_for(pid, raw, std::chrono::steady_clock::duration(-1), false);
        }
    }
    // The group's other members (ngspice under the shell) are ended with it.
    if (outcome.end != ChildOutcome::End::exited) kill(-pid, SIGKILL);
    outcome.status = WIFEXITED(raw) ? WEXITSTATUS(raw) : WIFSIGNALED(raw) ? 128 + WTERMSIG(raw) : 0;
    return outcome;
}

}  // namespace mirrorcheck
