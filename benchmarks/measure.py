"""Wall time and peak memory of one child process, taken from the kernel's accounting of that child.

``os.wait4`` returns the resource usage of exactly the process waited for (and its own reaped
children), so ``ru_maxrss`` is that run's peak resident set, not a running maximum over all
children as ``getrusage(RUSAGE_CHILDREN)`` would give.
"""

from __future__ import annotations

import os
import signal
import subprocess
import time
from dataclasses import dataclass
from pathlib import Path

OK, FAILED, TIMEOUT = "ok", "failed", "timeout"


@dataclass
class Run:
    """One measured run: ``status`` is ``ok``, ``failed`` (exit code not accepted) or ``timeout``."""

    status: str
    seconds: float
    peak_mib: float
    exit_code: int | None
    stdout: Path
    stderr: Path

    def last_error_line(self) -> str:
        try:
            lines = [line for line in self.stderr.read_text(errors="replace").splitlines() if line.strip()]
        except OSError:
            return ""
        return lines[-1][:200] if lines else ""


def run_measured(command: list[str], cwd: Path, log_stem: Path, timeout: float,
                 accepted_exit_codes: tuple[int, ...] = (0,)) -> Run:
    """Run ``command``, sending its output to ``log_stem``.stdout/.stderr; kill it after ``timeout`` s."""
    stdout_path = log_stem.with_name(log_stem.name + ".stdout")
    stderr_path = log_stem.with_name(log_stem.name + ".stderr")
    stdout_path.parent.mkdir(parents=True, exist_ok=True)
    with stdout_path.open("wb") as out, stderr_path.open("wb") as err:
        began = time.perf_counter()
        child = subprocess.Popen(command, cwd=cwd, stdout=out, stderr=err, stdin=subprocess.DEVNULL,
                                 start_new_session=True)  # own process group, so a timeout kills it all
        timed_out = False
        while True:
            pid, status, usage = os.wait4(child.pid, os.WNOHANG)
            if pid:
                break
            elapsed = time.perf_counter() - began
            if elapsed > timeout:
                # the child is not reaped yet, so its pid (= its group id) still names it
                os.killpg(child.pid, signal.SIGKILL)
                timed_out = True
                pid, status, usage = os.wait4(child.pid, 0)
                break
            time.sleep(0.002 if elapsed < 1.0 else 0.01)
        seconds = time.perf_counter() - began
    exit_code = os.waitstatus_to_exitcode(status)
    child.returncode = exit_code  # already reaped by wait4; tell Popen so it never waits again
    if timed_out:
        state = TIMEOUT
    else:
        state = OK if exit_code in accepted_exit_codes else FAILED
    return Run(state, seconds, usage.ru_maxrss / 1024.0, exit_code, stdout_path, stderr_path)
