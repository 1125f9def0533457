"""Wall time and peak memory of one command, including any processes it forks.

``os.wait4`` returns the resource usage of exactly the process waited for (and its own reaped
children), so ``ru_maxrss`` is that run's peak resident set, not a running maximum over all
children as ``getrusage(RUSAGE_CHILDREN)`` would give. It is the largest of its processes, though,
not their sum, and levelcross forks a child for slang's diagnostics pass on big designs. So where
the machine offers a cgroup-v1 memory controller (as root on Linux), each run gets a group of its
own and the kernel's ``memory.max_usage_in_bytes`` for that group, every page counted once across
the whole process tree, is the peak; it also charges page cache the run reads first, so it is on
the cautious side. The reported peak is the larger of that and ``ru_maxrss``. Sampling
``/proc/PID/smaps`` instead was tried and slowed the measured run by a third.
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


_MEMORY_CGROUPS = Path("/sys/fs/cgroup/memory")


class _MemoryGroup:
    """A fresh cgroup-v1 memory group for one run, or nothing where none can be made."""

    def __init__(self, name: str) -> None:
        self.path: Path | None = _MEMORY_CGROUPS / name
        try:
            self.path.mkdir()
        except OSError:
            self.path = None

    def join(self) -> None:
        """Move the calling process in: run in the child between fork and exec."""
        if self.path is not None:
            (self.path / "cgroup.procs").write_text(str(os.getpid()))

    def peak_mib(self) -> float:
        if self.path is None:
            return 0.0
        try:
            return int((self.path / "memory.max_usage_in_bytes").read_text()) / 2**20
        except (OSError, ValueError):
            return 0.0

    def remove(self) -> None:
        if self.path is not None:
            try:
                self.path.rmdir()
            except OSError:
                pass


def run_measured(command: list[str], cwd: Path, log_stem: Path, timeout: float,
                 accepted_exit_codes: tuple[int, ...] = (0,)) -> Run:
    """Run ``command``, sending its output to ``log_stem``.stdout/.stderr; kill it after ``timeout`` s."""
    stdout_path = log_stem.with_name(log_stem.name + ".stdout")
    stderr_path = log_stem.with_name(log_stem.name + ".stderr")
    stdout_path.parent.mkdir(parents=True, exist_ok=True)
    with stdout_path.open("wb") as out, stderr_path.open("wb") as err:
        group = _MemoryGroup(f"levelcross-bench-{os.getpid()}-{time.monotonic_ns()}")
        began = time.perf_counter()
        child = subprocess.Popen(command, cwd=cwd, stdout=out, stderr=err, stdin=subprocess.DEVNULL,
                                 start_new_session=True,  # own process group, so a timeout kills it all
                                 preexec_fn=group.join)  # noqa: PLW1509 - this script starts no threads
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
    peak_mib = max(usage.ru_maxrss / 1024.0, group.peak_mib())
    group.remove()
    return Run(state, seconds, peak_mib, exit_code, stdout_path, stderr_path)
