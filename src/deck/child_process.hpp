// Runs a shell command as a child process in a process group of its own, with a time
// limit, and ends it (and everything it started) when the limit passes or when mirrorcheck
// is asked to stop (SIGINT, SIGTERM, SIGHUP while a StopSignals guard is alive).
#pragma once

#include <chrono>
#include <csignal>
#include <string>

namespace mirrorcheck {

// While alive, SIGINT, SIGTERM and SIGHUP no longer end mirrorcheck at once: they are
// noted (stop_signal()) so that the command can end its children, remove its temporary
// folder and say what it kept. The handlers before it are restored when it ends.
class StopSignals {
public:
    StopSignals();
    ~StopSignals();
    StopSignals(const StopSignals&) = delete;
    StopSignals& operator=(const StopSignals&) = delete;

private:
    struct sigaction previous_[3];
};

// The signal that asked mirrorcheck to stop since the guard began, or 0.
int stop_signal();

struct ChildOutcome {
    enum class End { exited, timed_out, stopped };
    End end = End::exited;
    int status = 0;  // the exit status, 128 + signal when a signal ended it; 127 when it could not start
};

// Runs `/bin/sh -c command` and waits for it; `timeout` 0 waits for ever. On the time
// limit or a stop signal its whole process group gets SIGTERM, then SIGKILL two seconds
// later, and the outcome says which.
ChildOutcome run_child(const std::string& command, std::chrono::seconds timeout);

}  // namespace mirrorcheck
